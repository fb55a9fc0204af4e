package measure

import (
	"fmt"
	"math"
	"slices"
	"sort"
	"strconv"
	"strings"

	"probity/plan"
	"probity/plan/inputerr"
)

// Spec is what a plan with measures is asked to meet: the candidates
// declared in the plan, the positive (critical) class, the family of
// claims, the anticipated values and the risks. BuildPlan turns it into
// the plan file's measures section; Recheck rebuilds it from a plan file.
type Spec struct {
	// Candidates are the plan's declared candidates: all label-column
	// candidates, or all thresholds on one score column.
	Candidates []plan.Candidate
	Positive   string
	// Claims is the family in declared order (candidate by name).
	Claims []plan.MeasureClaim
	// Anticipated are the anticipated values as given: "NAME:VALUE" with
	// one value for every candidate or a comma-separated value per
	// candidate in declared order.
	Anticipated []string
	// Prevalence is the anticipated share of true positives; Decisions
	// the decisions a period is assumed to hold.
	Prevalence float64
	Decisions  int64
	// Confidence is 1 − δ, ProducerRisk β per claim, Multiplicity the
	// sharing of δ over the family.
	Confidence, ProducerRisk float64
	Multiplicity             plan.Multiplicity
	Release                  string
	NoMissMeasureReason      string
}

// Anticipation is one candidate's anticipated one-vs-rest confusion
// matrix as shares of all decisions: TP, FP (FN = π − TP, TN = 1 − π − FP).
type Anticipation struct {
	TP, FP float64
}

// Value is the measure's value under the anticipated shares at
// prevalence π.
func (a Anticipation) Value(m Measure, prevalence float64) float64 {
	tp, fp := a.TP, a.FP
	fn, tn := prevalence-tp, 1-prevalence-fp
	ratio := func(x, y float64) float64 {
		if x+y <= 0 {
			return 0
		}
		return x / (x + y)
	}
	switch m {
	case Error:
		return fp + fn
	case FNR:
		return ratio(fn, tp)
	case FPR:
		return ratio(fp, tn)
	case FOR:
		return ratio(fn, tn)
	case FDR:
		return ratio(fp, tp)
	}
	return math.NaN()
}

// equation is one anticipated value as a linear equation in (TP, FP):
// a·TP + b·FP = c, with π the prevalence.
func equation(m Measure, v, pi float64) (a, b, c float64) {
	switch m {
	case Error: // FP + FN = FP + π − TP
		return -1, 1, v - pi
	case FNR: // FN = v·π
		return 1, 0, pi * (1 - v)
	case FPR: // FP = v·(1 − π)
		return 0, 1, v * (1 - pi)
	case FOR: // FN = v·(FN + TN) = v·(1 − TP − FP)
		return v - 1, v, v - pi
	case FDR: // FP = v·(FP + TP)
		return -v, 1 - v, 0
	}
	return 0, 0, 0
}

// given is one anticipated measure for one candidate.
type given struct {
	m    Measure
	v    float64
	text string
}

// ParseAnticipated reads the anticipated values, each "NAME:VALUE" (one
// value for every candidate) or "NAME:V1,V2,…" (one per candidate, in
// declared order), into per-candidate lists in the order given. A bare
// number is the overall error. Errors are input errors on the field
// "anticipated".
func ParseAnticipated(specs []string, candidates int) ([][]given, error) {
	out := make([][]given, candidates)
	seen := map[Measure]bool{}
	for _, s := range specs {
		name, list, ok := strings.Cut(s, ":")
		if !ok {
			name, list = "error", s
		}
		m, err := ParseMeasure(strings.TrimSpace(name))
		if err != nil {
			return nil, &inputerr.Error{Field: "anticipated", Msg: fmt.Sprintf("%q: %s is not one of error, fnr, fpr, for, fdr", s, name)}
		}
		if seen[m] {
			return nil, &inputerr.Error{Field: "anticipated", Msg: fmt.Sprintf("%s is anticipated twice", m)}
		}
		seen[m] = true
		parts := strings.Split(list, ",")
		if len(parts) != 1 && len(parts) != candidates {
			return nil, &inputerr.Error{Field: "anticipated", Msg: fmt.Sprintf("%q gives %d values for %d candidates (give one, or one per candidate)", s, len(parts), candidates)}
		}
		for j := range candidates {
			p := parts[0]
			if len(parts) > 1 {
				p = parts[j]
			}
			v, err := strconv.ParseFloat(strings.TrimSpace(p), 64)
			if err != nil || !(v >= 0 && v < 1) {
				return nil, &inputerr.Error{Field: "anticipated", Msg: fmt.Sprintf("%q: %q is not a rate in [0, 1)", s, p)}
			}
			out[j] = append(out[j], given{m, v, s})
		}
	}
	return out, nil
}

