package main

import (
	"errors"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"strings"
	"time"

	"github.com/spf13/cobra"

	"probity/plan"
	"probity/plan/chrono"
	"probity/plan/inputerr"
	"probity/plan/numfmt"
	"probity/plan/planfile"
	"probity/plan/trend"
	"probity/sampling"
	"probity/sampling/drawfolder"
	"probity/sampling/safewrite"
)

// drawOptions are the flags of probity draw.
type drawOptions struct {
	planPath string
	logPath  string
	out      string
	check    string
	// json prints the draw as one JSON object instead of the summary.
	json       bool
	format     string
	id         string
	strata     []string
	bands      []string
	show       []string
	where      []string
	allocation string
	minPer     int
	minPerSet  bool
	rounding   string
	// allocationSet and roundingSet record whether the flags were given
	// (a plan sized for a stratified design supplies the defaults).
	allocationSet, roundingSet bool
	anticipated                string
	spare                      int
	dedupe                     string
	double                     int
	period                     string
	date                       string
	timeColumn                 string
	days                       string
	force                      bool
	quiet                      bool
	maxLine                    string

	parsedBands   []sampling.Band
	parsedMaxLine int64
	parsedWhere   []sampling.Filter
}

// drawExitHelp is the exit-code section of draw's help.
var drawExitHelp = exitHelp("success: the sample was drawn (with --check: the folder holds exactly what\nthe seed picks from the log)",
	"with --check: the folder differs from what the seed picks from the log", true)

// drawProgressMin is the log size from which a progress bar is shown.
const drawProgressMin = 64 << 20

