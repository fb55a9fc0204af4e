package progress

import (
	"fmt"

	"probity/plan"
	"probity/plan/inputerr"
	"probity/plan/sequential"
	"probity/sampling/drawfolder"
)

// Input is what Assess needs: the plan, the ledger of the draw and the
// partially labeled worksheet, both in worksheet order.
type Input struct {
	Plan *plan.File
	// Ledger rows in the order of ledger.csv (the worksheet's order).
	Ledger []drawfolder.LedgerRow
	// Worksheet rows as read, with their line numbers.
	Worksheet []drawfolder.WorksheetRow
	// WorksheetName names the labels file in messages.
	WorksheetName string
	// Strata are the draw's strata (manifest.json), from which the rule
	// the record will apply is worked out (verdict.Choose); nil judges the
	// ledger as one simple random sample.
	Strata []drawfolder.StratumInfo
	// Rates are the anticipated error rates per stratum the draw recorded
	// (nil: the plan's), as the record takes them.
	Rates []float64
}

// Candidate is one candidate's state.
type Candidate struct {
	Name string `json:"name"`
	// Labeled is the number of labels from the top that count (spares
	// excluded). Errors are the mistakes and Unsure the items labeled
	// unsure among the first StoppedAt labels (all Labeled while
	// continuing); unsure items count as errors toward acceptance and as
	// correct toward rejection, so no stop can be reversed by how they
	// resolve.
	Labeled int `json:"labeled"`
	Errors  int `json:"errors"`
	Unsure  int `json:"unsure"`
	// Decision is continue, accept or reject; StoppedAt the label at which
	// the rule decided (0 while continuing).
	Decision  sequential.Decision `json:"decision"`
	StoppedAt int                 `json:"stopped_at"`
	// MaxRemaining is the most further labels the rule can take before it
	// decides (0 once decided).
	MaxRemaining int `json:"max_remaining"`
	// AcceptAfter is the further labels to acceptance if none of them is
	// an error, RejectAfter the further labels to rejection if all of them
	// are; −1 when that cannot happen, 0 once decided.
	AcceptAfter int `json:"accept_after"`
	RejectAfter int `json:"reject_after"`
	// Reason says in words why.
	Reason string `json:"reason"`
}

// Result is the state of the audit.
type Result struct {
	// Design is fixed or sequential; SampleSize is n (fixed) or the
	// truncation point (sequential); AcceptanceNumber is c (fixed only).
	Design           plan.Design `json:"design"`
	SampleSize       int         `json:"sample_size"`
	AcceptanceNumber *int        `json:"acceptance_number"`
	// Rule names the rule the record will apply (record.RulePlan,
	// RuleStratifiedCount or RuleSequential); under the stratified count
	// rule AcceptanceNumber is its c and CountedSize the items it counts.
	Rule        string `json:"rule"`
	CountedSize int    `json:"counted_size,omitempty"`
	// Labeled is the labeled prefix of the sample (spares excluded);
	// SparesLabeled counts labeled spare items, which progress ignores.
	Labeled       int         `json:"labeled"`
	SparesLabeled int         `json:"spares_labeled"`
	Candidates    []Candidate `json:"candidates"`
	// Overall applies the plan's require rule (all or any) and, under
	// fixed-sequence, the declared order; MaxRemaining is the most labels
	// still needed for every candidate to be decided.
	Overall      sequential.Decision `json:"overall"`
	MaxRemaining int                 `json:"max_remaining"`
	// Notes are facts a reader should know (e.g. unsure labels).
	Notes []string `json:"notes"`
}

