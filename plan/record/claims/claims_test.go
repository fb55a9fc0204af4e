package claims

import (
	"fmt"
	"math"
	"testing"

	"probity/plan"
	"probity/plan/record"
	"probity/plan/verdict"
	"probity/sampling/drawfolder"
)

// fixture is an invented period: two label-column candidates, A flagging
// the decisions of stratum 1, B those of strata 1 and 2; stratum 0 is
// cleared by both.
type fixture struct {
	plan     *plan.File
	manifest *drawfolder.Manifest
	items    []verdict.Item
}

// newFixture labels s1 of stratum 1's 60 items negative (false alarms of
// both), s2 of stratum 2's 30 (false alarms of B, correct clears of A)
// and s0 of stratum 0's 100 positive (misses of both).
func newFixture(mult plan.Multiplicity, release string, s0, s1, s2 int) fixture {
	p := &plan.File{
		Candidates: []plan.Candidate{{Name: "A", Column: "pred_a"}, {Name: "B", Column: "pred_b"}},
		Inputs:     plan.Inputs{Confidence: 0.95, Multiplicity: mult},
		Measures: &plan.Measures{Positive: "pos", Release: release, Claims: []plan.MeasureClaim{
			{Candidate: "A", Measure: "fdr", Ceiling: 0.2}, {Candidate: "B", Measure: "fdr", Ceiling: 0.2},
			{Candidate: "A", Measure: "fnr", Ceiling: 0.5}, {Candidate: "B", Measure: "fnr", Ceiling: 0.5},
		}},
	}
	m := &drawfolder.Manifest{
		Strata: []drawfolder.StratumInfo{{Label: "none", Population: 5000, Sample: 100}, {Label: "A+B", Population: 400, Sample: 60}, {Label: "B", Population: 200, Sample: 30}},
		Measures: &drawfolder.MeasuresInfo{Positive: "pos", Flagged: [][]bool{{false, false}, {true, true}, {false, true}}, Claims: []drawfolder.MeasureClaimInfo{
			{Candidate: "A", Measure: "fdr", Ceiling: 0.2, Counted: []int{0, 60, 0}, Planned: true},
			{Candidate: "B", Measure: "fdr", Ceiling: 0.2, Counted: []int{0, 60, 30}, Planned: true},
			{Candidate: "A", Measure: "fnr", Ceiling: 0.5, Counted: []int{97, 60, 4}, Floor: 150, BAccept: 30, Planned: true},
			{Candidate: "B", Measure: "fnr", Ceiling: 0.5, Counted: []int{100, 60, 30}, Floor: 200, BAccept: 35, Planned: true},
		}},
	}
	preds := [][]string{{"neg", "neg"}, {"pos", "pos"}, {"neg", "pos"}}
	var items []verdict.Item
	for h, st := range m.Strata {
		odd := []int{s0, s1, s2}[h] // items labeled against the stratum's usual truth
		for i := range st.Sample {
			label := "neg"
			if h == 1 || h == 2 {
				label = "pos"
			}
			if i < odd {
				label = map[string]string{"neg": "pos", "pos": "neg"}[label]
			}
			items = append(items, verdict.Item{RecordID: fmt.Sprintf("r%d-%d", h, i), Stratum: h, Label: label, Predictions: preds[h]})
		}
	}
	return fixture{p, m, items}
}