// newDrawCommand builds `probity draw`.
func newDrawCommand(d deps) *cobra.Command {
	opts := &drawOptions{}
	cmd := &cobra.Command{
		Use:   "draw --plan PLAN.yaml --log FILE --out DIR",
		Short: "Draw the stratified, verifiable sample list from a prediction log",
		Long: `draw reads the prediction log once and picks the items to label.

Each row's key is the lowercase hex SHA-256 of the UTF-8 bytes
"<seed>:<record id>", the seed exactly as in the plan (with --period LABEL,
the period seed sha256hex("<plan seed>:period:<LABEL>") instead). In each
stratum the n_h rows with the smallest keys are the sample, and the next
--spare rows in key order its spares. Anyone holding the plan and the log can
recompute the selection; it does not depend on the order of the rows.

The log is CSV, TSV or JSON Lines (by extension, else by content; - reads
stdin), optionally gzip-compressed (detected by its first bytes). Strata are
the values of the --strata columns joined with | in the order given, then the
--band intervals: --band score=0.5,0.9 splits a score in [0, 1] into
[0,0.5), [0.5,0.9) and [0.9,1].

The plan's n is allocated across strata --allocation proportional (the
default), neyman (n_h ∝ N_h·√(p_h(1−p_h)), p_h from --anticipated FILE, a CSV
with columns stratum,anticipated_error or a YAML mapping, or derived from the
first band as min(m, 1−m) at the interval midpoint m) or equal. Proportional
shares are rounded up (--rounding up, the default): every stratum gets
⌈n·N_h/N⌉ items, so none is sampled below its share and every stratum gets an
item, at the cost of at most one label per stratum beyond n;
--rounding largest-remainder keeps exactly n (ties by stratum label in byte
order). Neyman and equal shares are rounded by largest remainder, and a
stratum smaller than its share is taken whole and the rest shared again.
Every stratum gets at least --min-per-stratum k items (default 1 when the
sample has room for one per stratum; --min-per-stratum 0 lets a stratum get
none). A stratum with no item counts as unknown in the verdict: all of its
decisions may be errors.

Unless the allocation is exactly proportional, the verdict rests on the
stratified count rule (see probity record --help), which keeps the plan's
consumer's risk under any allocation; draw prints that rule — its acceptance
number, the items it counts, and the producer's risk it gives at the
anticipated error — before any label is given. A sequential plan needs a
draw without strata: its boundaries count errors down the worksheet, and
only an unstratified worksheet has every prefix a simple random sample.

DIR receives, each written to a temporary name and renamed:
  worksheet.csv         for the labelers: item, record_id, the --show columns,
                        empty label, note and labeler columns; sample in key
                        order, then spares. Never a prediction, score or stratum.
  worksheet-second.csv  with --double k: the first k items, for a second,
                        independent label
  ledger.csv            for the audit owner: item, record_id, stratum,
                        stratum_size, stratum_sample, weight, key, spare,
                        double, then each candidate's prediction
  manifest.json         plan fingerprint, log SHA-256, bytes and rows, strata
                        with N_h and n_h, seeds, allocation, file digests,
                        tool version
A non-empty DIR is refused unless --force.

Repeated record ids are an error unless --dedupe first. They are detected
exactly among the rows that could be drawn (those whose keys are among the
n + spare smallest of their stratum); a repeat that could not be drawn cannot
change the sample. --dedupe first keeps the first row of each id and drops
the others: every stratum then counts distinct ids (an id belongs to the
stratum of its first row), which needs memory for each distinct id, so a log
with more than 10 million distinct ids in scope is refused.

probity draw --check DIR --plan PLAN.yaml --log FILE draws again with the
options recorded in DIR/manifest.json and reports whether the ledger and
worksheets hold exactly what chance picked (exit 0) or what differs (exit 1).
Labels written into the worksheets since the draw are not differences.

` + drawExitHelp,
		Example: `  probity draw --plan plan.yaml --log predictions.csv.gz --out audit-2026-11 \
      --strata region,channel --show text --spare 2 --double 50 --period 2026-11
  probity draw --check audit-2026-11 --plan plan.yaml --log predictions.csv.gz`,
		Args: cobra.NoArgs,
		PreRunE: func(cmd *cobra.Command, args []string) error {
			opts.minPerSet = cmd.Flags().Changed("min-per-stratum")
			opts.allocationSet, opts.roundingSet = cmd.Flags().Changed("allocation"), cmd.Flags().Changed("rounding")
			if opts.json && (opts.check != "" || cmd.Flags().Changed("sql") || cmd.Flags().Changed("selected")) {
				return inputerr.Errorf("--json applies to a draw from a log file").WithHint("drop --json")
			}
			if cmd.Flags().Changed("rounding") && opts.allocation != sampling.Proportional {
				return inputerr.Errorf("--rounding applies to --allocation proportional only").WithHint("drop --rounding")
			}
			return opts.validate()
		},
		RunE: func(cmd *cobra.Command, args []string) error {
			if opts.check != "" {
				return runDrawCheck(d, opts)
			}
			return runDraw(d, opts)
		},
	}
	fl := cmd.Flags()
	fl.StringVar(&opts.planPath, "plan", "", "the plan `FILE` (from probity plan)")
	fl.StringVar(&opts.logPath, "log", "", "the prediction log `FILE`: CSV, TSV or JSON Lines, optionally gzip; - for stdin")
	fl.StringVar(&opts.out, "out", "", "the folder `DIR` to write the draw into")
	fl.StringVar(&opts.check, "check", "", "check the draw in `DIR` against the log and plan instead of drawing")
	fl.StringVar(&opts.format, "format", "", "the log's `FORMAT`, csv, tsv or jsonl (default: from the extension, else the content)")
	fl.StringVar(&opts.id, "id", "record_id", "the log's record id `COLUMN`")
	fl.StringSliceVar(&opts.strata, "strata", nil, "stratify by these columns (`COL1,COL2`)")
	fl.StringArrayVar(&opts.bands, "band", nil, "stratify by score intervals: `COLUMN=EDGE1,EDGE2,...` (repeatable)")
	fl.StringSliceVar(&opts.show, "show", nil, "columns the labelers see in the worksheet (`COL,...`)")
	fl.StringArrayVar(&opts.where, "where", nil, "draw only from rows whose COLUMN holds one of the values: `COLUMN=V1,V2` (repeatable)")
	fl.StringVar(&opts.allocation, "allocation", sampling.Proportional, "how n is divided among strata: `RULE` is proportional, neyman or equal")
	fl.IntVar(&opts.minPer, "min-per-stratum", 1, "at least `k` items from every stratum (default 1 when the sample has room; 0 leaves strata that get no share empty, counted as unknown)")
	fl.StringVar(&opts.rounding, "rounding", sampling.RoundUp, "proportional shares rounded `up` (no stratum below its share; up to one item per stratum beyond n) or largest-remainder (exactly n)")
	fl.StringVar(&opts.anticipated, "anticipated", "", "anticipated error per stratum for neyman: CSV (stratum,anticipated_error) or YAML `FILE`")
	fl.IntVar(&opts.spare, "spare", 0, "`k` spare items per stratum, next in key order, to replace items that cannot be labeled")
	fl.StringVar(&opts.dedupe, "dedupe", "", "with `first`: keep the first row of a repeated record id instead of refusing")
	fl.IntVar(&opts.double, "double", 0, "the first `k` items get a second, independent label (worksheet-second.csv)")
	fl.StringVar(&opts.period, "period", "", "draw a fresh sample for period `LABEL` (e.g. 2026-11) with the period seed")
	fl.StringVar(&opts.date, "date", "", dateFlagUsage("the sample is drawn"))
	fl.StringVar(&opts.timeColumn, "time-column", "", "the log `COLUMN` that dates each decision: record the first and last time and the days without rows (default: the plan's time_column)")
	fl.StringVar(&opts.days, "days", "", "the days the log should cover, `FROM/TO` (YYYY-MM-DD, both included), for --time-column (default: the --period's month)")
	fl.BoolVar(&opts.force, "force", false, "write into a non-empty output folder")
	fl.BoolVar(&opts.json, "json", false, "print one JSON object (the strata and, for a plan with measures, each claim's test) instead of the summary")
	fl.BoolVarP(&opts.quiet, "quiet", "q", false, "no progress bar")
	fl.StringVar(&opts.maxLine, "max-line", "", maxLineHelp)
	hookDrawSQL(d, cmd, opts) // --sql, --table, --selected: draw_sql.go
	return cmd
}

