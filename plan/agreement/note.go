package agreement

import (
	"fmt"
	"strings"

	"probity/plan"
	"probity/plan/numfmt"
	"probity/plan/record"
)

// fillDisagreement sets the disagreement rate of the compared items, its
// one-sided Clopper–Pearson upper bound at conf, and the plain-words note
// (which compares label error with ceiling when ceiling > 0).
func fillDisagreement(q *record.LabelQuality, tb *Table, conf, ceiling float64) {
	q.Disagreed = tb.N() - tb.Agreed()
	if n := tb.N(); n > 0 {
		q.DisagreementRate = float64(q.Disagreed) / float64(n)
		q.DisagreementUpper = plan.ClopperPearsonUpper(q.Disagreed, n, conf)
	}
	q.Note = labelErrorNote(q, conf, ceiling)
}

// labelErrorNote explains, with the record's numbers, what wrong reference
// labels do to the bound. The reasoning (common practice, no source): an
// item whose reference label is wrong can hide a real error or add a false
// one, so a share ε of wrong labels moves the measured error rate by at
// most ε either way; when two independent labels differ at least one is
// wrong, so the mean error rate of the two labelers is at least half their
// disagreement rate (agreement cannot show that both are right).
func labelErrorNote(q *record.LabelQuality, conf, ceiling float64) string {
	var b strings.Builder
	b.WriteString("The reference labels are taken as the truth. An item whose reference label is wrong can hide a real error or add a false one, so if a share ε of the labels is wrong the true error rate can differ from the measured one by up to ε, and every upper bound in this record holds only within that margin. ")
	if q.Compared == 0 {
		b.WriteString("No doubled item was put in a class by both labelers, so this record has no measure of label error.")
		return b.String()
	}
	fmt.Fprintf(&b, "On the %d doubled items both labelers put in a class they disagreed on %d (%s; one-sided %s upper bound %s). ",
		q.Compared, q.Disagreed, numfmt.Rate(q.DisagreementRate), numfmt.Confidence(conf), numfmt.RateUp(q.DisagreementUpper))
	if q.Disagreed > 0 {
		fmt.Fprintf(&b, "At least one of two differing labels is wrong, so a single labeler was wrong on at least %s of items on average", numfmt.RateDown(q.DisagreementRate/2))
		if ceiling > 0 {
			fmt.Fprintf(&b, ", against an error ceiling of %s", numfmt.Setting(ceiling))
			if q.DisagreementRate/2 >= ceiling/4 {
				b.WriteString(": label error of this size is not small beside the ceiling")
			}
		}
		b.WriteString("; ")
	} else {
		b.WriteString("Full agreement does not prove the labels right: ")
	}
	b.WriteString("two labelers can also agree on a wrong label, so the real label error may be larger. ")
	switch {
	case q.Unadjudicated > 0:
		fmt.Fprintf(&b, "%d disagreements were not adjudicated and are counted as errors for every candidate, which can only raise the bounds.", q.Unadjudicated)
	case q.Adjudicated > 0:
		b.WriteString("Disagreements were settled by adjudication; the items labeled once carry a single labeler's error.")
	default:
		b.WriteString("The items labeled once carry a single labeler's error.")
	}
	return b.String()
}

// UnsureTreatment says in words what the judgement did with the items
// whose final label is unsure: replaced by spares (replaced of them, in
// draw order) and, when incomplete labeling is allowed, the rest counted as errors for
// every candidate.
func UnsureTreatment(unsure, replaced int, allowIncomplete bool) string {
	switch {
	case unsure == 0:
		return "none"
	case replaced >= unsure:
		return fmt.Sprintf("all %d replaced by spares, in draw order", unsure)
	case allowIncomplete && replaced > 0:
		return fmt.Sprintf("%d replaced by spares, in draw order; the other %d counted as errors for every candidate (incomplete labeling allowed)", replaced, unsure-replaced)
	case allowIncomplete:
		return fmt.Sprintf("all %d counted as errors for every candidate (incomplete labeling allowed)", unsure)
	case replaced > 0:
		return fmt.Sprintf("%d replaced by spares, in draw order; %d not replaced", replaced, unsure-replaced)
	default:
		return fmt.Sprintf("%d not replaced", unsure)
	}
}
