package progress

import (
	"fmt"
	"slices"
	"strings"

	"probity/plan"
	"probity/plan/inputerr"
	"probity/plan/measure"
	"probity/plan/record/claims"
	"probity/plan/sequential"
	"probity/sampling/drawfolder"
)

// MeasureClaim is one (measure, candidate) claim's state on a worksheet
// labeled from the top. A claim counts the first Counted[h] items of each
// stratum of its sides, fixed by the draw (manifest.json); the labeled
// prefix of the worksheet covers the first of them in every stratum.
type MeasureClaim struct {
	Candidate string  `json:"candidate"`
	Measure   string  `json:"measure"`
	Ceiling   float64 `json:"ceiling"`
	// Counted items of the claim's strata (for a ratio, of its
	// numerator's side), Labeled of them labeled with a class so far and
	// Events among those: wrong decisions (error), positives among the
	// predicted negatives (for, fnr), negatives among the predicted
	// positives (fdr, fpr).
	Counted int `json:"counted"`
	Labeled int `json:"labeled"`
	Events  int `json:"events"`
	// For a ratio (fnr, fpr) the denominator's side likewise: its complement
	// events are false positives (fnr) or false negatives (fpr).
	CountedOther int `json:"counted_other"`
	LabeledOther int `json:"labeled_other"`
	EventsOther  int `json:"events_other"`
	// Decision is accept or reject only when every completion of the
	// claim's remaining counted labels gives that verdict under the
	// plan's multiplicity; continue otherwise.
	Decision sequential.Decision `json:"decision"`
	Reason   string              `json:"reason"`
}

// MeasuresResult is the state of an audit of measures.
type MeasuresResult struct {
	// SampleSize is the draw's sample (spares excluded), Labeled its
	// labeled prefix, SparesLabeled the labeled spares (ignored).
	SampleSize    int            `json:"sample_size"`
	Labeled       int            `json:"labeled"`
	SparesLabeled int            `json:"spares_labeled"`
	Claims        []MeasureClaim `json:"claims"`
	// Candidates: accept once all its claims are decided accepted, reject
	// once one is decided rejected.
	Candidates []CandidateState `json:"candidates"`
	// Release is the plan's release rule and Released what it will
	// release when that is already decided ("" for none); ReleaseDecided
	// is false while it may still change.
	Release        string `json:"release,omitempty"`
	Released       string `json:"released"`
	ReleaseDecided bool   `json:"release_decided"`
	// MaxRemaining is the most further labels from the top before every
	// claim's counted items are labeled (0 once every claim is decided).
	MaxRemaining int      `json:"max_remaining"`
	Notes        []string `json:"notes"`
}

// CandidateState is a candidate's decision over its claims.
type CandidateState struct {
	Name     string              `json:"name"`
	Decision sequential.Decision `json:"decision"`
}