// validate checks the flags before any file is read.
func (o *drawOptions) validate() error {
	if o.planPath == "" {
		return inputerr.Errorf("--plan is required").WithHint("give the plan file made by 'probity plan', e.g. --plan plan.yaml")
	}
	if o.logPath == "" {
		return inputerr.Errorf("--log is required").WithHint("give the prediction log, e.g. --log predictions.csv.gz (- reads stdin)")
	}
	if err := parseDateFlag(o.date); err != nil {
		return err
	}
	if o.days != "" {
		if _, ok := chrono.ParseDayRange(o.days); !ok {
			return inputerr.Errorf("--days %q is not a range of days FROM/TO", o.days).WithHint("for example --days 2026-11-01/2026-11-30 (both days included)")
		}
	}
	if o.maxLine != "" {
		n, err := parseSize("--max-line", o.maxLine)
		if err != nil {
			return err
		}
		o.parsedMaxLine = n
	}
	if o.check != "" {
		if o.out != "" {
			return inputerr.Errorf("--check and --out cannot be used together").WithHint("--check DIR verifies an existing draw; --out DIR makes a new one")
		}
		return nil
	}
	if o.out == "" {
		return inputerr.Errorf("--out is required").WithHint("name the folder to write the draw into, e.g. --out audit-2026-11")
	}
	switch o.format {
	case "", sampling.FormatCSV, sampling.FormatTSV, sampling.FormatJSONL:
	default:
		return inputerr.Errorf("--format %s is not csv, tsv or jsonl", o.format).WithHint("leave it out to detect the format")
	}
	switch o.allocation {
	case sampling.Proportional, sampling.Equal:
		if o.anticipated != "" {
			return inputerr.Errorf("--anticipated is only used by --allocation neyman").WithHint("add --allocation neyman, or drop --anticipated")
		}
	case sampling.Neyman:
	default:
		return inputerr.Errorf("--allocation %s is not proportional, neyman or equal", o.allocation).WithHint("the default is proportional")
	}
	for _, v := range []struct {
		name string
		n    int
	}{{"--min-per-stratum", o.minPer}, {"--spare", o.spare}, {"--double", o.double}} {
		if v.n < 0 {
			return inputerr.Errorf("%s %d is negative", v.name, v.n)
		}
	}
	if o.rounding != sampling.RoundUp && o.rounding != sampling.RoundLargestRemainder {
		return inputerr.Errorf("--rounding %s is not %s or %s", o.rounding, sampling.RoundUp, sampling.RoundLargestRemainder).WithHint("the default, up, keeps every stratum at or above its proportional share")
	}
	if o.dedupe != "" && o.dedupe != "first" {
		return inputerr.Errorf("--dedupe %s is not supported", o.dedupe).WithHint("--dedupe first keeps the first row of each repeated id")
	}
	if err := checkPeriodFlag(o.period); err != nil {
		return err
	}
	for _, b := range o.bands {
		pb, err := sampling.ParseBand(b)
		if err != nil {
			return inputerr.Errorf("--band: %v", err).WithHint("e.g. --band score=0.5,0.9")
		}
		o.parsedBands = append(o.parsedBands, pb)
	}
	for _, w := range o.where {
		pf, err := sampling.ParseFilter(w)
		if err != nil {
			return inputerr.Errorf("--where: %v", err).WithHint("e.g. --where region=north,south")
		}
		o.parsedWhere = append(o.parsedWhere, pf)
	}
	for _, c := range append(append([]string{o.id}, o.strata...), o.show...) {
		if strings.TrimSpace(c) == "" {
			return inputerr.Errorf("an empty column name was given (check --id, --strata and --show)")
		}
	}
	return nil
}