// Solve finds a candidate's anticipated shares from the prevalence π and
// its anticipated values: every measure is linear in (TP, FP), so two
// independent values fix them (the first two that do, in the order
// given); further values must agree with what those two imply (within
// 0.001 or 2 %).
func solve(pi float64, gs []given) (Anticipation, error) {
	for i := range gs {
		for k := i + 1; k < len(gs); k++ {
			a1, b1, c1 := equation(gs[i].m, gs[i].v, pi)
			a2, b2, c2 := equation(gs[k].m, gs[k].v, pi)
			det := a1*b2 - a2*b1
			if math.Abs(det) < 1e-12 {
				continue
			}
			an := Anticipation{TP: (c1*b2 - c2*b1) / det, FP: (a1*c2 - a2*c1) / det}
			const tol = 1e-9
			if an.TP < -tol || an.TP > pi+tol || an.FP < -tol || an.FP > 1-pi+tol {
				return Anticipation{}, fmt.Errorf("prevalence %v with %s %v and %s %v is impossible (it needs %.4g true and %.4g false positives per decision)",
					pi, gs[i].m, gs[i].v, gs[k].m, gs[k].v, an.TP, an.FP)
			}
			an.TP, an.FP = min(max(an.TP, 0), pi), min(max(an.FP, 0), 1-pi)
			for _, g := range gs {
				if got := an.Value(g.m, pi); math.Abs(got-g.v) > max(0.001, 0.02*g.v) {
					return Anticipation{}, fmt.Errorf("prevalence %v with %s %v and %s %v imply %s %.4g, not %v", pi, gs[i].m, gs[i].v, gs[k].m, gs[k].v, g.m, got, g.v)
				}
			}
			return an, nil
		}
	}
	var names []string
	for _, g := range gs {
		names = append(names, g.m.String())
	}
	return Anticipation{}, fmt.Errorf("with the prevalence, two anticipated values that fix both kinds of error are needed (given: %s)", strings.Join(append(names, "none")[:max(1, len(names))], ", "))
}

// Cells are the strata a plan sizes on: the sets of decisions every
// candidate predicts alike. For thresholds on one score column the
// intervals between consecutive thresholds; for label-column candidates
// every pattern of which candidates predict the positive class.
type Cells struct {
	Labels []string
	// Flagged[i][j] reports whether candidate j predicts the positive
	// class in cell i.
	Flagged [][]bool
	// Thresholds is true for threshold candidates.
	Thresholds bool
}

// maxLabelColumnCandidates bounds the 2^k cells of label-column
// candidates.
const maxLabelColumnCandidates = 6