// AssessMeasures reads the labeled prefix of a plan with measures and
// says, per claim, whether it is decided. A claim is decided only when
// that is exactly true: its p-value is computed (plan/measure's
// judgement, ClaimDesign.Judge) at the two extremes of its remaining
// counted labels — every one an event, and none —, and the plan's family
// procedure (claims.Family) is applied to every claim's worst p-values
// and to every claim's best. The p-value grows with the events of either
// side and the family procedure is monotone in the p-values, so a claim
// accepted at the worst extremes is accepted by every completion and one
// rejected at the best is rejected by every completion: a stop is never
// reversed by the record. (Each claim's extremes are taken separately; an
// item can be an event for one claim and not another, so a claim may be
// decided later than the earliest moment possible, never sooner.) An
// item labeled unsure counts as not yet labeled: its spare takes a place
// the claim counts.
func AssessMeasures(in Input, m *drawfolder.Manifest) (*MeasuresResult, error) {
	p := in.Plan
	if p == nil || p.Measures == nil {
		return nil, fmt.Errorf("internal: AssessMeasures on a plan without measures")
	}
	items, spares, err := prefix(in)
	if err != nil {
		return nil, err
	}
	pop, err := claims.Population(p, m)
	if err != nil {
		return nil, err
	}
	designs, _, err := claims.Designs(p, m)
	if err != nil {
		return nil, err
	}
	index := map[string]int{}
	for h, s := range m.Strata {
		index[s.Label] = h
	}
	// the labeled prefix per stratum, in key order; nil for unsure
	known := make([][]*measure.Label, len(m.Strata))
	unsure := 0
	for _, it := range items {
		h, ok := index[it.stratum]
		if !ok {
			return nil, inputerr.Errorf("the ledger's stratum %q is not in the manifest", it.stratum)
		}
		if it.label == drawfolder.Unsure {
			known[h] = append(known[h], nil)
			unsure++
			continue
		}
		l := &measure.Label{Positive: it.label == p.Measures.Positive, Wrong: make([]bool, len(p.Candidates))}
		for j := range p.Candidates {
			l.Wrong[j] = it.preds[j] != it.label
		}
		known[h] = append(known[h], l)
	}
	res := &MeasuresResult{SampleSize: m.SampleSize, Labeled: len(items), SparesLabeled: spares, Release: p.Measures.Release, Notes: []string{}}
	K := len(designs)
	worst, best := make([]float64, K), make([]float64, K)
	level := (1 - p.Inputs.Confidence) / float64(K)
	for i, cd := range designs {
		c := MeasureClaim{Candidate: p.Candidates[cd.Candidate].Name, Measure: cd.Measure.String(), Ceiling: cd.Ceiling}
		var sw, sb measure.Sample
		sw, sb = make(measure.Sample, len(m.Strata)), make(measure.Sample, len(m.Strata))
		for h := range m.Strata {
			k := cd.Counted[h]
			if k == 0 {
				continue
			}
			candPos := pop.Candidates[cd.Candidate].Positive[h]
			// an event of the claim's side in stratum h is a label of
			// the class the candidate does not predict there
			event, none := measure.Label{Positive: !candPos}, measure.Label{Positive: candPos}
			numer := numeratorSide(cd.Measure, candPos)
			for t := range k {
				var l *measure.Label
				if t < len(known[h]) {
					l = known[h][t]
				}
				if l == nil {
					sw[h], sb[h] = append(sw[h], event), append(sb[h], none)
					addCount(&c, numer, false, false)
					continue
				}
				sw[h], sb[h] = append(sw[h], *l), append(sb[h], *l)
				addCount(&c, numer, true, isEvent(*l, cd.Measure, cd.Candidate, candPos))
			}
		}
		vw, err := cd.Judge(pop, sw, level)
		if err != nil {
			return nil, err
		}
		vb, err := cd.Judge(pop, sb, level)
		if err != nil {
			return nil, err
		}
		worst[i], best[i] = vw.PValue, vb.PValue
		res.Claims = append(res.Claims, c)
	}
	delta := 1 - p.Inputs.Confidence
	accW, accB := claims.Family(p.Inputs.Multiplicity, delta, worst), claims.Family(p.Inputs.Multiplicity, delta, best)
	need := make([]int, len(m.Strata)) // counted items the undecided claims still need, per stratum
	for i := range res.Claims {
		c := &res.Claims[i]
		left := c.Counted - c.Labeled + c.CountedOther - c.LabeledOther
		switch {
		case accW[i]:
			c.Decision = sequential.Accept
			c.Reason = "cannot fail whatever the remaining labels"
		case !accB[i]:
			c.Decision = sequential.Reject
			c.Reason = "cannot pass whatever the remaining labels"
		default:
			c.Decision = sequential.Continue
			c.Reason = fmt.Sprintf("not decided: %d counted %s to label", left, plural(left, "item", "items"))
			for h, k := range designs[i].Counted {
				need[h] = max(need[h], k)
			}
		}
		if left == 0 && c.Decision != sequential.Continue {
			c.Reason = "every counted item labeled"
		}
	}
	res.Candidates, res.Released, res.ReleaseDecided = candidateStates(p, res.Claims)
	res.MaxRemaining = remainingFromTop(in.Ledger, m, need, len(items))
	if unsure > 0 {
		res.Notes = append(res.Notes, fmt.Sprintf("%d %s unsure: each counts as not labeled yet (the record judges the spare that replaces it)", unsure, plural(unsure, "item is", "items are")))
	}
	return res, nil
}

