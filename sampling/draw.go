package sampling

import (
	"errors"
	"fmt"
	"io"
	"sort"
	"strings"

	"probity/plan"
	"probity/plan/chrono"
	"probity/plan/inputerr"
	"probity/sampling/drawfolder"
)

// DrawInput is everything a draw from a log file depends on.
type DrawInput struct {
	Plan            *plan.File
	PlanFingerprint string
	// LogPath is the log's path as given ("-" for stdin), for messages and
	// the manifest; Log is its content.
	LogPath string
	Log     io.Reader
	// Format is csv, tsv or jsonl ("" detects it).
	Format string
	// Period, if set, derives the selection seed PeriodSeed(seed, Period).
	Period        string
	IDColumn      string
	StrataColumns []string
	Bands         []Band
	Where         []Filter
	Show          []string
	Alloc         AllocOptions
	// NeymanSource names where the anticipated errors came from (a file,
	// or "band COLUMN" when derived from a score band).
	NeymanSource string
	// NeymanFromBand derives p_h from the first band's interval:
	// p_h = min(m, 1 − m) at its midpoint m.
	NeymanFromBand bool
	// Double is k of --double k.
	Double int
	// Dedupe keeps the first row of a repeated id.
	Dedupe bool
	// TimeColumn, if set, is the log's time column: every row in scope
	// must hold a time there, and the manifest records the log's
	// completeness over Days — a declared range, or (zero) the period's
	// days when the period is written YYYY-MM or YYYY-MM-DD, or else the
	// days from the first row to the last.
	TimeColumn string
	Days       chrono.DayRange
	// MaxLine bounds the bytes of a line of the log (0: DefaultMaxLine).
	MaxLine     int64
	ToolVersion string
	Workers     int
	ChunkSize   int
	Progress    func(Progress)
}

// ErrNotDrawable is wrapped when a plan declares no candidates.
var ErrNotDrawable = errors.New("a sizing-only plan cannot be drawn")

// capacityMargin is kept beyond n + spare per stratum, so that a few ids
// repeated across strata and dropped under --dedupe first cannot leave a
// stratum short.
const capacityMargin = 8