func TestJudgeBonferroniMatchesReferences(t *testing.T) {
	f := newFixture(plan.Bonferroni, "best:fdr", 1, 4, 5)
	res, err := Judge(f.plan, f.manifest, f.items)
	if err != nil {
		t.Fatal(err)
	}
	// fdr of A: one stratum, the hypergeometric test of D* = 80 negatives
	// among 400 after 4 in 60: scipy.stats.hypergeom.cdf(4, 400, 80, 60)
	// (scipy 1.11), relative tolerance 1e-9.
	a := res.Measures[0]
	if want := 0.002209027152706242; math.Abs(a.PValue-want) > 1e-9*want {
		t.Errorf("fdr of A: p-value %v, want %v (scipy)", a.PValue, want)
	}
	if math.Abs(a.Level-0.05/4) > 1e-15 || a.Verdict != record.Accept || a.Labeled != 60 || a.Events != 4 {
		t.Errorf("fdr of A: %+v", a)
	}
	if a.Estimate == nil || math.Abs(*a.Estimate-4.0/60) > 1e-12 {
		t.Errorf("fdr of A: estimate %v, want 4/60 (hand)", a.Estimate)
	}
	// every claim as plan/measure judges it at δ/K, its one home
	pop, _ := Population(f.plan, f.manifest)
	designs, _, _ := Designs(f.plan, f.manifest)
	s, _ := Sample(f.plan, pop, f.items)
	for i, d := range designs {
		v, err := d.Judge(pop, s, 0.05/4)
		if err != nil {
			t.Fatal(err)
		}
		got := res.Measures[i]
		if got.PValue != v.PValue || got.UpperBound != v.Upper || (got.Verdict == record.Accept) != v.Accepted {
			t.Errorf("claim %d: record %+v, plan/measure %+v", i, got, v)
		}
	}
	// B's weighted fdr: (400·4/60 + 200·5/30)/600 = 0.1 (hand), above A's
	// 4/60, so best:fdr releases A when both are accepted
	if b := res.Measures[1]; b.Estimate == nil || math.Abs(*b.Estimate-0.1) > 1e-12 {
		t.Errorf("fdr of B: estimate %v, want 0.1 (hand)", b.Estimate)
	}
	if res.Accepted[0] && res.Released != "A" {
		t.Errorf("released %q, want A (accepted %v)", res.Released, res.Accepted)
	}
	// the estimated confusion of A: FP = 400·4/60, TP = 400·56/60,
	// FN = 5000·1/100 + 200·25/30 (stratum 2 is cleared by A) (hand)
	c := res.Confusions[0]
	if math.Abs(c.FP-400*4.0/60) > 1e-9 || math.Abs(c.FN-(50+200*25.0/30)) > 1e-9 || math.Abs(c.TP-400*56.0/60) > 1e-9 {
		t.Errorf("confusion of A: %+v", c)
	}
}

func TestJudgeHolmStepLevels(t *testing.T) {
	f := newFixture(plan.Holm, "", 1, 4, 5)
	res, err := Judge(f.plan, f.manifest, f.items)
	if err != nil {
		t.Fatal(err)
	}
	// sorted by p-value, the claim at step i is judged at δ/(K − i) and,
	// after the first rejection, nothing more is accepted (Holm 1979)
	order := []int{0, 1, 2, 3}
	for i := range order {
		for j := i + 1; j < len(order); j++ {
			if res.Measures[order[j]].PValue < res.Measures[order[i]].PValue {
				order[i], order[j] = order[j], order[i]
			}
		}
	}
	stopped := false
	for step, i := range order {
		v := res.Measures[i]
		if want := 0.05 / float64(4-step); math.Abs(v.Level-want) > 1e-15 {
			t.Errorf("step %d (%s of %s): level %v, want %v", step, v.Measure, v.Candidate, v.Level, want)
		}
		accepted := v.PValue <= v.Level && !stopped
		if (v.Verdict == record.Accept) != accepted {
			t.Errorf("step %d: verdict %s with p-value %v at %v", step, v.Verdict, v.PValue, v.Level)
		}
		stopped = stopped || !accepted
	}
}

func TestReleaseNamesNoneWhenNothingQualifies(t *testing.T) {
	// 20 of A's and B's 60 flagged items are false alarms: fdr about 1/3,
	// above the ceiling 0.2, so neither candidate is accepted
	for _, rule := range []string{"best:fdr", "A", "B"} {
		f := newFixture(plan.Bonferroni, rule, 1, 20, 5)
		res, err := Judge(f.plan, f.manifest, f.items)
		if err != nil {
			t.Fatal(err)
		}
		if res.Accepted[0] || res.Accepted[1] || res.Released != "" {
			t.Errorf("release %s: accepted %v, released %q, want none", rule, res.Accepted, res.Released)
		}
	}
	// a named candidate is released only when it is accepted
	f := newFixture(plan.Bonferroni, "B", 1, 4, 5)
	res, _ := Judge(f.plan, f.manifest, f.items)
	if want := map[bool]string{true: "B", false: ""}[res.Accepted[1]]; res.Released != want {
		t.Errorf("release B: released %q with B accepted %v", res.Released, res.Accepted[1])
	}
}
