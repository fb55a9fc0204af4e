package measure

import (
	"fmt"
	"math"
	"slices"
	"testing"

	"probity/plan"
)

// TestPeriodDesignSplitsTheCells: on a period whose cells are crossed
// with three user strata of unequal sizes, the design is the cells'
// split in proportion, each claim counts no more than the sample holds,
// the level is the family's share δ/K, and the producer's risk reported
// is the exact one on these strata.
func TestPeriodDesignSplitsTheCells(t *testing.T) {
	th := func(v float64) *float64 { return &v }
	cands := []plan.Candidate{
		{Name: "s>=0.35", ScoreColumn: "s", Threshold: th(0.35), Positive: "pos", Negative: "neg"},
		{Name: "s>=0.65", ScoreColumn: "s", Threshold: th(0.65), Positive: "pos", Negative: "neg"},
	}
	spec := Spec{Candidates: cands, Positive: "pos", Prevalence: 0.03, Decisions: 100000,
		Anticipated: []string{"fnr:0.02,0.15", "fpr:0.05,0.002"},
		Claims: []plan.MeasureClaim{{Candidate: "s>=0.35", Measure: "fnr", Ceiling: 0.3}, {Candidate: "s>=0.65", Measure: "fnr", Ceiling: 0.3},
			{Candidate: "s>=0.35", Measure: "error", Ceiling: 0.1}, {Candidate: "s>=0.65", Measure: "error", Ceiling: 0.1}},
		Confidence: 0.95, ProducerRisk: 0.1, Multiplicity: plan.Bonferroni}
	m, err := BuildPlan(spec)
	if err != nil {
		t.Fatal(err)
	}
	f := &plan.File{Candidates: cands, Inputs: plan.Inputs{Confidence: 0.95, ProducerRisk: 0.1, Multiplicity: plan.Bonferroni}, Measures: m}
	// three user strata of 60 %, 30 % and 10 % of each cell
	var strata []Stratum
	var flagged [][]bool
	for i, c := range m.Cells {
		for u, share := range []float64{0.6, 0.3, 0.1} {
			strata = append(strata, Stratum{Label: c.Label + "|" + string(rune('a'+u)), Population: int64(math.Round(share * float64(c.Decisions)))})
			flagged = append(flagged, []bool{i >= 1, i >= 2})
		}
	}
	pd, err := NewPeriodDesign(f, strata, flagged)
	if err != nil {
		t.Fatal(err)
	}
	for h, s := range strata {
		if pd.Sample[h] < 1 || int64(pd.Sample[h]) > s.Population {
			t.Errorf("stratum %s: %d labels of %d", s.Label, pd.Sample[h], s.Population)
		}
	}
	for i, cd := range pd.Claims {
		for h, k := range cd.Counted {
			if k > pd.Sample[h] {
				t.Errorf("claim %d counts %d of stratum %s's %d labels", i, k, strata[h].Label, pd.Sample[h])
			}
		}
		pw, err := cd.AcceptProbability(pd.Problem.Population, pd.Problem.Anticipated, pd.Level)
		if err != nil {
			t.Fatal(err)
		}
		if math.Abs((1-pw)-pd.ProducerRisk[i]) > 1e-12 {
			t.Errorf("claim %d: reported producer's risk %v, exact %v", i, pd.ProducerRisk[i], 1-pw)
		}
		// every claim is planned here (each anticipated value is below its
		// ceiling), so each must meet the plan's producer's risk exactly
		if pd.ProducerRisk[i] > 0.1 {
			t.Errorf("claim %d (%s of %s): exact producer's risk %v above the target 0.1", i, cd.Measure, cands[cd.Candidate].Name, pd.ProducerRisk[i])
		}
	}
	if len(pd.Unplanned) != 0 {
		t.Errorf("unplanned claims %v: every claim's anticipated value is below its ceiling", pd.Unplanned)
	}
	if math.Abs(pd.Level-0.05/4) > 1e-15 {
		t.Errorf("level %v, want δ/4", pd.Level)
	}
}