// Draw reads the log once, allocates the plan's sample across strata and
// returns the draw folder's content (not yet written). In each stratum the
// n_h rows with the smallest keys are the sample and the next ones the
// spares; the worksheet lists the sample in ascending key order, then the
// spares in key order.
func Draw(in DrawInput) (*drawfolder.Content, error) {
	p := in.Plan
	if p.IsSizingOnly() {
		return nil, inputerr.Errorf("%w: it declares no candidates (models or thresholds) to judge", ErrNotDrawable)
	}
	if in.IDColumn == "" {
		in.IDColumn = "record_id"
	}
	n := p.Rule.SampleSize
	capacity := n + in.Alloc.Spare + capacityMargin
	if p.Measures != nil {
		// the design is sized again on the log's strata: room for eight
		// times the planned labels in any stratum (allocateMeasures says
		// when that is not enough)
		n = p.Measures.Design.Total
		capacity = 8*n + in.Alloc.Spare + capacityMargin
	}
	if in.Double < 0 || in.Double > n {
		return nil, &inputerr.Error{Field: "double", Msg: fmt.Sprintf("%d: must be between 0 and the sample size %d", in.Double, n)}
	}
	if err := checkSpare(in.Alloc.Spare, n); err != nil {
		return nil, err
	}
	if err := checkShow(in); err != nil {
		return nil, err
	}
	seed := p.Seed
	selection := seed
	if in.Period != "" {
		selection = PeriodSeed(seed, in.Period)
	}
	// Kept columns: the shown ones, then each candidate's column.
	keep := append([]string{}, in.Show...)
	roles := make([]string, len(keep))
	for i := range roles {
		roles[i] = "shown"
	}
	candCol := make([]int, len(p.Candidates))
	for i, c := range p.Candidates {
		col := c.Columns()[0]
		j := indexOf(keep, col)
		if j < 0 {
			j = len(keep)
			keep = append(keep, col)
			roles = append(roles, "candidate "+c.Name)
		}
		candCol[i] = j
	}
	name := in.LogPath
	if name == "-" {
		name = "stdin"
	}
	res, err := Scan(in.Log, ScanSpec{
		Name: name, Format: in.Format, Seed: selection, IDColumn: in.IDColumn,
		StrataColumns: in.StrataColumns, Bands: in.Bands, Where: in.Where, Keep: keep, KeepRoles: roles,
		Capacity: capacity, Dedupe: in.Dedupe, TimeColumn: in.TimeColumn, MaxLine: in.MaxLine,
		Workers: in.Workers, ChunkSize: in.ChunkSize, Progress: in.Progress,
	})
	if err != nil {
		return nil, err
	}
	if pop := p.Inputs.Population; pop > 0 && in.Period == "" && res.InScope != pop {
		e := inputErrorf(name, 0, "", "%d rows are in scope but the plan is for a lot of %d (inputs.population)", res.InScope, pop)
		e.Hint = fmt.Sprintf("a finite-lot plan judges exactly one lot: plan again for a lot of %d, or draw for a period to take this log as the period's lot", res.InScope)
		return nil, e
	}
	counts := make([]StratumCount, len(res.Strata))
	for i, st := range res.Strata {
		counts[i] = StratumCount{Label: st.Label, Population: st.Count}
	}
	opts := in.Alloc
	if opts.Rule == Neyman && in.NeymanFromBand {
		opts.Anticipated, err = bandAnticipated(in, counts)
		if err != nil {
			return nil, err
		}
	}
	if opts.Rule == Neyman && !in.NeymanFromBand {
		labels := make([]string, len(counts))
		for i, c := range counts {
			labels[i] = c.Label
		}
		if err := CheckAnticipated(in.NeymanSource, opts.Anticipated, labels); err != nil {
			return nil, err
		}
	}
	var alloc []StratumAllocation
	var measuresInfo *drawfolder.MeasuresInfo
	effMin := 0
	if opts.Rule == Measures {
		alloc, measuresInfo, err = allocateMeasures(in, counts)
	} else {
		effMin = EffectiveMin(counts, n, opts)
		alloc, err = Allocate(counts, n, opts)
	}
	if err != nil {
		if errors.Is(err, ErrSampleTooLarge) {
			e := inputErrorf(name, 0, "", "the plan needs a sample of %d but only %d rows are in scope", n, res.InScope)
			e.Err = err
			return nil, e
		}
		return nil, err
	}
	var sample, spares []drawfolder.LedgerRow
	var src []*Row
	var spareSrc []*Row
	for i := range alloc {
		a := alloc[i]
		st := res.Strata[i]
		if st.Label != a.Label {
			return nil, fmt.Errorf("internal: strata out of order (%q, %q)", st.Label, a.Label)
		}
		need := a.Sample + a.Spare
		if need > len(st.Rows) && int64(len(st.Rows)) == min(st.Count, int64(capacity)) && st.Count > int64(capacity) {
			return nil, inputerr.Errorf("stratum %q needs %d rows, more than the %d the draw keeps for a plan of %d labels", a.Label, need, capacity, n).WithHint("the log's strata differ much from what the plan anticipated: plan again with its shares")
		}
		if need > len(st.Rows) {
			return nil, inputerr.Errorf("%w: stratum %q needs %d rows but only %d could be kept: too many ids repeat across strata", ErrDuplicateIDs, a.Label, need, len(st.Rows))
		}
		for j := 0; j < need; j++ {
			r := &st.Rows[j]
			lr := drawfolder.LedgerRow{RecordID: r.ID, Stratum: a.Label, StratumSize: a.Population, StratumSample: a.Sample, Weight: a.Weight, Key: r.KeyHex(), Spare: j >= a.Sample}
			if lr.Spare {
				spares = append(spares, lr)
				spareSrc = append(spareSrc, r)
			} else {
				sample = append(sample, lr)
				src = append(src, r)
			}
		}
	}
	sortByKey(sample, src)
	sortByKey(spares, spareSrc)
	rows := append(sample, spares...)
	srcRows := append(src, spareSrc...)
	f := &drawfolder.Content{Show: append([]string{}, in.Show...)}
	for _, c := range p.Candidates {
		f.Candidates = append(f.Candidates, c.Name)
	}
	for i := range rows {
		r := srcRows[i]
		rows[i].Item = i + 1
		rows[i].Double = !rows[i].Spare && i < in.Double
		rows[i].Predictions = make([]string, len(p.Candidates))
		for ci, c := range p.Candidates {
			v, err := c.Predict(r.Values[candCol[ci]])
			if err != nil {
				return nil, inputErrorf(name, int(r.Line), c.Columns()[0], "candidate %s: %v", c.Name, err)
			}
			rows[i].Predictions[ci] = v
		}
		w := drawfolder.WorksheetRow{Item: i + 1, RecordID: r.ID, Spare: rows[i].Spare, Show: append([]string{}, r.Values[:len(in.Show)]...)}
		f.Worksheet = append(f.Worksheet, w)
		if rows[i].Double {
			f.Second = append(f.Second, w)
		}
	}
	f.Ledger = rows
	f.Manifest = buildManifest(in, res, alloc, selection)
	f.Manifest.Measures = measuresInfo
	f.Manifest.Allocation.MinPerStratum = effMin
	if opts.Rule == Proportional || opts.Rule == "" {
		f.Manifest.Allocation.Rounding = opts.Rounding
	}
	f.Manifest.Allocation.Note = AllocationNote(alloc, n, effMin, f.Manifest.Allocation.Rounding)
	f.Manifest.SampleSize = len(sample)
	f.Manifest.Spares = len(spares)
	if res.Times != nil {
		f.Manifest.Completeness = res.Times.Completeness(in.TimeColumn, CompletenessDays(in.Period, in.Days))
	}
	return f, nil
}

