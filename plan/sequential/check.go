package sequential

import (
	"errors"
	"fmt"

	"probity/plan"
)

// Check verifies the sequential section of a plan file that plan.File.Check
// has passed (so the section is there exactly when the design is
// sequential, and its fixed plan for comparison is the one the inputs
// give). The boundaries are not searched again — the search takes seconds
// for a large plan — but verified directly, which is as strict for what
// the plan promises:
//
//   - they are a well-formed truncated rule (see Validate) with the
//     truncation point T where the search puts it, n ≤ T ≤ 2n (and at most
//     the lot), n the fixed plan's sample size;
//   - the rule's sample size is T and its acceptance number a_T;
//   - by the exact dynamic programme (Evaluate), they accept a candidate at
//     the ceiling with probability at most the per-candidate risk, and
//     reject one at the anticipated error with probability at most the
//     producer's risk;
//   - the risks and the average sample numbers the file states are those
//     probabilities and averages, to the digits it holds.
//
// Errors are input errors naming the file, the field's line and the
// field (plan.Source.Errorf). A fixed plan (no section) passes.
func Check(f *plan.File, src *plan.Source) error {
	s := f.Sequential
	if s == nil {
		return nil
	}
	in := f.Inputs
	if in.Anticipated == nil {
		return src.Errorf("inputs.anticipated", "is missing: a sequential design is searched between the anticipated error and the ceiling")
	}
	if in.Method != plan.MethodUnset && in.Method != plan.MethodExact {
		return src.Errorf("inputs.method", "is %s: a sequential design uses the exact method", in.Method)
	}
	spec := Spec{
		Ceiling: in.Ceiling, Anticipated: *in.Anticipated,
		ConsumerRisk: f.Rule.PerCandidateRisk, ProducerRisk: in.ProducerRisk,
		FixedSampleSize: s.FixedSampleSize,
	}
	if in.Population > 0 {
		spec.Population, spec.BadLotErrors, spec.GoodLotErrors = in.Population, f.Rule.BadLotErrors, f.Rule.GoodLotErrors
	}
	if err := spec.validate(); err != nil {
		return src.Errorf("sequential.fixed_sample_size", "no sequential plan is made for these inputs: %v", errors.Unwrap(err))
	}
	if err := Validate(s); err != nil {
		var be *BoundError
		if errors.As(err, &be) {
			return src.Errorf("sequential."+be.Key, "%s", be.Msg)
		}
		return src.Errorf("sequential", "%v", err)
	}
	T, n := s.MaxSampleSize, s.FixedSampleSize
	top := 2 * n
	if in.Population > 0 && int64(top) > in.Population {
		top = int(in.Population)
	}
	if T < n || T > top {
		return src.Errorf("sequential.max_sample_size", "%d is outside [%d, %d], where the design puts the truncation point (from the fixed plan's %d labels to twice as many%s)",
			T, n, top, n, lotNote(in.Population))
	}
	if err := plan.CheckInt(src, "rule.sample_size", f.Rule.SampleSize, T); err != nil {
		return err
	}
	if err := plan.CheckInt(src, "rule.acceptance_number", f.Rule.AcceptanceNumber, s.AcceptIfErrorsAtMost[T-1]); err != nil {
		return err
	}
	good, bad := spec.models()
	b, err := newBounds(s)
	if err != nil {
		return src.Errorf("sequential", "%v", err)
	}
	pb, pg := b.evaluate(bad), b.evaluate(good)
	if pb.Accept > spec.ConsumerRisk {
		return src.Errorf("sequential.accept_if_errors_at_most", "the boundaries accept a candidate at the ceiling with probability %.6g, above the per-candidate risk %.6g",
			pb.Accept, spec.ConsumerRisk)
	}
	if pg.Reject > spec.ProducerRisk {
		return src.Errorf("sequential.reject_if_errors_at_least", "the boundaries reject a candidate at the anticipated error with probability %.6g, above the producer's risk %.6g",
			pg.Reject, spec.ProducerRisk)
	}
	if err := plan.CheckFloat(src, "rule.consumer_risk", f.Rule.ConsumerRisk, pb.Accept); err != nil {
		return err
	}
	if f.Rule.ProducerRisk == nil {
		return src.Errorf("rule.producer_risk", "is missing: the boundaries give %.6g", pg.Reject)
	}
	if err := plan.CheckFloat(src, "rule.producer_risk", *f.Rule.ProducerRisk, pg.Reject); err != nil {
		return err
	}
	if err := plan.CheckFloat(src, "sequential.asn_at_anticipated", s.ASNAtAnticipated, pg.ASN); err != nil {
		return err
	}
	return plan.CheckFloat(src, "sequential.asn_at_ceiling", s.ASNAtCeiling, pb.ASN)
}

func lotNote(population int64) string {
	if population > 0 {
		return fmt.Sprintf(", and no more than the lot of %d", population)
	}
	return ""
}
