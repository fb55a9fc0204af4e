package main

import (
	"errors"
	"fmt"
	"io"

	"probity/plan"
	"probity/plan/inputerr"
	"probity/plan/numfmt"
	"probity/plan/sequential"
)

// This file holds what `probity plan --design sequential` adds to the plan
// command: the design step, the `sequential` key of --json, the exact OC
// of the sequential rule and the lines of the human output.

// planSequentialJSON is the `sequential` key of `plan --json`: the
// boundaries as two arrays indexed by labels t = 1 … max_sample_size
// (−1 where acceptance is not yet possible, null where rejection is not
// yet possible; at t = max they meet), the exact ASNs, and the fixed plan
// the design is compared with.
type planSequentialJSON struct {
	MaxSampleSize         int     `json:"max_sample_size"`
	ASNAtAnticipated      float64 `json:"asn_at_anticipated"`
	ASNAtCeiling          float64 `json:"asn_at_ceiling"`
	AcceptIfErrorsAtMost  []int   `json:"accept_if_errors_at_most"`
	RejectIfErrorsAtLeast []*int  `json:"reject_if_errors_at_least"`
	FixedSampleSize       int     `json:"fixed_sample_size"`
	FixedAcceptanceNumber int     `json:"fixed_acceptance_number"`
}

// applySequentialDesign turns a built fixed plan into the sequential plan
// for the same risks (see sequential.Apply), mapping its errors to the
// flags the user can change.
func applySequentialDesign(f *plan.File) error {
	_, err := sequential.Apply(f, 0)
	switch {
	case err == nil:
		return nil
	case errors.Is(err, sequential.ErrNeedsAnticipated):
		return inputerr.Errorf("--design sequential needs --anticipated: the boundaries are searched between the anticipated error and the ceiling").WithHint("add --anticipated P with P below --ceiling, the error a good model is expected to have")
	case errors.Is(err, sequential.ErrNeedsExact):
		return inputerr.Errorf("--design sequential works with --method exact only (%v)", err).WithHint("drop --method or use --method exact")
	case errors.Is(err, sequential.ErrTooLarge):
		return inputerr.Errorf("--design sequential: %v", err).WithHint("use --design fixed, or relax --ceiling, --anticipated or --confidence")
	case errors.Is(err, sequential.ErrDomain):
		return inputerr.Errorf("--design sequential: %v", err).WithHint("use --design fixed for these inputs")
	}
	return &internalError{msg: err.Error()}
}

// sequentialPlanJSON returns the `sequential` key for a plan (nil for a
// fixed plan, so the key is null).
func sequentialPlanJSON(f *plan.File) *planSequentialJSON {
	s := f.Sequential
	if s == nil {
		return nil
	}
	return &planSequentialJSON{
		MaxSampleSize: s.MaxSampleSize, ASNAtAnticipated: s.ASNAtAnticipated, ASNAtCeiling: s.ASNAtCeiling,
		AcceptIfErrorsAtMost: s.AcceptIfErrorsAtMost, RejectIfErrorsAtLeast: s.RejectIfErrorsAtLeast,
		FixedSampleSize: s.FixedSampleSize, FixedAcceptanceNumber: s.FixedAcceptanceNumber,
	}
}

// sequentialOC is the exact probability of acceptance of a sequential
// plan at each error rate (hypergeometric for a lot), for the plan's OC table; ok is false
// for a fixed plan.
func sequentialOC(f *plan.File, errs []float64) ([]float64, bool, error) {
	if f.Sequential == nil {
		return nil, false, nil
	}
	oc, err := sequential.PlanOC(f, errs)
	if err != nil {
		return nil, true, &internalError{msg: "sequential OC: " + err.Error()}
	}
	return oc, true, nil
}

// writeSequentialSummary prints what a sequential plan asks and buys:
// labels at most, the exact ASNs beside the fixed plan's n, the exact
// risks and a short table of the boundaries.
func writeSequentialSummary(w io.Writer, f *plan.File) {
	s := f.Sequential
	if s == nil {
		return
	}
	n := float64(s.FixedSampleSize)
	p0 := 0.0
	if f.Inputs.Anticipated != nil {
		p0 = *f.Inputs.Anticipated
	}
	fmt.Fprintf(w, "Sequential design: label one item at a time, from the top of the worksheet, and stop at the boundaries;\n")
	fmt.Fprintf(w, "at most %d labels (the draw selects that many). 'probity progress' says when to stop.\n", s.MaxSampleSize)
	fmt.Fprintf(w, "Average labels needed (exact ASN): %.0f at the anticipated error %s, %.0f at the ceiling %s;\n",
		s.ASNAtAnticipated, numfmt.Setting(p0), s.ASNAtCeiling, numfmt.Setting(f.Inputs.Ceiling))
	fmt.Fprintf(w, "the fixed plan needs %d labels with at most %s (%.0f %% and %.0f %% of it).\n",
		s.FixedSampleSize, countOf(s.FixedAcceptanceNumber, "error", "errors"), 100*s.ASNAtAnticipated/n, 100*s.ASNAtCeiling/n)
	pr := "n/a"
	if f.Rule.ProducerRisk != nil {
		pr = fmt.Sprintf("%.4g", *f.Rule.ProducerRisk)
	}
	fmt.Fprintf(w, "Exact risks of the sequential plan: consumer's %.4g (at most %.4g), producer's %s (at most %.4g).\n",
		f.Rule.ConsumerRisk, f.Rule.PerCandidateRisk, pr, f.Inputs.ProducerRisk)
	fmt.Fprintln(w, "Boundaries (after t labels: accept if errors ≤ a, reject if errors ≥ r):")
	for _, t := range planSeqTableRows(s) {
		a := "—"
		if v := s.AcceptIfErrorsAtMost[t-1]; v >= 0 {
			a = fmt.Sprint(v)
		}
		r := "—"
		if v := s.RejectIfErrorsAtLeast[t-1]; v != nil {
			r = fmt.Sprint(*v)
		}
		fmt.Fprintf(w, "  t = %-6d a = %-4s r = %s\n", t, a, r)
	}
	fmt.Fprintln(w, "  (the full arrays are in the plan file and in --json)")
}

// planSeqTableRows picks the t shown in the boundary table: the first
// rejection and acceptance points, then about eight evenly spaced t, and
// the truncation point.
func planSeqTableRows(s *plan.SequentialRule) []int {
	T := s.MaxSampleSize
	seen := map[int]bool{}
	var rows []int
	add := func(t int) {
		if t >= 1 && t <= T && !seen[t] {
			seen[t] = true
			rows = append(rows, t)
		}
	}
	for t := 1; t <= T; t++ {
		if s.RejectIfErrorsAtLeast[t-1] != nil {
			add(t)
			break
		}
	}
	for t := 1; t <= T; t++ {
		if s.AcceptIfErrorsAtMost[t-1] >= 0 {
			add(t)
			break
		}
	}
	step := max(T/8, 1)
	for t := step; t < T; t += step {
		add(t)
	}
	add(T)
	// ascending order
	for i := 1; i < len(rows); i++ {
		for j := i; j > 0 && rows[j] < rows[j-1]; j-- {
			rows[j], rows[j-1] = rows[j-1], rows[j]
		}
	}
	return rows
}