// CompletenessDays is the range of days a draw's completeness is checked
// over: the declared range when set, else the period's days when its label
// is a month or a day (chrono.PeriodDays), else none (the rows' own days).
func CompletenessDays(period string, declared chrono.DayRange) chrono.DayRange {
	if !declared.From.IsZero() {
		return declared
	}
	if r, ok := chrono.PeriodDays(period); ok {
		return r
	}
	return chrono.DayRange{}
}

func buildManifest(in DrawInput, res *ScanResult, alloc []StratumAllocation, selection string) *drawfolder.Manifest {
	p := in.Plan
	m := &drawfolder.Manifest{
		Format: drawfolder.ManifestFormat, ToolVersion: in.ToolVersion, PlanFingerprint: in.PlanFingerprint,
		Seed: p.Seed, SelectionSeed: selection, KeyDefinition: KeyDefinition,
		Log: drawfolder.LogInfo{Path: in.LogPath, SHA256: res.SHA256, ContentSHA256: res.ContentSHA256, Bytes: res.Bytes, Rows: res.Rows,
			Format: res.Format, Compression: res.Compression},
		IDColumn:      in.IDColumn,
		StrataColumns: append([]string{}, in.StrataColumns...),
		ShowColumns:   append([]string{}, in.Show...),
		Allocation: drawfolder.AllocationInfo{Rule: ruleName(in.Alloc.Rule), MinPerStratum: in.Alloc.MinPerStratum,
			Spare: in.Alloc.Spare, NeymanSource: in.NeymanSource},
		Double:  in.Double,
		LotSize: res.InScope,
	}
	if in.Period != "" {
		m.Period = in.Period
		m.PeriodSeed = selection
	}
	for _, b := range in.Bands {
		m.Bands = append(m.Bands, b.String())
	}
	for _, w := range in.Where {
		m.Where = append(m.Where, w.String())
	}
	if in.Dedupe {
		m.Dedupe = "first"
		m.DuplicatesDropped = int(res.Repeats)
	}
	for _, a := range alloc {
		m.Strata = append(m.Strata, drawfolder.StratumInfo{Label: a.Label, Population: a.Population, Sample: a.Sample,
			Spare: a.Spare, Weight: a.Weight, Anticipated: a.Anticipated})
	}
	return m
}