// numeratorSide reports whether a stratum the candidate predicts positive
// (candPos) or negative is on the claim's numerator side: error counts
// every stratum, for and fnr the predicted negatives, fdr and fpr the
// predicted positives.
func numeratorSide(m measure.Measure, candPos bool) bool {
	switch m {
	case measure.FOR, measure.FNR:
		return !candPos
	case measure.FDR, measure.FPR:
		return candPos
	}
	return true
}

// isEvent reports whether a label is an event of the claim's side in a
// stratum the candidate predicts positive (candPos) or negative: a wrong
// decision for error (any class), else the class the candidate does not
// predict there.
func isEvent(l measure.Label, m measure.Measure, cand int, candPos bool) bool {
	if m == measure.Error {
		return l.Wrong[cand]
	}
	return l.Positive != candPos
}

// addCount adds one counted item to the claim's side.
func addCount(c *MeasureClaim, numer, labeled, event bool) {
	if numer {
		c.Counted++
		if labeled {
			c.Labeled++
		}
		if event {
			c.Events++
		}
		return
	}
	c.CountedOther++
	if labeled {
		c.LabeledOther++
	}
	if event {
		c.EventsOther++
	}
}

// candidateStates combines the claims per candidate and applies the
// release rule where it is already decided: a named candidate once it is
// decided; best:MEASURE once every candidate is decided and at most one
// is accepted (with more, the lowest estimate decides at the end).
func candidateStates(p *plan.File, cs []MeasureClaim) ([]CandidateState, string, bool) {
	out := make([]CandidateState, len(p.Candidates))
	for j, c := range p.Candidates {
		out[j] = CandidateState{Name: c.Name, Decision: sequential.Accept}
		for _, mc := range cs {
			if mc.Candidate != c.Name {
				continue
			}
			switch {
			case mc.Decision == sequential.Reject:
				out[j].Decision = sequential.Reject
			case mc.Decision == sequential.Continue && out[j].Decision == sequential.Accept:
				out[j].Decision = sequential.Continue
			}
		}
	}
	r := p.Measures.Release
	if r == "" {
		return out, "", false
	}
	if !strings.HasPrefix(r, "best:") {
		j := slices.IndexFunc(out, func(c CandidateState) bool { return c.Name == r })
		if j < 0 || out[j].Decision == sequential.Continue {
			return out, "", false
		}
		if out[j].Decision == sequential.Accept {
			return out, r, true
		}
		return out, "", true
	}
	accepted := ""
	n := 0
	for _, c := range out {
		switch c.Decision {
		case sequential.Continue:
			return out, "", false
		case sequential.Accept:
			accepted, n = c.Name, n+1
		}
	}
	if n > 1 {
		return out, "", false
	}
	return out, accepted, true
}

// remainingFromTop is the further labels from the top of the worksheet
// until each stratum's first need[h] sample items are labeled.
func remainingFromTop(ledger []drawfolder.LedgerRow, m *drawfolder.Manifest, need []int, labeled int) int {
	index := map[string]int{}
	for h, s := range m.Strata {
		index[s.Label] = h
	}
	seen := make([]int, len(m.Strata))
	last, pos := 0, 0
	for _, l := range ledger {
		if l.Spare {
			continue
		}
		pos++
		h := index[l.Stratum]
		seen[h]++
		if seen[h] <= need[h] {
			last = pos
		}
	}
	return max(0, last-labeled)
}

// plural is one or many by n.
func plural(n int, one, many string) string {
	if n == 1 {
		return one
	}
	return many
}