// Assess reads the labeled prefix and judges every candidate. Errors about
// the worksheet are *inputerr.Error naming the file, line and column.
func Assess(in Input) (*Result, error) {
	p := in.Plan
	if p == nil || p.IsSizingOnly() {
		return nil, inputerr.Errorf("the plan declares no candidates, so there is nothing to judge").WithHint("use the plan the sample was drawn from")
	}
	items, spares, err := prefix(in)
	if err != nil {
		return nil, err
	}
	count, err := countRuleFor(in)
	if err != nil {
		return nil, err
	}
	var rules []candRules
	var res *Result
	if count != nil {
		res = count.result(p)
	} else if rules, res, err = rulesFor(p); err != nil {
		return nil, err
	}
	res.Labeled = len(items)
	res.SparesLabeled = spares
	// An unsure item means what it means to the record: in a fixed plan
	// the spare the draw's rule gives it is judged in its place, so until
	// that spare is labeled the item may still turn out either way; a
	// sequential plan uses no spares, and the record counts an unsure item
	// as an error (with incomplete labeling allowed; it refuses it
	// otherwise).
	seq := res.Design == plan.DesignSequential
	if !seq {
		replaced, unused, err := replaceBySpares(in, items)
		if err != nil {
			return nil, err
		}
		if replaced > 0 {
			res.Notes = append(res.Notes, fmt.Sprintf("%s replaced by %s, by the draw's rule, as the record does", countOf(replaced, "unsure item", "unsure items"), map[bool]string{true: "its spare", false: "their spares"}[replaced == 1]))
		}
		if unused > 0 {
			res.Notes = append(res.Notes, fmt.Sprintf("%s replaced nothing (unused; harmless)", countOf(unused, "labeled spare", "labeled spares")))
		}
	} else if spares > 0 {
		res.Notes = append(res.Notes, fmt.Sprintf("%s ignored: a sequential plan uses no spares, and the record refuses them", countOf(spares, "labeled spare is", "labeled spares are")))
	}
	unsure := 0
	for _, it := range items {
		if it.label == drawfolder.Unsure {
			unsure++
		}
	}
	switch {
	case unsure > 0 && seq:
		res.Notes = append(res.Notes, fmt.Sprintf("%s unsure: the record refuses an unsure item of a sequential plan, or counts it as an error for every candidate when incomplete labeling is allowed; progress stops only when the decision holds whether it is relabeled as an error, as correct or left unsure", countOf(unsure, "item is", "items are")))
	case unsure > 0:
		res.Notes = append(res.Notes, fmt.Sprintf("%s unsure and not replaced yet: the record judges the spare the draw's rule gives %s, so until it is labeled %s as an error toward acceptance and as correct toward rejection", countOf(unsure, "item is", "items are"), map[bool]string{true: "it", false: "each"}[unsure == 1], map[bool]string{true: "it counts", false: "each counts"}[unsure == 1]))
	}
	for ci, c := range p.Candidates {
		if count != nil {
			res.Candidates = append(res.Candidates, count.judge(c.Name, ci, items))
		} else {
			res.Candidates = append(res.Candidates, judge(c.Name, ci, items, rules[ci]))
		}
	}
	if p.Inputs.Multiplicity == plan.FixedSequence {
		chainFixedSequence(res.Candidates)
	}
	res.Overall, res.MaxRemaining = overall(p.Inputs.Require, res.Candidates)
	if res.Notes == nil {
		res.Notes = []string{}
	}
	return res, nil
}

// item is one labeled item of the prefix.
type item struct {
	label   string
	preds   []string
	stratum string
	itemNo  int
	// replaced is set when label and preds are those of the spare that
	// replaces this unsure item (the record judges the spare after the
	// stratum's sample items, not in this item's place).
	replaced bool
}

