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
	rules, res, err := rulesFor(p)
	if err != nil {
		return nil, err
	}
	items, spares, err := prefix(in)
	if err != nil {
		return nil, err
	}
	res.Labeled = len(items)
	res.SparesLabeled = spares
	if spares > 0 {
		res.Notes = append(res.Notes, fmt.Sprintf("%d labeled spare item(s) ignored: spares only replace unusable items, which record handles", spares))
	}
	unsure := 0
	for _, it := range items {
		if it.label == drawfolder.Unsure {
			unsure++
		}
	}
	if unsure > 0 {
		res.Notes = append(res.Notes, fmt.Sprintf("%d item(s) labeled unsure count as errors toward acceptance and as correct toward rejection", unsure))
	}
	for ci, c := range p.Candidates {
		res.Candidates = append(res.Candidates, judge(c.Name, ci, items, rules[ci]))
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
	label string
	preds []string
}

// judge walks one candidate's prefix through its rules: the pessimistic
// path (unsure = error) decides acceptance, the optimistic one (unsure =
// correct) rejection.
func judge(name string, ci int, items []item, r candRules) Candidate {
	c := Candidate{Name: name, Decision: sequential.Continue}
	lo, hi := 0, 0
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
		if r.accept.At(t+1, hi) == sequential.Accept {
			c.Decision, c.StoppedAt = sequential.Accept, t+1
			break
		}
		if r.reject.At(t+1, lo) == sequential.Reject {
			c.Decision, c.StoppedAt = sequential.Reject, t+1
			break
		}
	}
	T := r.accept.MaxSampleSize()
	c.Labeled = min(len(items), T)
	switch c.Decision {
	case sequential.Accept:
		c.Reason = fmt.Sprintf("%d error(s) in the first %d labels%s: %s", hi, c.StoppedAt, unsureNote(c.Unsure), r.acceptWhy(c.StoppedAt, hi))
	case sequential.Reject:
		c.Reason = fmt.Sprintf("%d error(s) in the first %d labels: %s", lo, c.StoppedAt, r.rejectWhy(c.StoppedAt, lo))
	default:
		t := c.Labeled
		if t == T {
			// only Holm's step-down leaves a count undecided at n
			c.Reason = fmt.Sprintf("%d error(s) in all %d labels%s: decided by Holm's step-down across the candidates; run probity record", lo, t, unsureNote(c.Unsure))
			break
		}
		mr1, _ := r.accept.MaxRemaining(t, hi)
		mr2, _ := r.reject.MaxRemaining(t, lo)
		c.MaxRemaining = min(max(mr1, mr2), T-t)
		c.AcceptAfter = r.accept.ToAcceptWithoutErrors(t, hi)
		c.RejectAfter = r.reject.ToRejectWithErrors(t, lo)
		c.Reason = fmt.Sprintf("%d error(s) in %d labels%s: not decided yet", lo, t, unsureNote(c.Unsure))
	}
	return c
}

func unsureNote(n int) string {
	if n == 0 {
		return ""
	}
	return fmt.Sprintf(" (plus %d unsure)", n)
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