// AllocationNote says what an allocation did to the inclusion weights
// N_h/n_h: how many items beyond the plan's n rounding shares up took, how
// many strata a minimum per stratum raised, which strata got no item, and
// the range of the weights; "" when every weight is the same.
func AllocationNote(alloc []StratumAllocation, n, minPer int, rounding string) string {
	var parts []string
	total, empty := 0, 0
	lo, hi := 0.0, 0.0
	for _, a := range alloc {
		total += a.Sample
		if a.Sample == 0 {
			empty++
			continue
		}
		if lo == 0 || a.Weight < lo {
			lo = a.Weight
		}
		hi = max(hi, a.Weight)
	}
	if rounding == RoundUp && total > n {
		parts = append(parts, fmt.Sprintf("proportional shares rounded up: %d items where the plan asks for %d, so that no stratum is sampled below its share", total, n))
	}
	if minPer > 0 {
		raised := 0
		for _, a := range alloc {
			if a.Sample == min(minPer, int(min(a.Population, int64(minPer)))) && a.Sample > 0 {
				raised++
			}
		}
		part := fmt.Sprintf("at least %d per stratum", minPer)
		if raised > 0 {
			part += fmt.Sprintf(" (%d at that minimum)", raised)
		}
		parts = append(parts, part)
	}
	if empty > 0 {
		parts = append(parts, fmt.Sprintf("%d strata with no item, which the verdict counts as unknown (all their decisions may be errors)", empty))
	}
	if hi > lo*(1+1e-12) {
		parts = append(parts, fmt.Sprintf("inclusion weights N_h/n_h from %.4g to %.4g", lo, hi))
	}
	if len(parts) == 0 || hi <= lo*(1+1e-12) && empty == 0 {
		return ""
	}
	return strings.Join(parts, "; ")
}

func ruleName(r string) string {
	if r == "" {
		return Proportional
	}
	return r
}

// checkShow refuses --show columns that would let labelers see the model's
// answer or the stratum.
func checkShow(in DrawInput) error {
	seen := map[string]bool{}
	for _, s := range in.Show {
		why := ""
		switch {
		case s == in.IDColumn:
			why = "this is the id column, which the worksheet already has"
		case indexOf(in.StrataColumns, s) >= 0:
			why = "this is a strata column; labelers must not see the stratum"
		case seen[s]:
			why = "the column is listed twice"
		}
		for _, b := range in.Bands {
			if b.Column == s {
				why = "this is a band (score) column; labelers must not see the model's score"
			}
		}
		for _, c := range in.Plan.Candidates {
			if c.Columns()[0] == s {
				why = fmt.Sprintf("this column holds candidate %s's prediction or score; labelers must not see the model's answer", c.Name)
			}
		}
		if why != "" {
			return &inputerr.Error{Field: "show_columns", Msg: s + ": " + why}
		}
		seen[s] = true
	}
	return nil
}

// bandAnticipated derives p_h from the first band: a calibrated score m
// predicts its more likely class, which is wrong with probability
// min(m, 1 − m); m is the band interval's midpoint.
func bandAnticipated(in DrawInput, counts []StratumCount) (map[string]float64, error) {
	if len(in.Bands) == 0 {
		return nil, inputerr.Errorf("%w: neyman allocation needs anticipated errors per stratum or a score band", ErrAllocation)
	}
	b := in.Bands[0]
	labels := b.Labels()
	pos := len(in.StrataColumns)
	out := map[string]float64{}
	for _, c := range counts {
		parts := strings.Split(c.Label, "|")
		if pos >= len(parts) {
			return nil, fmt.Errorf("internal: stratum label %q has no band part", c.Label)
		}
		idx := indexOf(labels, parts[pos])
		if idx < 0 {
			return nil, fmt.Errorf("internal: band %q not found", parts[pos])
		}
		m := b.Midpoint(idx)
		out[c.Label] = min(m, 1-m)
	}
	return out, nil
}

func sortByKey(rows []drawfolder.LedgerRow, src []*Row) {
	idx := make([]int, len(rows))
	for i := range idx {
		idx[i] = i
	}
	sort.Slice(idx, func(a, b int) bool { return keyLess(&src[idx[a]].Key, &src[idx[b]].Key) })
	r2 := make([]drawfolder.LedgerRow, len(rows))
	s2 := make([]*Row, len(src))
	for i, j := range idx {
		r2[i], s2[i] = rows[j], src[j]
	}
	copy(rows, r2)
	copy(src, s2)
}

func indexOf(list []string, s string) int {
	for i, v := range list {
		if v == s {
			return i
		}
	}
	return -1
}
