package main

import (
	"fmt"
	"io"
	"strings"

	"probity/plan"
	"probity/plan/numfmt"
	"probity/plan/verdict"
	"probity/sampling/drawfolder"
)

// drawRule is the rule the draw's sample will be judged by, worked out
// from the plan and the manifest alone (before any label).
func drawRule(p *plan.File, m *drawfolder.Manifest) (*verdict.Applied, error) {
	d := verdict.Design{}
	for _, s := range m.Strata {
		d.Strata = append(d.Strata, verdict.Stratum{Label: s.Label, Population: s.Population, Sample: s.Sample})
	}
	return verdict.Choose(p, d, m.AnticipatedRates())
}

// writeDrawRule prints, before any label is given, which rule will judge
// the sample and what it does to the plan's risks: the strata left without
// an item, and under the stratified count rule its acceptance number, the
// items it counts and its producer's risk at the anticipated errors.
func writeDrawRule(w io.Writer, p *plan.File, m *drawfolder.Manifest) error {
	if m.Measures != nil && m.Measures.Departure != nil {
		d := m.Measures.Departure
		fmt.Fprintf(w, "note: this log's %s holds %s of decisions where the plan assumed %s: the plan's design was sized for other shares (plan again with anticipated values that fit this log)\n",
			d.Cell, numfmt.Chance(d.LogShare), numfmt.Chance(d.PlanShare))
	}
	if m.Allocation.Note != "" {
		fmt.Fprintf(w, "allocation note: %s\n", m.Allocation.Note)
	}
	if p.Measures != nil && m.Measures != nil {
		return writeDrawMeasures(w, p, m)
	}
	a, err := drawRule(p, m)
	if err != nil {
		return err
	}
	if len(a.Unknown) > 0 {
		fmt.Fprintf(w, "warning: %d %s got no item (%s): the verdict counts all of %s decisions as possible errors\n",
			len(a.Unknown), map[bool]string{true: "stratum", false: "strata"}[len(a.Unknown) == 1], listNames(a.Unknown, 5),
			map[bool]string{true: "its", false: "their"}[len(a.Unknown) == 1])
	}
	if a.Kind == verdict.PlanRule {
		if len(m.Strata) > 1 {
			fmt.Fprintf(w, "verdict: the plan's rule (at most %d errors in %d), since %s\n", p.Rule.AcceptanceNumber, p.Rule.SampleSize, a.Reason)
		}
		return nil
	}
	c := a.Count
	fmt.Fprintf(w, "verdict: the stratified count rule, because the allocation is not exactly proportional\n")
	if c.Accept < 0 {
		fmt.Fprintf(w, "  no count of errors can pass: too few items count for the ceiling at this confidence\n")
	} else {
		fmt.Fprintf(w, "  a candidate passes with at most %d errors among %d counted items (the plan's c = %d in n = %d holds for a simple random sample only)\n",
			c.Accept, c.CountedSize(), p.Rule.AcceptanceNumber, p.Rule.SampleSize)
	}
	fmt.Fprintf(w, "  consumer's risk: at most %s for a candidate at the ceiling, wherever its errors sit (allowed %s)\n",
		numfmt.ChanceUp(c.ConsumerRiskBound()), numfmt.Chance(p.Rule.PerCandidateRisk))
	planPR := ""
	if pr := p.Rule.ProducerRisk; pr != nil {
		planPR = fmt.Sprintf("; the plan states %s for a simple random sample", numfmt.Chance(*pr))
	}
	fmt.Fprintf(w, "  producer's risk: %s at %s%s\n", numfmt.Chance(a.ProducerRisk), a.AnticipatedFrom, planPR)
	if a.Thinned {
		var parts []string
		for h, s := range m.Strata {
			if k := c.Counted[h]; k < s.Sample {
				parts = append(parts, fmt.Sprintf("%s its first %d of %d", s.Label, k, s.Sample))
			}
		}
		fmt.Fprintf(w, "  counted: every item, except %s (in worksheet order; fixed now, before any label)\n", listNames(parts, 6))
	}
	return nil
}

// listNames joins up to max names and says how many more there are.
func listNames(names []string, max int) string {
	if len(names) <= max {
		return strings.Join(names, ", ")
	}
	return strings.Join(names[:max], ", ") + fmt.Sprintf(" and %d more", len(names)-max)
}