// PlanCells returns the cells of the candidates: all thresholds on one
// score column, or all label-column candidates (at most six).
func PlanCells(cands []plan.Candidate) (Cells, error) {
	if len(cands) == 0 {
		return Cells{}, &inputerr.Error{Field: "candidates", Msg: "measures need declared candidates"}
	}
	byScore := cands[0].ScoreColumn != ""
	for _, c := range cands {
		if (c.ScoreColumn != "") != byScore || (byScore && c.ScoreColumn != cands[0].ScoreColumn) {
			return Cells{}, &inputerr.Error{Field: "candidates", Msg: "measures need all candidates to be label columns, or all thresholds on one score column"}
		}
	}
	if byScore {
		var ts []float64
		for _, c := range cands {
			if !slices.Contains(ts, *c.Threshold) {
				ts = append(ts, *c.Threshold)
			}
		}
		sort.Float64s(ts)
		col := cands[0].ScoreColumn
		cl := Cells{Thresholds: true}
		for i := 0; i <= len(ts); i++ {
			var label string
			switch {
			case len(ts) == 0:
			case i == 0:
				label = fmt.Sprintf("%s<%s", col, fmtFloat(ts[0]))
			case i == len(ts):
				label = fmt.Sprintf("%s>=%s", col, fmtFloat(ts[i-1]))
			default:
				label = fmt.Sprintf("%s<=%s<%s", fmtFloat(ts[i-1]), col, fmtFloat(ts[i]))
			}
			fl := make([]bool, len(cands))
			for j, c := range cands {
				fl[j] = i > 0 && *c.Threshold <= ts[i-1]
			}
			cl.Labels = append(cl.Labels, label)
			cl.Flagged = append(cl.Flagged, fl)
		}
		return cl, nil
	}
	if len(cands) > maxLabelColumnCandidates {
		return Cells{}, &inputerr.Error{Field: "candidates", Msg: fmt.Sprintf("measures take at most %d label-column candidates (each pattern of their predictions is a stratum)", maxLabelColumnCandidates)}
	}
	var cl Cells
	for pat := 0; pat < 1<<len(cands); pat++ {
		fl := make([]bool, len(cands))
		var names []string
		for j := range cands {
			if pat&(1<<j) != 0 {
				fl[j] = true
				names = append(names, cands[j].Name)
			}
		}
		label := "flagged by none"
		if len(names) > 0 {
			label = "flagged by " + strings.Join(names, "+")
		}
		cl.Labels = append(cl.Labels, label)
		cl.Flagged = append(cl.Flagged, fl)
	}
	return cl, nil
}

// Cell returns the index of the cell with the given flags, or −1.
func (cl Cells) Cell(flagged []bool) int {
	for i, f := range cl.Flagged {
		if slices.Equal(f, flagged) {
			return i
		}
	}
	return -1
}

func fmtFloat(v float64) string { return strconv.FormatFloat(v, 'f', -1, 64) }

// cellShares returns each cell's anticipated share of the decisions and
// of true positives: nested sets for thresholds (each threshold's flagged
// set holds the higher ones'), and for label-column candidates their
// predictions independent given the truth (an assumption the plan states).
func cellShares(cl Cells, cands []plan.Candidate, an []Anticipation, pi float64) (share, pos []float64, err error) {
	k := len(cands)
	share, pos = make([]float64, len(cl.Labels)), make([]float64, len(cl.Labels))
	if cl.Thresholds {
		// flagged share and true positives of the set "≥ the cell's lower
		// threshold", from the candidate with that threshold
		setShare := func(i int) (float64, float64) {
			if i == 0 {
				return 1, pi
			}
			if i == len(cl.Labels) {
				return 0, 0
			}
			for j := range cands {
				if cl.Flagged[i][j] && (i == 0 || !cl.Flagged[i-1][j]) {
					return an[j].TP + an[j].FP, an[j].TP
				}
			}
			return 0, 0
		}
		// candidates with equal thresholds must agree
		for j := range cands {
			for l := range cands {
				if *cands[j].Threshold == *cands[l].Threshold && (math.Abs(an[j].TP-an[l].TP) > 1e-9 || math.Abs(an[j].FP-an[l].FP) > 1e-9) {
					return nil, nil, fmt.Errorf("candidates %s and %s have the same threshold but different anticipated values", cands[j].Name, cands[l].Name)
				}
			}
		}
		for i := range cl.Labels {
			s0, p0 := setShare(i)
			s1, p1 := setShare(i + 1)
			share[i], pos[i] = s0-s1, p0-p1
			const tol = 1e-9
			if share[i] < -tol || pos[i] < -tol || pos[i] > share[i]+tol {
				return nil, nil, fmt.Errorf("the anticipated values do not fit nested thresholds: the cell %s would hold %.4g of the decisions with %.4g true positives (a higher threshold must flag fewer decisions and fewer true positives)", cl.Labels[i], share[i], pos[i])
			}
			share[i], pos[i] = max(share[i], 0), min(max(pos[i], 0), max(share[i], 0))
		}
		return share, pos, nil
	}
	for i := range cl.Labels {
		p, n := pi, 1-pi
		for j := range k {
			sens, fpr := an[j].TP/pi, an[j].FP/(1-pi)
			if cl.Flagged[i][j] {
				p, n = p*sens, n*fpr
			} else {
				p, n = p*(1-sens), n*(1-fpr)
			}
		}
		share[i], pos[i] = p+n, p
	}
	return share, pos, nil
}