// checkPeriodFlag refuses a --period label a trend could not line up,
// naming what is wrong with it: a line break, surrounding spaces, or a
// character outside the label rule of plan/trend.
func checkPeriodFlag(p string) error {
	hint := "e.g. --period 2026-11"
	switch {
	case p == "":
		return nil
	case strings.ContainsAny(p, "\n\r"):
		return inputerr.Errorf("--period %q holds a line break", p).WithHint(hint)
	case strings.TrimSpace(p) != p:
		return inputerr.Errorf("--period %q has leading or trailing spaces", p).WithHint(hint)
	}
	if err := trend.CheckPeriod(p); err != nil {
		return inputerr.Errorf("--period %v", err).WithHint(hint)
	}
	return nil
}

// loadDrawPlan loads the plan and refuses a sizing-only one.
func loadDrawPlan(path string) (*plan.File, string, error) {
	p, fp, err := planfile.Load(path)
	if err != nil {
		return nil, "", err
	}
	if p.IsSizingOnly() {
		return nil, "", inputerr.Errorf("%s is a sizing-only plan: it declares no candidates, so it cannot be drawn", path).WithHint("declare the models or thresholds to judge: probity plan … --candidate NAME=COLUMN, or --thresholds COLUMN:t1,t2 --positive LABEL --negative LABEL")
	}
	return p, fp, nil
}

// openDrawLog opens the log (- is stdin) and returns its size when known.
func openDrawLog(d deps, path string) (io.Reader, func(), int64, error) {
	if path == "-" {
		return d.stdin, func() {}, 0, nil
	}
	f, err := os.Open(path)
	if err != nil {
		return nil, nil, 0, inputerr.Errorf("cannot open the log: %w", err).WithHint("check the --log path")
	}
	var size int64
	if st, err := f.Stat(); err == nil {
		if st.IsDir() {
			f.Close()
			return nil, nil, 0, inputerr.Errorf("--log %s is a folder, not a file", path)
		}
		size = st.Size()
	}
	return f, func() { f.Close() }, size, nil
}

// drawFlags names the flag of each draw setting the sampling package
// names by its manifest key.
var drawFlags = map[string]string{
	"double": "--double", "show_columns": "--show", "bands": "--band", "where": "--where", "spare": "--spare",
}

