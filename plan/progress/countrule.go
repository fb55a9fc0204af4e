package progress

import (
	"fmt"

	"probity/plan"
	"probity/plan/inputerr"
	"probity/plan/record"
	"probity/plan/sequential"
	"probity/plan/verdict"
	"probity/sampling/drawfolder"
)

// countStops is early stopping under the stratified count rule, which the
// record applies to a stratified draw that is not exactly proportional
// (verdict.Choose): a candidate is accepted when at most acc of the counted
// items are errors — in stratum h the first k_h of its judged items, in
// worksheet order — and rejected otherwise.
//
// Whatever the labels still to come, and however the unsure items resolve
// (an unsure or unlabeled item is replaced by a spare, or counted as an
// error when incomplete labeling is allowed), the sample items among the
// first k_h of stratum h that carry a class label stay counted: fewer than
// k_h judged items precede them. So the counted errors S satisfy
//
//	Σ_h (errors among them) ≤ S ≤ Σ_h (k_h − correct among them),
//
// and a stop is announced only when the whole interval lies on one side
// of the rule: accept when the upper end is at most acc, reject when the
// lower end exceeds rej (acc, or under Holm the count no step of the
// procedure accepts).
type countStops struct {
	strata  map[string]int // stratum label → index
	counted []int          // k_h
	total   int            // Σ k_h
	acc     int
	rej     int
	// order is the stratum of each sample item in worksheet order,
	// sampleSize their number and last the position (among sample items)
	// of the last counted one.
	order      []int
	sampleSize int
	last       int
}

// countRuleFor returns the count-rule stops when the record will judge the
// draw by the stratified count rule, else nil.
func countRuleFor(in Input) (*countStops, error) {
	p := in.Plan
	if len(in.Strata) < 2 || p.Sequential != nil || p.Inputs.Design == plan.DesignSequential {
		return nil, nil
	}
	d := verdict.Design{}
	idx := map[string]int{}
	for h, s := range in.Strata {
		d.Strata = append(d.Strata, verdict.Stratum{Label: s.Label, Population: s.Population, Sample: s.Sample})
		idx[s.Label] = h
	}
	a, err := verdict.Choose(p, d, in.Rates)
	if err != nil {
		return nil, err
	}
	if a.Kind != verdict.CountRule {
		return nil, nil
	}
	cs := &countStops{strata: idx, counted: a.Count.Counted, total: a.Count.CountedSize(), acc: a.Count.Accept, rej: a.Count.Accept}
	if p.Inputs.Multiplicity == plan.Holm && p.Inputs.CandidateCount > 1 {
		// Holm's last step tests at δ: a count above c(δ) is accepted by
		// no step.
		r, err := a.RuleAt(p.Inputs.Confidence)
		if err != nil {
			return nil, inputerr.Errorf("the stratified count rule: %v", err)
		}
		cs.rej = r.Accept
	}
	seen := make([]int, len(in.Strata))
	for _, l := range in.Ledger {
		if l.Spare {
			continue
		}
		cs.sampleSize++
		h, ok := idx[l.Stratum]
		if !ok {
			return nil, inputerr.Errorf("the ledger's item %d is in stratum %q, which the manifest does not list", l.Item, l.Stratum)
		}
		cs.order = append(cs.order, h)
		seen[h]++
		if seen[h] <= cs.counted[h] {
			cs.last = cs.sampleSize
		}
	}
	return cs, nil
}

// walk is how many more sample items, after the first t, must be labeled
// to include need more counted items, or −1 when too few are left.
func (cs *countStops) walk(t, need int) int {
	seen := make([]int, len(cs.counted))
	for i, h := range cs.order {
		seen[h]++
		if i < t || seen[h] > cs.counted[h] {
			continue
		}
		if need--; need == 0 {
			return i + 1 - t
		}
	}
	return -1
}

// result is the plan part of the assessment.
func (cs *countStops) result(p *plan.File) *Result {
	acc := cs.acc
	return &Result{Design: plan.DesignFixed, SampleSize: cs.sampleSize, AcceptanceNumber: &acc,
		Rule: record.RuleStratifiedCount, CountedSize: cs.total}
}

// judge walks one candidate's labeled prefix.
func (cs *countStops) judge(name string, ci int, items []item) Candidate {
	c := Candidate{Name: name, Decision: sequential.Continue}
	seen := make([]int, len(cs.counted))
	lower, correct := 0, 0
	for t, it := range items {
		h := cs.strata[it.stratum]
		seen[h]++
		isCounted := seen[h] <= cs.counted[h]
		switch {
		case it.label == drawfolder.Unsure:
			c.Unsure++
		case it.replaced:
			// the record judges the spare after the stratum's sample items,
			// so it may or may not be among the counted ones: it counts
			// neither way here (the items after it only move up, so a
			// counted position stays counted)
			if it.preds[ci] != it.label {
				c.Errors++
			}
		case it.preds[ci] != it.label:
			c.Errors++
			if isCounted {
				lower++
			}
		default:
			if isCounted {
				correct++
			}
		}
		upper := cs.total - correct
		switch {
		case upper <= cs.acc:
			c.Decision, c.StoppedAt = sequential.Accept, t+1
			c.Reason = fmt.Sprintf("%s in the first %d labels%s: at most %d of the %d counted items can be errors, ≤ c = %d, however the rest turns out", countOf(c.Errors, "error", "errors"), t+1, unsureNote(c.Unsure), upper, cs.total, cs.acc)
		case lower > cs.rej:
			c.Decision, c.StoppedAt = sequential.Reject, t+1
			c.Reason = fmt.Sprintf("%s among the counted items in the first %d labels: more than %d, so the stratified count rule must reject", countOf(lower, "error", "errors"), t+1, cs.rej)
		}
		if c.Decision != sequential.Continue {
			break
		}
	}
	c.Labeled = min(len(items), cs.sampleSize)
	if c.Decision != sequential.Continue {
		return c
	}
	t := c.Labeled
	c.MaxRemaining = max(0, cs.last-t)
	c.AcceptAfter, c.RejectAfter = -1, -1
	if cs.acc >= 0 {
		c.AcceptAfter = cs.after(t, cs.total-correct-cs.acc)
	}
	c.RejectAfter = cs.after(t, cs.rej+1-lower)
	c.Reason = fmt.Sprintf("%s in %d labels%s: not decided yet (%d of the %d counted items labeled)", countOf(c.Errors, "error", "errors"), t, unsureNote(c.Unsure), countedSoFar(seen, cs.counted), cs.total)
	return c
}

// after is how many more labels, from position t of the sample in
// worksheet order, reach need more counted items (all correct for
// acceptance, all errors for rejection), or −1 when the counted items
// left are too few.
func (cs *countStops) after(t, need int) int {
	if need <= 0 {
		return 0
	}
	return cs.walk(t, need)
}

func countedSoFar(seen, counted []int) int {
	n := 0
	for h := range seen {
		n += min(seen[h], counted[h])
	}
	return n
}