// planProblem is the problem on the plan's cells, with its anticipations.
func (s Spec) problem() (Problem, Cells, []Anticipation, []int64, error) {
	fail := func(err error) (Problem, Cells, []Anticipation, []int64, error) {
		return Problem{}, Cells{}, nil, nil, err
	}
	if !(s.Prevalence > 0 && s.Prevalence < 1) {
		return fail(&inputerr.Error{Field: "prevalence", Msg: fmt.Sprintf("%v is not between 0 and 1", s.Prevalence)})
	}
	if s.Decisions < 2 {
		return fail(&inputerr.Error{Field: "decisions", Msg: fmt.Sprintf("%d: must be at least 2", s.Decisions)})
	}
	cl, err := PlanCells(s.Candidates)
	if err != nil {
		return fail(err)
	}
	gs, err := ParseAnticipated(s.Anticipated, len(s.Candidates))
	if err != nil {
		return fail(err)
	}
	an := make([]Anticipation, len(s.Candidates))
	for j, c := range s.Candidates {
		if an[j], err = solve(s.Prevalence, gs[j]); err != nil {
			return fail(&inputerr.Error{Field: "anticipated", Msg: fmt.Sprintf("candidate %s: %v", c.Name, err)})
		}
	}
	share, pos, err := cellShares(cl, s.Candidates, an, s.Prevalence)
	if err != nil {
		return fail(&inputerr.Error{Field: "anticipated", Msg: err.Error()})
	}
	var pr Problem
	counts := make([]int64, len(cl.Labels))
	for i := range cl.Labels {
		n := max(1, int64(math.Round(share[i]*float64(s.Decisions))))
		pr.Strata = append(pr.Strata, Stratum{Label: cl.Labels[i], Population: n})
		counts[i] = min(n, int64(math.Round(pos[i]*float64(s.Decisions))))
	}
	for j, c := range s.Candidates {
		cand := Candidate{Name: c.Name, Positive: make([]bool, len(cl.Labels))}
		for i := range cl.Labels {
			cand.Positive[i] = cl.Flagged[i][j]
		}
		pr.Candidates = append(pr.Candidates, cand)
	}
	if pr.Claims, err = s.claims(); err != nil {
		return fail(err)
	}
	pr.Anticipated = Composition{Positives: counts}
	pr.Confidence, pr.ProducerRisk, pr.Multiplicity = s.Confidence, s.ProducerRisk, s.Multiplicity
	pr.MinPerStratum = 1
	return pr, cl, an, counts, nil
}

// claims maps the spec's claims onto candidate indices.
func (s Spec) claims() ([]Claim, error) {
	var out []Claim
	for _, c := range s.Claims {
		j := slices.IndexFunc(s.Candidates, func(pc plan.Candidate) bool { return pc.Name == c.Candidate })
		if j < 0 {
			return nil, &inputerr.Error{Field: "measure", Msg: fmt.Sprintf("candidate %q is not declared", c.Candidate)}
		}
		m, err := ParseMeasure(c.Measure)
		if err != nil {
			return nil, err
		}
		out = append(out, Claim{Candidate: j, Measure: m, Ceiling: c.Ceiling})
	}
	return out, nil
}

