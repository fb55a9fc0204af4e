package assemble

import (
	"strings"
	"testing"

	"probity/plan/record"
)

// TestCaveats: the label error the doubled items show qualifies an
// accepted candidate whose margin it consumes (the case: a single
// labeler wrong on at least 1.7 % of items against a 2 % ceiling), and a
// safety use without double labeling says label error was not measured.
func TestCaveats(t *testing.T) {
	rec := &record.Record{Use: "general", Plan: record.PlanInfo{Ceiling: 0.02},
		Candidates: []record.Candidate{
			{Name: "close", Verdict: record.Accept, Estimate: 0.0064, UpperBound: 0.0119},
			{Name: "clear", Verdict: record.Accept, Estimate: 0.0001, UpperBound: 0.0010},
			{Name: "rejected", Verdict: record.Reject, Estimate: 0.03, UpperBound: 0.04},
		},
		LabelQuality: &record.LabelQuality{Compared: 60, Disagreed: 2, DisagreementRate: 2.0 / 60},
	}
	got := caveats(rec)
	if len(got) != 1 || got[0].Candidate != "close" || got[0].Kind != record.CaveatLabelErrorMargin {
		t.Fatalf("%+v", got)
	}
	for _, want := range []string{"close is accepted with an upper bound of 1.190 % against the ceiling 2 %",
		"wrong on at least 1.666 % of items", "margin of 0.810 %", "even the distance of 1.360 % from its estimate 0.640 %"} {
		if !strings.Contains(got[0].Text, want) {
			t.Errorf("caveat lacks %q: %s", want, got[0].Text)
		}
	}
	// Less label error: the bound's margin is consumed, not the estimate's.
	rec.LabelQuality.DisagreementRate = 2 * 0.0090
	if got := caveats(rec); len(got) != 1 || !strings.Contains(got[0].Text, "holds only if the reference labels are better") {
		t.Errorf("%+v", got)
	}
	// No disagreement, no caveat; nor for a general use without doubles.
	rec.LabelQuality.DisagreementRate = 0
	if got := caveats(rec); len(got) != 0 {
		t.Errorf("%+v", got)
	}
	rec.LabelQuality = nil
	if got := caveats(rec); len(got) != 0 {
		t.Errorf("%+v", got)
	}
	for _, use := range []string{"safety", "medical", "vehicle"} {
		rec.Use = use
		got := caveats(rec)
		if len(got) != 1 || got[0].Kind != record.CaveatLabelErrorUnmeasured || !strings.Contains(got[0].Text, "Label error was not measured: no item was given a second") {
			t.Errorf("%s: %+v", use, got)
		}
	}
}

// TestMeasureCaveats: in a record of measures the label error is weighed
// against each accepted claim's margin scaled by its group's share — a
// miss rate among 3 % positives is moved by ε/0.03 — and the record's
// overall-error figures are not used. Hand-worked: ε = (2/60)/2 = 1/60;
// fnr's group is (TP+FN)/N = 300/10 000 = 3 %, ε/s = 0.5556 ≥ the margin
// 0.20 − 0.15; error's group is everything, ε = 1.667 % < 0.02 − 0.001.
func TestMeasureCaveats(t *testing.T) {
	rec := &record.Record{Use: "general", Plan: record.PlanInfo{Ceiling: 0.02},
		Candidates: []record.Candidate{{Name: "t50", Verdict: record.Accept, Estimate: 0.001, UpperBound: 0.0199}},
		Measures: []record.MeasureVerdict{
			{Candidate: "t50", Measure: "fnr", Ceiling: 0.20, UpperBound: 0.15, Verdict: record.Accept},
			{Candidate: "t50", Measure: "error", Ceiling: 0.02, UpperBound: 0.001, Verdict: record.Accept},
			{Candidate: "t50", Measure: "fdr", Ceiling: 0.02, UpperBound: 0.9, Verdict: record.Reject},
		},
		EstimatedConfusion: []record.EstimatedConfusion{{Candidate: "t50", TP: 270, FN: 30, FP: 200, TN: 9500}},
		LabelQuality:       &record.LabelQuality{Compared: 60, Disagreed: 2, DisagreementRate: 2.0 / 60},
	}
	got := caveats(rec)
	if len(got) != 1 || got[0].Candidate != "t50" || got[0].Kind != record.CaveatLabelErrorMargin {
		t.Fatalf("%+v", got)
	}
	for _, want := range []string{"fnr of t50 is accepted with an upper bound of 15.000 % against the ceiling 20 %", "the true positives are an estimated 3.000 %",
		"could move fnr by about 55.555 %", "margin of 5.000 %"} {
		if !strings.Contains(got[0].Text, want) {
			t.Errorf("caveat lacks %q: %s", want, got[0].Text)
		}
	}
	// A claim whose margin exceeds ε/s gets no caveat.
	rec.Measures[0].UpperBound = 0.01
	rec.LabelQuality.DisagreementRate = 2 * 0.001 // ε/s = 0.0333 < 0.19
	if got := caveats(rec); len(got) != 0 {
		t.Errorf("%+v", got)
	}
}
