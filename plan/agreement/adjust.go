package agreement

import (
	"fmt"
	"slices"

	"probity/plan/record"
	"probity/plan/verdict"
	"probity/sampling/drawfolder"
)

// A record judged on double labels uses Resolve's final labels in two
// steps around the checks of the labeled worksheet against the draw
// (package plan/record/intake), which decide which items are judged
// (spares replace unlabeled and unsure items):
//
//  1. Relabel gives those checks the first worksheet with each item's
//     final label;
//  2. Judged marks, among the items they return, the disagreements left
//     unadjudicated as errors for every candidate, and completes the
//     label-quality summary.

// Relabel returns a copy of first (the labeled worksheet Resolve read, in
// the same order) whose label cells hold each item's final label, so that
// the checks of the worksheet see the labels the judgement uses. An item
// whose disagreement counts as an error keeps a class label here — its
// first label when that is a class, else its second — so that it is
// neither replaced by a spare nor called unlabeled; Judged then marks it.
func (r *Result) Relabel(first, second []drawfolder.WorksheetRow, classes []string) []drawfolder.WorksheetRow {
	secondLabel := make(map[int]string, len(second))
	for _, s := range second {
		secondLabel[s.Item] = s.Label
	}
	out := slices.Clone(first)
	for i := range out {
		fin := r.Labels[i]
		if fin.CountsAsError() {
			out[i].Label = firstClass(classes, out[i].Label, secondLabel[fin.Item])
			continue
		}
		out[i].Label = fin.Label
	}
	return out
}

// firstClass returns the first of labels that is a class (classes[0] when
// none is).
func firstClass(classes []string, labels ...string) string {
	for _, l := range labels {
		if c, k := drawfolder.ParseLabel(l, classes); k == drawfolder.LabelClass {
			return c
		}
	}
	return classes[0]
}

// Judged takes the items the worksheet checks returned for judgement
// (from the relabeled worksheet) with their deviations, marks as Missing —
// an error for every candidate — each item whose disagreement was left
// unadjudicated, and says so among dev's notes. It returns the
// label-quality summary for record.json, with UnsureTreatment filled in
// from ledger (which items are spares) and the items; the fingerprints of
// the second worksheet and the adjudications are left to the caller. An
// item to be marked that is not among items is an error in the caller's
// use of the package, not in the input.
func (r *Result) Judged(items []verdict.Item, dev *record.Deviations, ledger []drawfolder.LedgerRow) (*record.LabelQuality, error) {
	counted := map[string]bool{}
	for _, f := range r.Labels {
		if f.CountsAsError() {
			counted[f.RecordID] = true
		}
	}
	marked := 0
	for i := range items {
		if counted[items[i].RecordID] {
			items[i].Missing = true
			marked++
		}
	}
	if marked != len(counted) {
		return nil, fmt.Errorf("agreement: %d unadjudicated items to count as errors, %d found among the judged items", len(counted), marked)
	}
	if marked > 0 {
		note := fmt.Sprintf("%d doubled items whose two labels disagree were not adjudicated and were counted as errors for every candidate (unadjudicated disagreements allowed)", marked)
		if marked == 1 {
			note = "1 doubled item whose two labels disagree was not adjudicated and was counted as an error for every candidate (unadjudicated disagreements allowed)"
		}
		dev.Notes = append(dev.Notes, note)
	}
	q := r.Quality
	q.UnsureTreatment = unsureTreatment(items, dev, ledger)
	return &q, nil
}

// unsureTreatment says what the judgement did with the items whose final
// label is unsure: main items replaced by a spare, or (incomplete labeling
// allowed) counted as errors; and spares also marked unsure.
func unsureTreatment(items []verdict.Item, dev *record.Deviations, ledger []drawfolder.LedgerRow) string {
	spare := map[string]bool{}
	for _, r := range ledger {
		spare[r.RecordID] = r.Spare
	}
	missing := map[string]bool{}
	for _, it := range items {
		if it.Missing {
			missing[it.RecordID] = true
		}
	}
	unsure, replaced, spares := 0, 0, 0
	for _, id := range dev.Unsure {
		switch {
		case spare[id]:
			spares++
		case missing[id]:
			unsure++
		default:
			unsure++
			replaced++
		}
	}
	s := UnsureTreatment(unsure, replaced, dev.AllowIncomplete)
	switch {
	case spares == 1:
		s += "; 1 spare was also marked unsure and passed over"
	case spares > 1:
		s += fmt.Sprintf("; %d spares were also marked unsure and passed over", spares)
	}
	return s
}