// BuildPlan sizes the design for the spec and returns the plan file's
// measures section: the cells with their anticipated shares, the design
// and the uniform sample for the same risks, and each claim with its
// anticipated value and exact producer's risk.
func BuildPlan(s Spec) (*plan.Measures, error) {
	if err := checkRelease(s); err != nil {
		return nil, err
	}
	pr, cl, an, pos, err := s.problem()
	if err != nil {
		return nil, err
	}
	for i, c := range pr.Claims {
		if v := an[c.Candidate].Value(c.Measure, s.Prevalence); v >= c.Ceiling {
			return nil, &inputerr.Error{Field: "measure", Msg: fmt.Sprintf("the anticipated %s of %s is %.4g, not below its ceiling %v: no plan can accept it reliably", c.Measure, s.Candidates[c.Candidate].Name, v, s.Claims[i].Ceiling)}
		}
	}
	res, err := Search(pr)
	if err != nil {
		return nil, &inputerr.Error{Field: "measure", Msg: err.Error(), Err: err}
	}
	m := &plan.Measures{
		Positive: s.Positive, Prevalence: s.Prevalence, Decisions: s.Decisions,
		Anticipated: append([]string(nil), s.Anticipated...), Release: s.Release, NoMissMeasureReason: s.NoMissMeasureReason,
		Design: plan.MeasureDesign{Family: len(pr.Claims), Level: pr.Level(), Total: res.Design.Total, Uniform: res.Uniform.Total, Saving: res.Saving},
	}
	for i, c := range pr.Claims {
		m.Claims = append(m.Claims, plan.MeasureClaim{Candidate: s.Candidates[c.Candidate].Name, Measure: c.Measure.String(), Ceiling: c.Ceiling,
			Anticipated: round6(an[c.Candidate].Value(c.Measure, s.Prevalence)), ProducerRisk: round6(res.Design.Claims[i].ProducerRisk)})
	}
	for i, st := range pr.Strata {
		var flagged []string
		for j, f := range cl.Flagged[i] {
			if f {
				flagged = append(flagged, s.Candidates[j].Name)
			}
		}
		m.Cells = append(m.Cells, plan.MeasureCell{Label: st.Label, Flagged: flagged, Decisions: st.Population, Positives: pos[i],
			Sample: res.Design.Sample[i], Uniform: res.Uniform.Sample[i]})
	}
	return m, nil
}

// round6 keeps six significant digits, so the plan file reads well and
// rebuilding it gives the same bytes.
func round6(v float64) float64 {
	r, _ := strconv.ParseFloat(strconv.FormatFloat(v, 'g', 6, 64), 64)
	return r
}

// checkRelease checks the release rule: a declared candidate, or
// best:MEASURE with a measure the family claims.
func checkRelease(s Spec) error {
	r := s.Release
	if r == "" {
		return nil
	}
	if name, ok := strings.CutPrefix(r, "best:"); ok {
		m, err := ParseMeasure(name)
		if err != nil {
			return &inputerr.Error{Field: "release", Msg: fmt.Sprintf("%q: %s is not one of error, fnr, fpr, for, fdr", r, name)}
		}
		_ = m
		return nil
	}
	if !slices.ContainsFunc(s.Candidates, func(c plan.Candidate) bool { return c.Name == r }) {
		return &inputerr.Error{Field: "release", Msg: fmt.Sprintf("%q is not a declared candidate (give a candidate's name or best:MEASURE)", r)}
	}
	return nil
}

// SpecOf is the spec a plan file's measures were built from.
func SpecOf(f *plan.File) Spec {
	m := f.Measures
	return Spec{Candidates: f.Candidates, Positive: m.Positive, Claims: stripClaims(m.Claims), Anticipated: m.Anticipated,
		Prevalence: m.Prevalence, Decisions: m.Decisions, Confidence: f.Inputs.Confidence, ProducerRisk: f.Inputs.ProducerRisk,
		Multiplicity: f.Inputs.Multiplicity, Release: m.Release, NoMissMeasureReason: m.NoMissMeasureReason}
}

func stripClaims(cs []plan.MeasureClaim) []plan.MeasureClaim {
	out := make([]plan.MeasureClaim, len(cs))
	for i, c := range cs {
		out[i] = plan.MeasureClaim{Candidate: c.Candidate, Measure: c.Measure, Ceiling: c.Ceiling}
	}
	return out
}