// TestRatioPowerIsAcceptProbability: the search's cached arithmetic gives
// AcceptProbability's power (to 1e-12) on a grid of sub-samples and c_B.
func TestRatioPowerIsAcceptProbability(t *testing.T) {
	// six score bands, thresholds from band C and from band E: each
	// side of each claim has several strata (the count rule's tails)
	p := banded([]int64{3000, 2000, 400, 250, 150, 100}, 2, 4)
	comp := Composition{Positives: []int64{6, 8, 20, 30, 60, 50}}
	pr := Problem{Population: p, Anticipated: comp}
	for _, c := range []Claim{{Candidate: 0, Measure: FNR, Ceiling: 0.3}, {Candidate: 1, Measure: FPR, Ceiling: 0.1}} {
		d := ClaimDesign{Claim: c, Floor: 20}
		ev, err := newRatioPower(pr, d, 0.0125)
		if err != nil {
			t.Fatal(err)
		}
		a, b := d.sides(p)
		for _, ma := range []int{5, 40, 120} {
			for _, mb := range []int{3, 30} {
				for cb := 0; cb <= mb; cb += 4 {
					cd := ClaimDesign{Claim: c, Counted: ProportionalCounts(p, a.strata, ma), Floor: 20, BAccept: cb}
					proportional(p, b.strata, mb, cd.Counted)
					want, err := cd.AcceptProbability(p, comp, 0.0125)
					if err != nil {
						t.Fatal(err)
					}
					if got := ev.power(ma, mb, cb); math.Abs(got-want) > 1e-12 {
						t.Errorf("%v m_a=%d m_b=%d c_B=%d: %v, AcceptProbability %v", c.Measure, ma, mb, cb, got, want)
					}
				}
			}
		}
	}
}

// TestPeriodDesignKeepsThePlan: on a log whose bands hold what the plan
// anticipated, split over four user strata (45, 30, 20 and 5 % of each
// band), the draw's labels are within 1.25 times the plan's — the user
// strata move each side from the hypergeometric test to the count rule,
// which costs a little power — every planned claim meets the producer's
// risk, the expected failures stay unplanned, and the log is not reported
// as departing from the plan. A plan whose equal values for every
// threshold leave the middle bands empty is reported as departing on the
// demo's November log.
func TestPeriodDesignKeepsThePlan(t *testing.T) {
	spec, f := demoSpec("fnr:0.035,0.11,0.25", "error:0.032,0.007,0.008")
	m, err := BuildPlan(spec)
	if err != nil {
		t.Fatal(err)
	}
	f.Measures = m
	var strata []Stratum
	var flagged [][]bool
	for u, share := range []float64{0.45, 0.30, 0.20, 0.05} {
		for i, c := range m.Cells {
			strata = append(strata, Stratum{Label: fmt.Sprintf("%d|%s", u, c.Label), Population: int64(math.Round(share * float64(c.Decisions)))})
			flagged = append(flagged, []bool{i >= 1, i >= 2, i >= 3})
		}
	}
	pd, err := NewPeriodDesign(f, strata, flagged)
	if err != nil {
		t.Fatal(err)
	}
	if r := float64(sum(pd.Sample)) / float64(m.Design.Total); r < 1 || r > 1.25 {
		t.Errorf("the draw labels %d, the plan %d: ratio %.3f, want within [1, 1.25]", sum(pd.Sample), m.Design.Total, r)
	}
	if pd.Departure != nil {
		t.Errorf("a log with the plan's shares departs: %+v", *pd.Departure)
	}
	for i, c := range m.Claims {
		unplanned := slices.Contains(pd.Unplanned, i)
		if unplanned != c.Unplanned {
			t.Errorf("claim %d (%s of %s): unplanned %v on the log, %v in the plan", i, c.Measure, c.Candidate, unplanned, c.Unplanned)
		}
		if !unplanned && pd.ProducerRisk[i] > 0.1 {
			t.Errorf("claim %d (%s of %s): producer's risk %v on the log", i, c.Measure, c.Candidate, pd.ProducerRisk[i])
		}
	}

	spec, f = demoSpec("fnr:0.10", "error:0.01")
	if f.Measures, err = BuildPlan(spec); err != nil {
		t.Fatal(err)
	}
	nov, novFlagged := demoNovember()
	pd, err = NewPeriodDesign(f, nov, novFlagged)
	if err != nil {
		t.Fatal(err)
	}
	if d := pd.Departure; d == nil || d.Cell != "0.35<=defect_score<0.5" || d.Log < 0.02 || d.Plan > 0.0001 {
		t.Errorf("departure %+v, want the band 0.35<=defect_score<0.5 at about 2.9 %% of the log against almost none in the plan", d)
	}
}