// judge walks one candidate's prefix through its rules. The record decides
// at the first boundary the errors reach, so each resolution of the unsure
// items is a path; the pessimistic one (unsure = error) is at or above
// every other at every label, the optimistic one (unsure = correct) at or
// below. A stop is announced only when both extreme paths, each walked
// through both boundaries, reach the same decision (then every path between
// them does: a path below the pessimistic one cannot cross the rejection
// boundary before it, nor stay above the acceptance boundary after it).
// An unsure item of a sequential plan, which the record counts as an error
// (or refuses) while it stays unsure, may still be relabeled either way, so
// it is walked both ways too: the pessimistic path is the record's count.
func judge(name string, ci int, items []item, r candRules) Candidate {
	c := Candidate{Name: name, Decision: sequential.Continue}
	lo, hi := 0, 0
	hiDec, loDec := sequential.Continue, sequential.Continue
	for t, it := range items {
		switch {
		case it.label == drawfolder.Unsure:
			hi++
			c.Unsure++
		case it.preds[ci] != it.label:
			lo++
			hi++
			c.Errors++
		}
		if hiDec == sequential.Continue {
			hiDec = firstBoundary(r, t+1, hi)
		}
		if loDec == sequential.Continue {
			loDec = firstBoundary(r, t+1, lo)
		}
		if hiDec == sequential.Accept {
			c.Decision, c.StoppedAt = sequential.Accept, t+1
			break
		}
		if loDec == sequential.Reject {
			c.Decision, c.StoppedAt = sequential.Reject, t+1
			break
		}
		if hiDec != sequential.Continue && loDec != sequential.Continue {
			// the extreme paths disagree: only how the unsure items
			// resolve can decide; wait for them
			break
		}
	}
	T := r.accept.MaxSampleSize()
	c.Labeled = min(len(items), T)
	switch c.Decision {
	case sequential.Accept:
		c.Reason = fmt.Sprintf("%s in the first %d labels%s: %s", countOf(c.Errors, "error", "errors"), c.StoppedAt, unsureNote(c.Unsure), r.acceptWhy(c.StoppedAt, hi))
	case sequential.Reject:
		c.Reason = fmt.Sprintf("%s in the first %d labels%s: %s", countOf(c.Errors, "error", "errors"), c.StoppedAt, unsureNote(c.Unsure), r.rejectWhy(c.StoppedAt, lo))
	default:
		t := c.Labeled
		if t == T && c.Unsure > 0 {
			// the unsure items wait for their spares
			c.Reason = fmt.Sprintf("%s in all %d labels%s: decided once the spares that replace the unsure items are labeled", countOf(c.Errors, "error", "errors"), t, unsureNote(c.Unsure))
			break
		}
		if t == T {
			// only Holm's step-down leaves a count undecided at n
			c.Reason = fmt.Sprintf("%s in all %d labels%s: decided by Holm's step-down across the candidates; run probity record", countOf(c.Errors, "error", "errors"), t, unsureNote(c.Unsure))
			break
		}
		mr1, _ := r.accept.MaxRemaining(t, hi)
		mr2, _ := r.reject.MaxRemaining(t, lo)
		c.MaxRemaining = min(max(mr1, mr2), T-t)
		c.AcceptAfter = r.accept.ToAcceptWithoutErrors(t, hi)
		c.RejectAfter = r.reject.ToRejectWithErrors(t, lo)
		c.Reason = fmt.Sprintf("%s in %d labels%s: not decided yet", countOf(c.Errors, "error", "errors"), t, unsureNote(c.Unsure))
	}
	return c
}

// firstBoundary is the decision at t labels with e errors: acceptance by
// the accept rule, rejection by the reject rule (they differ only under
// Holm, where acceptance is at the first step's c and rejection beyond the
// last step's).
func firstBoundary(r candRules, t, e int) sequential.Decision {
	if r.accept.At(t, e) == sequential.Accept {
		return sequential.Accept
	}
	if r.reject.At(t, e) == sequential.Reject {
		return sequential.Reject
	}
	return sequential.Continue
}

// unsureNote is the unsure items beside the errors (never among them).
func unsureNote(n int) string {
	if n == 0 {
		return ""
	}
	return fmt.Sprintf(" and %d unsure", n)
}

// countOf is "1 error" or "k errors".
func countOf(k int, one, many string) string {
	if k == 1 {
		return "1 " + one
	}
	return fmt.Sprintf("%d %s", k, many)
}

// chainFixedSequence applies the declared order: a candidate can be
// accepted only if every earlier one is, and is rejected once an earlier
// one is.
func chainFixedSequence(cs []Candidate) {
	earlierRejected, earlierOpen := false, false
	for i := range cs {
		c := &cs[i]
		switch {
		case earlierRejected:
			if c.Decision != sequential.Reject {
				c.Decision = sequential.Reject
				c.Reason = "not tested: an earlier candidate in the fixed sequence is rejected"
				c.MaxRemaining, c.AcceptAfter, c.RejectAfter = 0, 0, 0
			}
		case earlierOpen && c.Decision == sequential.Accept:
			c.Decision = sequential.Continue
			c.Reason += "; waits for the earlier candidates of the fixed sequence"
		}
		if c.Decision == sequential.Reject {
			earlierRejected = true
		}
		if c.Decision == sequential.Continue {
			earlierOpen = true
		}
	}
}

// overall combines the candidates under require all or any: accept once
// the accepted ones meet it, reject once even the undecided ones could
// not.
func overall(require plan.Require, cs []Candidate) (sequential.Decision, int) {
	acc, rej, most := 0, 0, 0
	for _, c := range cs {
		switch c.Decision {
		case sequential.Accept:
			acc++
		case sequential.Reject:
			rej++
		}
		most = max(most, c.MaxRemaining)
	}
	switch {
	case require.Met(acc, len(cs)):
		return sequential.Accept, 0
	case !require.Met(len(cs)-rej, len(cs)):
		return sequential.Reject, 0
	}
	return sequential.Continue, most
}