// drawError adds the draw command's flags to an error of the sampling
// package: the flag that gave a setting, and the flag that fixes a
// refusal.
func drawError(err error) error {
	switch {
	case errors.Is(err, sampling.ErrDuplicateIDs):
		return inputerr.SetHint(err, "each record id must appear once; --dedupe first keeps the first row of each id")
	case errors.Is(err, sampling.ErrTooManyDistinct):
		return inputerr.SetHint(err, "remove the repeated rows before drawing (or narrow the scope with --where), then draw without --dedupe")
	case errors.Is(err, sampling.ErrLineTooLong):
		return inputerr.SetHint(err, "a log holds one record per line; if its lines really are this long, raise the limit with --max-line, e.g. --max-line 256MiB")
	case errors.Is(err, sampling.ErrIDColumn):
		return inputerr.SetHint(err, "name the id column with --id COLUMN")
	case errors.Is(err, safewrite.ErrNotEmpty) && inputerr.HintOf(err) == "":
		return inputerr.SetHint(err, "choose a new folder, or add --force to overwrite the draw in it")
	case errors.Is(err, sampling.ErrNotDrawable):
		return inputerr.SetHint(err, "declare candidates with probity plan --candidate NAME=COLUMN or --thresholds COLUMN:t1,t2 --positive L --negative L")
	}
	return flagNames(err, drawFlags)
}

func runDraw(d deps, o *drawOptions) error {
	p, fp, err := loadDrawPlan(o.planPath)
	if err != nil {
		return err
	}
	if err := refuseStratifiedSequential(p, o); err != nil {
		return err
	}
	if err := o.planDesign(p); err != nil {
		return err
	}
	if err := safewrite.CheckFolder(o.out, o.force); err != nil {
		return drawError(err)
	}
	timeColumn, err := drawTimeColumn(o, p)
	if err != nil {
		return err
	}
	days, _ := chrono.ParseDayRange(o.days)
	in := sampling.DrawInput{
		TimeColumn: timeColumn, Days: days,
		Plan: p, PlanFingerprint: fp, LogPath: d.given(o.logPath), Format: o.format, Period: o.period,
		IDColumn: o.id, StrataColumns: o.strata, Bands: o.parsedBands, Where: o.parsedWhere, Show: o.show,
		Alloc:  o.allocOptions(),
		Double: o.double, Dedupe: o.dedupe == "first", MaxLine: o.parsedMaxLine, ToolVersion: d.version,
	}
	if err := addDrawMeasures(o, &in); err != nil {
		return err
	}
	if o.allocation == sampling.Neyman {
		if st := p.Stratification; st != nil && o.anticipated == "" && len(o.bands) == 0 {
			in.Alloc.Anticipated = st.Rates()
			in.NeymanSource = "the plan's stratification"
		} else if o.anticipated != "" {
			a, err := sampling.ReadAnticipated(o.anticipated)
			if err != nil {
				return drawError(err)
			}
			in.Alloc.Anticipated = a
			in.NeymanSource = o.anticipated
		} else {
			in.NeymanFromBand = true
			in.NeymanSource = "band " + o.parsedBands[0].String() + " (p_h = min(m, 1 − m) at the interval midpoint m)"
		}
	}
	drawn, err := drawTime(d, o, p)
	if err != nil {
		return err
	}
	f, err := drawFromLog(d, o, &in)
	if err != nil {
		return drawError(err)
	}
	f.Manifest.Drawn = &drawn
	if err := drawfolder.Write(o.out, f, safewrite.FolderOptions{Replace: o.force, Protected: o.inputs()}); err != nil {
		return drawError(err)
	}
	if c := f.Manifest.Completeness; c != nil && !c.Complete() {
		defer fmt.Fprintf(d.stderr, "probity: warning: the log does not cover days %s to %s: %s without rows, %s dated outside them; the record will say so on page 1\n",
			c.From, c.To, plural(c.EmptyDayCount, "day"), plural(int(c.RowsBefore+c.RowsAfter), "row"))
	}
	if o.json {
		return writeDrawJSON(d.stdout, o.out, p, f.Manifest)
	}
	writeDrawSummary(d.stdout, o.out, f)
	return writeDrawRule(d.stdout, p, f.Manifest)
}

// allocOptions are the allocation flags: the default minimum of one per
// stratum applies only when the sample has room for it; an explicit
// --min-per-stratum always does.
func (o *drawOptions) allocOptions() sampling.AllocOptions {
	a := sampling.AllocOptions{Rule: o.allocation, MinPerStratum: o.minPer, MinIfRoom: !o.minPerSet, Spare: o.spare}
	if o.allocation == sampling.Proportional {
		a.Rounding = o.rounding
	}
	return a
}

