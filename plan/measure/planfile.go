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

// The assumptions a plan states for its cells' anticipated composition
// (plan.Measures.Assumes).
const (
	assumesThresholds = "nested thresholds: each score band holds the difference of the decisions, and of the true positives, " +
		"that the thresholds at its two ends flag (FN_j = fnr_j·P and FP_j from the other anticipated value, per threshold)"
	assumesLabelColumns = "label-column candidates predict independently of one another given the truth " +
		"(each pattern of predictions holds P·Π sensitivities and (N − P)·Π false-alarm rates)"
)

// cellShares returns each cell's anticipated share of the decisions and
// of true positives: nested sets for thresholds (each threshold's flagged
// set holds the higher ones'), and for label-column candidates their
// predictions independent given the truth (an assumption the plan
// states). Thresholds whose anticipated values no nested composition
// satisfies — a higher threshold catching more true positives (a lower
// fnr) or raising more false alarms (a higher fpr) than a lower one — are
// refused, naming the values given.
func cellShares(cl Cells, cands []plan.Candidate, an []Anticipation, pi float64, given []string) (share, pos []float64, err error) {
	k := len(cands)
	share, pos = make([]float64, len(cl.Labels)), make([]float64, len(cl.Labels))
	if cl.Thresholds {
		// one candidate per distinct threshold, in increasing order; equal
		// thresholds must agree
		order := make([]int, 0, k)
		for j := range cands {
			dup := false
			for _, l := range order {
				if *cands[j].Threshold == *cands[l].Threshold {
					dup = true
					if math.Abs(an[j].TP-an[l].TP) > 1e-9 || math.Abs(an[j].FP-an[l].FP) > 1e-9 {
						return nil, nil, &inputerr.Error{Field: "anticipated", Msg: fmt.Sprintf("%s gives candidates %s and %s, which have the same threshold, different values",
							strings.Join(given, " "), cands[l].Name, cands[j].Name), Hint: "give the same value for candidates with the same threshold"}
					}
				}
			}
			if !dup {
				order = append(order, j)
			}
		}
		sort.SliceStable(order, func(a, b int) bool { return *cands[order[a]].Threshold < *cands[order[b]].Threshold })
		const tol = 1e-9
		for x := 1; x < len(order); x++ {
			lo, hi := order[x-1], order[x]
			tl, th := fmtFloat(*cands[lo].Threshold), fmtFloat(*cands[hi].Threshold)
			hint := "give one value per candidate in declared order (NAME:V1,V2,…), with fnr not decreasing and fpr not increasing as the threshold rises"
			if an[hi].TP > an[lo].TP+tol {
				return nil, nil, &inputerr.Error{Field: "anticipated", Hint: hint, Msg: fmt.Sprintf(
					"%s make the threshold %s miss fewer positives than the lower threshold %s (fnr %.4g against %.4g): a higher threshold flags a subset of what a lower one flags, so its fnr cannot be lower",
					strings.Join(given, " "), th, tl, an[hi].Value(FNR, pi), an[lo].Value(FNR, pi))}
			}
			if an[hi].FP > an[lo].FP+tol {
				return nil, nil, &inputerr.Error{Field: "anticipated", Hint: hint, Msg: fmt.Sprintf(
					"%s make the threshold %s raise more false alarms than the lower threshold %s (fpr %.4g against %.4g): a higher threshold flags a subset of what a lower one flags, so its fpr cannot be higher",
					strings.Join(given, " "), th, tl, an[hi].Value(FPR, pi), an[lo].Value(FPR, pi))}
			}
		}
		// the cell above threshold x−1 and below threshold x holds the
		// difference of their flagged sets (cell 0: everything below the
		// lowest threshold)
		set := func(x int) (float64, float64) {
			switch {
			case x == 0:
				return 1, pi
			case x > len(order):
				return 0, 0
			}
			a := an[order[x-1]]
			return a.TP + a.FP, a.TP
		}
		for i := range cl.Labels {
			s0, p0 := set(i)
			s1, p1 := set(i + 1)
			share[i], pos[i] = max(s0-s1, 0), min(max(p0-p1, 0), max(s0-s1, 0))
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
	share, pos, err := cellShares(cl, s.Candidates, an, s.Prevalence, s.Anticipated)
	if err != nil {
		return fail(err)
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
// measures section: the cells with their anticipated shares (and what
// that composition assumes), the design and the uniform sample for the
// same risks, and each claim with its anticipated value, how it is judged
// on the design and on the uniform sample, and its exact producer's risk
// on each. A claim anticipated at or above its ceiling — a threshold
// expected to miss too much, say — is not planned (Unplanned): the design
// is sized for the others, it keeps its consumer's risk at its share of δ
// and is judged on the largest proportional sub-samples of what the
// design labels (it is expected to be rejected); at least one claim must
// be planned. A cell's labels are the most any claim counts there (at
// least one).
func BuildPlan(s Spec) (*plan.Measures, error) {
	if err := checkRelease(s); err != nil {
		return nil, err
	}
	pr, cl, an, pos, err := s.problem()
	if err != nil {
		return nil, err
	}
	var planned, unplanned []int
	for i, c := range pr.Claims {
		if c.Value(pr.Population, pr.Anticipated) >= c.Ceiling {
			unplanned = append(unplanned, i)
		} else {
			planned = append(planned, i)
		}
	}
	if len(planned) == 0 {
		c := pr.Claims[0]
		return nil, &inputerr.Error{Field: "measure", Msg: fmt.Sprintf("every claim is anticipated at or above its ceiling (the %s of %s at %.4g against %v): no plan can accept any of them reliably",
			c.Measure, s.Candidates[c.Candidate].Name, an[c.Candidate].Value(c.Measure, s.Prevalence), c.Ceiling), Hint: "raise the ceilings, or anticipate values below them"}
	}
	sub := pr
	sub.family = len(pr.Claims)
	sub.Claims = nil
	for _, i := range planned {
		sub.Claims = append(sub.Claims, pr.Claims[i])
	}
	res, err := Search(sub)
	if err != nil {
		return nil, &inputerr.Error{Field: "measure", Msg: err.Error(), Err: err}
	}
	design, uniform := make([]ClaimDesign, len(pr.Claims)), make([]ClaimDesign, len(pr.Claims))
	for k, i := range planned {
		design[i], uniform[i] = res.Design.Claims[k].ClaimDesign, res.Uniform.Claims[k].ClaimDesign
	}
	for _, i := range unplanned {
		design[i] = fallbackDesign(pr, pr.Claims[i], res.Design.Sample)
		uniform[i] = fallbackDesign(pr, pr.Claims[i], res.Uniform.Sample)
	}
	sample := countedSample(pr, design)
	total, uTotal := sum(sample), sum(res.Uniform.Sample)
	level := pr.Level()
	m := &plan.Measures{
		Positive: s.Positive, Prevalence: s.Prevalence, Decisions: s.Decisions, Assumes: assumes(cl),
		Anticipated: append([]string(nil), s.Anticipated...), Release: s.Release, NoMissMeasureReason: s.NoMissMeasureReason,
		Design: plan.MeasureDesign{Family: len(pr.Claims), Level: level, Total: total, Uniform: uTotal, Saving: float64(uTotal) / float64(total)},
	}
	for i, c := range pr.Claims {
		risk, err := producerRisk(pr, design[i], level)
		if err != nil {
			return nil, err
		}
		if !slices.Contains(unplanned, i) && risk > pr.ProducerRisk+1e-9 {
			return nil, fmt.Errorf("%w: the search's design of %s has a producer's risk of %v, above %v", ErrInfeasible, c.name(pr.Population), risk, pr.ProducerRisk)
		}
		uRisk, err := producerRisk(pr, uniform[i], level)
		if err != nil {
			return nil, err
		}
		m.Claims = append(m.Claims, plan.MeasureClaim{Candidate: s.Candidates[c.Candidate].Name, Measure: c.Measure.String(), Ceiling: c.Ceiling,
			Anticipated: round6(an[c.Candidate].Value(c.Measure, s.Prevalence)), ProducerRisk: risk, Unplanned: slices.Contains(unplanned, i),
			Design: storedDesign(design[i]), Uniform: storedDesign(uniform[i]), UniformProducerRisk: uRisk})
	}
	for i, st := range pr.Strata {
		var flagged []string
		for j, f := range cl.Flagged[i] {
			if f {
				flagged = append(flagged, s.Candidates[j].Name)
			}
		}
		m.Cells = append(m.Cells, plan.MeasureCell{Label: st.Label, Flagged: flagged, Decisions: st.Population, Positives: pos[i],
			Sample: sample[i], Uniform: res.Uniform.Sample[i]})
	}
	return m, nil
}

// assumes is what the cells' anticipated composition assumes.
func assumes(cl Cells) string {
	if cl.Thresholds {
		return assumesThresholds
	}
	return assumesLabelColumns
}

// countedSample is the labels per stratum a set of claim designs needs:
// the most any claim counts there, and at least the problem's minimum.
func countedSample(pr Problem, claims []ClaimDesign) []int {
	out := make([]int, len(pr.Strata))
	for h, st := range pr.Strata {
		out[h] = int(min(int64(pr.MinPerStratum), st.Population))
		for _, cd := range claims {
			out[h] = max(out[h], cd.Counted[h])
		}
	}
	return out
}

// producerRisk is the claim's exact chance of rejection at the
// anticipated composition, to six significant digits.
func producerRisk(pr Problem, cd ClaimDesign, level float64) (float64, error) {
	pw, err := cd.AcceptProbability(pr.Population, pr.Anticipated, level)
	if err != nil {
		return 0, err
	}
	return round6(1 - pw), nil
}

// storedDesign is a claim design as the plan file keeps it.
func storedDesign(cd ClaimDesign) plan.MeasureClaimDesign {
	return plan.MeasureClaimDesign{Counted: append([]int(nil), cd.Counted...), Floor: cd.Floor, BAccept: cd.BAccept}
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

// Recheck verifies a plan file's measures against their inputs without
// searching again: the cells' anticipated composition is rebuilt from the
// anticipated values (cheap), and every stored claim design is judged as
// it stands. Each claim keeps its consumer's risk by construction,
// whatever its counted items, floor and c_B (its test is calibrated to
// them at its level, ClaimDesign.Judge), so what is checked is the rest:
// the level is the family's share of δ; each claim's anticipated value
// and whether it is planned; each claim's counted items fit the cells'
// labels, and each cell's labels are the most any claim counts there (at
// least one); each claim's exact producer's risk, on the design and on the
// uniform sample, recomputed (ClaimDesign.AcceptProbability) equals the
// stored one and, for a planned claim, is at most β; the uniform sample
// is a proportional allocation; the design is no larger than it; and the
// totals and the saving add up. A plan edited by hand fails one of these
// and is refused, naming the first field that differs. The search's
// minimality is not rechecked: the plan's risks do not rest on it. A plan
// without measures passes.
func Recheck(f *plan.File) error {
	if f.Measures == nil {
		return nil
	}
	if field := recheck(f); field != "" {
		return fmt.Errorf("%w: %s is not what the inputs give (the file was edited)", plan.ErrMeasures, field)
	}
	return nil
}

// recheck names the first field of the measures that its inputs do not
// give, or "" when there is none.
func recheck(f *plan.File) string {
	m := f.Measures
	s := SpecOf(f)
	if checkRelease(s) != nil {
		return "measures.release"
	}
	pr, cl, an, pos, err := s.problem()
	if err != nil {
		return "measures (" + err.Error() + ")"
	}
	if m.Assumes != assumes(cl) {
		return "measures.assumes"
	}
	if len(m.Cells) != len(pr.Strata) {
		return "measures.cells"
	}
	sample, uni := make([]int, len(m.Cells)), make([]int, len(m.Cells))
	for i, c := range m.Cells {
		var flagged []string
		for j, fl := range cl.Flagged[i] {
			if fl {
				flagged = append(flagged, s.Candidates[j].Name)
			}
		}
		if c.Label != pr.Strata[i].Label || !slices.Equal(c.Flagged, flagged) || c.Decisions != pr.Strata[i].Population || c.Positives != pos[i] ||
			c.Sample < 0 || int64(c.Sample) > c.Decisions || c.Uniform < 0 || int64(c.Uniform) > c.Decisions {
			return fmt.Sprintf("measures.cells[%d]", i)
		}
		sample[i], uni[i] = c.Sample, c.Uniform
	}
	level := pr.Level()
	d := m.Design
	if d.Family != len(pr.Claims) || d.Level != level || d.Total != sum(sample) || d.Uniform != sum(uni) || d.Total > d.Uniform ||
		d.Saving != float64(d.Uniform)/float64(d.Total) || !isUniform(pr, uni) {
		return "measures.design"
	}
	if len(m.Claims) != len(pr.Claims) {
		return "measures.claims"
	}
	designs := make([]ClaimDesign, len(pr.Claims))
	for i, c := range pr.Claims {
		mc := m.Claims[i]
		field := fmt.Sprintf("measures.claims[%d]", i)
		if mc.Anticipated != round6(an[c.Candidate].Value(c.Measure, s.Prevalence)) ||
			mc.Unplanned != (c.Value(pr.Population, pr.Anticipated) >= c.Ceiling) {
			return field
		}
		for _, x := range []struct {
			stored plan.MeasureClaimDesign
			labels []int
			risk   float64
			name   string
			// the planned claims meet β, on the design and on the uniform
			// comparison
			bound bool
		}{{mc.Design, sample, mc.ProducerRisk, ".design", !mc.Unplanned}, {mc.Uniform, uni, mc.UniformProducerRisk, ".uniform", !mc.Unplanned}} {
			cd := ClaimDesign{Claim: c, Counted: x.stored.Counted, Floor: x.stored.Floor, BAccept: x.stored.BAccept}
			if len(cd.Counted) != len(sample) {
				return field + x.name
			}
			for h, k := range cd.Counted {
				if k < 0 || k > x.labels[h] {
					return field + x.name
				}
			}
			pw, err := cd.AcceptProbability(pr.Population, pr.Anticipated, level)
			if err != nil || round6(1-pw) != x.risk || (x.bound && 1-pw > pr.ProducerRisk+1e-9) {
				return field + x.name
			}
		}
		designs[i] = ClaimDesign{Claim: c, Counted: mc.Design.Counted}
	}
	if !slices.Equal(countedSample(pr, designs), sample) {
		return "measures.cells[].sample"
	}
	return ""
}

// isUniform reports whether the sample is the problem's proportional
// allocation of some size: ProportionalCounts over every stratum, and at
// least the minimum per stratum (the smallest size reaching its total,
// found by bisection, must give it).
func isUniform(pr Problem, sample []int) bool {
	all := make([]int, len(pr.Strata))
	var N int64
	for h, st := range pr.Strata {
		all[h] = h
		N += st.Population
	}
	alloc := func(n int) []int {
		v := ProportionalCounts(pr.Population, all, n)
		for h, st := range pr.Strata {
			v[h] = max(v[h], int(min(int64(pr.MinPerStratum), st.Population)))
		}
		return v
	}
	want := sum(sample)
	n := sort.Search(int(N)+1, func(n int) bool { return sum(alloc(n)) >= want })
	return n <= int(N) && slices.Equal(alloc(n), sample)
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