// Recheck rebuilds a plan file's measures from its inputs and reports the
// first field that differs: a plan whose design or risks were edited by
// hand is refused, as the rest of the rule is. A plan without measures
// passes.
func Recheck(f *plan.File) error {
	if f.Measures == nil {
		return nil
	}
	got, err := BuildPlan(SpecOf(f))
	if err != nil {
		return fmt.Errorf("%w: the measures cannot be planned again from their inputs: %v", plan.ErrMeasures, err)
	}
	if d := diffMeasures(f.Measures, got); d != "" {
		return fmt.Errorf("%w: %s is not what the inputs give (planned again: %s)", plan.ErrMeasures, d, "the file was edited")
	}
	return nil
}

// diffMeasures names the first field of the measures that differs.
func diffMeasures(a, b *plan.Measures) string {
	if a.Design != b.Design {
		return "measures.design"
	}
	if len(a.Claims) != len(b.Claims) {
		return "measures.claims"
	}
	for i := range a.Claims {
		if a.Claims[i] != b.Claims[i] {
			return fmt.Sprintf("measures.claims[%d]", i)
		}
	}
	if len(a.Cells) != len(b.Cells) {
		return "measures.cells"
	}
	for i := range a.Cells {
		x, y := a.Cells[i], b.Cells[i]
		if x.Label != y.Label || !slices.Equal(x.Flagged, y.Flagged) || x.Decisions != y.Decisions || x.Positives != y.Positives || x.Sample != y.Sample || x.Uniform != y.Uniform {
			return fmt.Sprintf("measures.cells[%d]", i)
		}
	}
	return ""
}

// PeriodProblem is the plan's problem on a period's actual strata: the
// draw's strata (the user's crossed with the candidates' predictions),
// flagged[h][j] whether candidate j predicts the positive class in
// stratum h, the anticipated share of positives of each stratum's cell
// (as the plan assumed it), the plan's claims and risks. Search on it
// gives the draw's allocation and every claim's design; record and verify
// rebuild it from the manifest's strata, so it is a function of the plan
// and the log alone.
func PeriodProblem(f *plan.File, strata []Stratum, flagged [][]bool) (Problem, error) {
	if f.Measures == nil {
		return Problem{}, fmt.Errorf("%w: the plan has no measures", ErrPopulation)
	}
	s := SpecOf(f)
	cl, err := PlanCells(f.Candidates)
	if err != nil {
		return Problem{}, err
	}
	if len(cl.Labels) != len(f.Measures.Cells) {
		return Problem{}, fmt.Errorf("%w: the plan lists %d cells, its candidates cut %d", plan.ErrMeasures, len(f.Measures.Cells), len(cl.Labels))
	}
	if len(flagged) != len(strata) {
		return Problem{}, fmt.Errorf("%w: flags for %d of %d strata", ErrPopulation, len(flagged), len(strata))
	}
	pr := Problem{Population: Population{Strata: strata}}
	pos := make([]int64, len(strata))
	for h, st := range strata {
		i := cl.Cell(flagged[h])
		if i < 0 {
			return Problem{}, fmt.Errorf("%w: stratum %q is predicted in a way no cell of the plan is", ErrPopulation, st.Label)
		}
		c := f.Measures.Cells[i]
		pos[h] = min(st.Population, int64(math.Round(float64(c.Positives)/float64(c.Decisions)*float64(st.Population))))
	}
	for j, c := range f.Candidates {
		cand := Candidate{Name: c.Name, Positive: make([]bool, len(strata))}
		for h := range strata {
			cand.Positive[h] = flagged[h][j]
		}
		pr.Candidates = append(pr.Candidates, cand)
	}
	if pr.Claims, err = s.claims(); err != nil {
		return Problem{}, err
	}
	pr.Anticipated = Composition{Positives: pos}
	pr.Confidence, pr.ProducerRisk, pr.Multiplicity = s.Confidence, s.ProducerRisk, s.Multiplicity
	pr.MinPerStratum = 1
	return pr, nil
}