// planDesign takes the allocation from a plan sized for a stratified
// design when the flags do not give it, and refuses a different one: the
// plan's n and risks hold for its own allocation.
func (o *drawOptions) planDesign(p *plan.File) error {
	st := p.Stratification
	if st == nil {
		if o.allocation == sampling.Neyman && o.anticipated == "" && len(o.bands) == 0 {
			return inputerr.Errorf("--allocation neyman needs the anticipated error of each stratum").WithHint("give --anticipated FILE (CSV stratum,anticipated_error or YAML), or stratify by a score band (--band score=0.5,0.9) to derive it")
		}
		return nil
	}
	if o.allocationSet && o.allocation != st.Allocation {
		return inputerr.Errorf("--allocation %s differs from the plan's %s allocation, for which its sample size and risks were computed", o.allocation, st.Allocation).
			WithHint("drop --allocation, or plan again with --allocation " + o.allocation)
	}
	o.allocation = st.Allocation
	if !o.minPerSet {
		o.minPer = st.MinPerStratum
	}
	if !o.roundingSet && st.Rounding != "" {
		o.rounding = st.Rounding
	}
	if len(o.strata)+len(o.bands) == 0 {
		return inputerr.Errorf("the plan was sized for a stratified draw (%d strata), but no --strata or --band is given", len(st.Strata)).
			WithHint("stratify the draw as planned, e.g. --strata COLUMN")
	}
	return nil
}

// refuseStratifiedSequential refuses to draw a sequential plan with strata:
// its boundaries count errors down the worksheet, and a prefix of a
// stratified worksheet is not a simple random sample of the population.
func refuseStratifiedSequential(p *plan.File, o *drawOptions) error {
	if p.Sequential == nil || len(o.strata)+len(o.bands) == 0 {
		return nil
	}
	return inputerr.Errorf("the plan is sequential, and a sequential plan cannot be drawn with --strata or --band: its boundaries count errors down the worksheet, and only an unstratified worksheet has every prefix a simple random sample").
		WithHint("drop --strata and --band, or make a fixed plan (probity plan --design fixed) for a stratified draw")
}

// drawTimeColumn is the log's time column: --time-column, or the one the
// plan declares (the two must agree when both are given); "" when neither
// names one. --days needs one.
func drawTimeColumn(o *drawOptions, p *plan.File) (string, error) {
	col := o.timeColumn
	switch {
	case col != "" && p.TimeColumn != "" && col != p.TimeColumn:
		return "", inputerr.Errorf("--time-column %s is not the time column %s the plan declares (%s)", col, p.TimeColumn, o.planPath).
			WithHint("leave --time-column out to use the plan's")
	case col == "":
		col = p.TimeColumn
	}
	if o.days != "" && col == "" {
		return "", inputerr.Errorf("--days needs a time column to check the days against").WithHint("name the log's time column with --time-column COLUMN")
	}
	return col, nil
}

// drawTime is the time of the draw (the clock's, or --date's), refused
// when it is before the plan was made: a sample is drawn from a plan
// fixed before it.
func drawTime(d deps, o *drawOptions, p *plan.File) (chrono.Stamp, error) {
	drawn := stepTime(d, o.date)
	created := chrono.Stamp{Time: chrono.Second(p.Created), Source: p.CreatedFrom}
	if !drawn.Time.Before(created.Time) {
		return drawn, nil
	}
	e := inputerr.Errorf("the chronology is broken: the sample would be drawn at %s, before its plan was made (%s, in %s)", drawn, created, o.planPath)
	if o.date != "" {
		return drawn, e.WithHint("give the true time of the draw with --date, or leave it out to take the time from the clock")
	}
	return drawn, e.WithHint("the plan states a creation time after this machine's clock: check the clock, and that the plan is the one made for this audit")
}

// inputs are the files the draw reads, which its output never replaces.
func (o *drawOptions) inputs() []string {
	in := []string{o.planPath, o.anticipated}
	if o.logPath != "-" {
		in = append(in, o.logPath)
	}
	return in
}

