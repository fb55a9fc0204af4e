package verdict

import (
	"fmt"

	"probity/plan"
)

// CheckStratification verifies the stratified design of a plan file (its
// stratification section) against its rule, so that an edited plan
// reaches no draw: on the planned strata with the stated n_h, the
// stratified count rule is made again (Choose's count rule, its counted
// sub-sample chosen for power at the planned anticipated errors) and the
// counted k_h, the acceptance number and the consumer's and producer's
// risks must be what the file states (numbers to the digits the file
// holds, see plan.Source.Agrees). The plan's simple random sample is
// checked by plan.File.Check; the allocation of n over the strata is the
// draw's to repeat, and the record judges the draw's own strata again.
// planfile.Parse runs it; nil for a plan without strata.
func CheckStratification(f *plan.File, src *plan.Source) error {
	st := f.Stratification
	if st == nil {
		return nil
	}
	d := Design{}
	for h, s := range st.Strata {
		d.Strata = append(d.Strata, Stratum{Label: s.Label, Population: s.Population, Sample: st.Sample[h]})
	}
	// the rates the plan was sized at: the planned ones, or none for a
	// zero-failure plan (its counted items are chosen at half the ceiling)
	var rates []float64
	if f.Inputs.Anticipated != nil || f.Rule.ProducerRisk != nil {
		for _, s := range st.Strata {
			rates = append(rates, s.Anticipated)
		}
	}
	level := f.Rule.PerCandidateRisk
	if !(level > 0 && level < 1) {
		return src.Errorf("rule.per_candidate_risk", "%v is outside (0, 1)", level)
	}
	if err := d.validate(); err != nil {
		return src.Errorf("stratification", "%v", err)
	}
	a := &Applied{Design: d.stratified()}
	if err := a.count(f, d, rates, level); err != nil {
		return src.Errorf("stratification", "the stratified count rule cannot be made on the planned strata: %v", err)
	}
	for h := range st.Counted {
		if st.Counted[h] != a.Count.Counted[h] {
			return src.Errorf("stratification.counted", "states %d counted items in stratum %s, but the planned design gives %d", st.Counted[h], st.Strata[h].Label, a.Count.Counted[h])
		}
	}
	if err := plan.CheckInt(src, "rule.acceptance_number", f.Rule.AcceptanceNumber, a.Count.Accept); err != nil {
		return err
	}
	if err := plan.CheckFloat(src, "rule.consumer_risk", f.Rule.ConsumerRisk, a.Count.ConsumerRiskBound()); err != nil {
		return err
	}
	switch {
	case f.Rule.ProducerRisk == nil && rates != nil:
		return src.Errorf("rule.producer_risk", "is missing, but the planned anticipated errors give %s", fmt.Sprint(a.ProducerRisk))
	case f.Rule.ProducerRisk != nil:
		return plan.CheckFloat(src, "rule.producer_risk", *f.Rule.ProducerRisk, a.ProducerRisk)
	}
	return nil
}