// drawFromLog opens the log and draws, with a progress bar when stderr is
// a terminal and the log is large; with a manifest (draw --check) it draws
// again as that draw did (sampling.Redraw).
func drawFromLog(d deps, o *drawOptions, in *sampling.DrawInput, m ...*drawfolder.Manifest) (*drawfolder.Content, error) {
	r, closeLog, size, err := openDrawLog(d, o.logPath)
	if err != nil {
		return nil, err
	}
	defer closeLog()
	in.Log = r
	var bar *drawProgressBar
	if d.stderrIsTerminal && !o.quiet && (size >= drawProgressMin || size == 0) {
		bar = &drawProgressBar{w: d.stderr, now: d.now, total: size, start: d.now(), min: drawProgressMin}
		in.Progress = bar.update
	}
	var f *drawfolder.Content
	if len(m) > 0 {
		f, err = sampling.Redraw(m[0], *in)
	} else {
		f, err = sampling.Draw(*in)
	}
	if bar != nil {
		bar.finish()
	}
	return f, err
}

// writeDrawSummary prints what was drawn.
func writeDrawSummary(w io.Writer, dir string, f *drawfolder.Content) {
	m := f.Manifest
	fmt.Fprintf(w, "drew %s", countOf(m.SampleSize, "item", "items"))
	if m.Spares > 0 {
		fmt.Fprintf(w, " and %s", countOf(m.Spares, "spare", "spares"))
	}
	fmt.Fprintf(w, " from %s in scope (%d read) in %s into %s\n", count(m.LotSize, "row", "rows"), m.Log.Rows, countOf(len(m.Strata), "stratum", "strata"), dir)
	fmt.Fprintf(w, "allocation: %s", m.Allocation.Rule)
	if m.Allocation.MinPerStratum > 0 {
		fmt.Fprintf(w, ", at least %d per stratum", m.Allocation.MinPerStratum)
	}
	fmt.Fprintln(w)
	wl := len("stratum")
	for _, s := range m.Strata {
		wl = max(wl, len([]rune(s.Label)))
	}
	fmt.Fprintf(w, "  %-*s  %10s  %6s  %6s  %9s\n", wl, "stratum", "N_h", "n_h", "spares", "weight")
	for _, s := range m.Strata {
		fmt.Fprintf(w, "  %-*s  %10s  %6s  %6s  %9s\n", wl, s.Label, numfmt.Count(s.Population), numfmt.Count(s.Sample), numfmt.Count(s.Spare), formatWeight(s.Weight))
	}
	if m.Period != "" {
		fmt.Fprintf(w, "period %s: selection seed %s = sha256hex(\"<plan seed>:period:%s\")\n", m.Period, m.SelectionSeed, m.Period)
	} else {
		fmt.Fprintf(w, "selection seed: %s (the plan's)\n", m.SelectionSeed)
	}
	if m.Double > 0 {
		fmt.Fprintf(w, "doubled: items 1–%d also in %s\n", m.Double, drawfolder.WorksheetSecondFile)
	}
	if m.DuplicatesDropped > 0 {
		fmt.Fprintf(w, "repeated ids: %s dropped (--dedupe first)\n", countOf(m.DuplicatesDropped, "later row", "later rows"))
	}
	fmt.Fprintf(w, "log sha256: %s (%d bytes)\n", m.Log.SHA256, m.Log.Bytes)
	if m.Drawn != nil {
		fmt.Fprintf(w, "drawn at %s\n", m.Drawn)
	}
	if c := m.Completeness; c != nil {
		fmt.Fprintf(w, "times (%s): %d rows from %s to %s\n", c.TimeColumn, c.Rows, chrono.Format(c.First), chrono.Format(c.Last))
		fmt.Fprintf(w, "days %s to %s (%d, %s): ", c.From, c.To, c.Days, c.RangeOf)
		if c.EmptyDayCount == 0 {
			fmt.Fprint(w, "every day has rows")
		} else {
			fmt.Fprintf(w, "%d without rows: %s", c.EmptyDayCount, strings.Join(c.EmptyDays, ", "))
		}
		if c.RowsBefore+c.RowsAfter > 0 {
			fmt.Fprintf(w, "; %d rows dated before and %d after", c.RowsBefore, c.RowsAfter)
		}
		fmt.Fprintln(w)
	}
	fmt.Fprintf(w, "give %s to the labelers; keep %s and %s\n",
		filepath.Join(dir, drawfolder.WorksheetFile), filepath.Join(dir, drawfolder.LedgerFile), filepath.Join(dir, drawfolder.ManifestFile))
}

func formatWeight(w float64) string {
	if w == 0 {
		return "-"
	}
	return numfmt.Weight(w)
}

func runDrawCheck(d deps, o *drawOptions) error {
	p, fp, err := loadDrawPlan(o.planPath)
	if err != nil {
		return err
	}
	mpath := filepath.Join(o.check, drawfolder.ManifestFile)
	m, _, err := drawfolder.ReadManifest(mpath)
	if err != nil {
		if errors.Is(err, os.ErrNotExist) {
			return inputerr.Errorf("%s has no %s: it is not a draw folder", o.check, drawfolder.ManifestFile).WithHint("give the folder written by probity draw --out")
		}
		return err
	}
	// The settings come from the manifest: an error about one names it.
	in, err := sampling.DrawInputFromManifest(m)
	if err != nil {
		return inputerr.InFile(err, mpath)
	}
	in.Plan, in.PlanFingerprint, in.LogPath, in.ToolVersion, in.MaxLine = p, fp, o.logPath, d.version, o.parsedMaxLine
	f, err := drawFromLog(d, o, &in, m)
	if errors.Is(err, sampling.ErrNotTheLog) {
		fmt.Fprintf(d.stdout, "different: %s was not drawn from %s:\n  %s\n", o.check, o.logPath, messageOf(err))
		return rejected("draw check failed: %s", messageOf(err))
	}
	if err != nil {
		return inputerr.InFile(err, mpath)
	}
	rep, err := drawfolder.Compare(o.check, f)
	if err != nil {
		return err
	}
	for _, n := range rep.Notes {
		fmt.Fprintf(d.stdout, "note: %s\n", n)
	}
	if len(rep.Differences) == 0 {
		fmt.Fprintf(d.stdout, "same: %s holds exactly the %s and %s that the seed picks from %s (%s, sha256 %s)\n",
			o.check, countOf(rep.Items, "item", "items"), countOf(rep.Spares, "spare", "spares"), o.logPath, count(f.Manifest.Log.Rows, "row", "rows"), f.Manifest.Log.SHA256)
		return nil
	}
	fmt.Fprintf(d.stdout, "different: %s is not what the seed picks from %s:\n", o.check, o.logPath)
	for _, s := range rep.Differences {
		fmt.Fprintf(d.stdout, "  %s\n", s)
	}
	return rejected("draw check failed: %s", countOf(len(rep.Differences), "difference", "differences"))
}

// drawProgressBar draws a one-line progress bar on stderr: bytes read of
// the total, and rows per second. It redraws at most every 200 ms.
type drawProgressBar struct {
	w     io.Writer
	now   func() time.Time
	total int64
	start time.Time
	last  time.Time
	min   int64
	shown bool
}

func (b *drawProgressBar) update(p sampling.Progress) {
	t := b.now()
	if t.Sub(b.last) < 200*time.Millisecond {
		return
	}
	if b.total == 0 && p.Bytes < b.min {
		return
	}
	b.last = t
	b.shown = true
	secs := t.Sub(b.start).Seconds()
	rate := 0.0
	if secs > 0 {
		rate = float64(p.Lines) / secs
	}
	if b.total > 0 {
		frac := float64(p.Bytes) / float64(b.total)
		if frac > 1 {
			frac = 1
		}
		const width = 30
		fill := int(frac * width)
		fmt.Fprintf(b.w, "\r[%s%s] %3.0f%%  %s of %s  %.1f M rows/s ",
			strings.Repeat("#", fill), strings.Repeat(".", width-fill), 100*frac, megabytes(p.Bytes), megabytes(b.total), rate/1e6)
		return
	}
	fmt.Fprintf(b.w, "\r%s read  %.1f M rows/s ", megabytes(p.Bytes), rate/1e6)
}

func (b *drawProgressBar) finish() {
	if b.shown {
		fmt.Fprint(b.w, "\r\033[K")
	}
}

func megabytes(n int64) string { return fmt.Sprintf("%.0f MB", float64(n)/1e6) }

// plural is "1 day", "2 days".
func plural(n int, word string) string {
	if n == 1 {
		return "1 " + word
	}
	return fmt.Sprintf("%d %ss", n, word)
}
