package measure

import (
	"fmt"
	"testing"

	"probity/plan"
)

// The search's cost on realistic plans (go test -bench . -benchtime 3x
// ./plan/measure): the classifier of savings_test.go (100 000 decisions,
// 3 % positives) as a label-column candidate with all five measures, and
// as three threshold candidates with all five measures each (fifteen
// claims) on its four cells; and the label-column plan scaled to
// 10 000 000 decisions.

func labelColumnProblem(scale int64) Problem {
	p := binary(2858*scale, 97142*scale)
	pos := []int64{2726 * scale, 276 * scale}
	var claims []Claim
	for _, m := range Measures() {
		a, _ := trueValue(p, Claim{0, m, 0.5}, pos)
		claims = append(claims, Claim{0, m, savingsCeiling(a)})
	}
	return Problem{Population: p, Claims: claims, Anticipated: Composition{Positives: pos},
		Confidence: 0.95, Multiplicity: plan.Holm, ProducerRisk: 0.1}
}

func BenchmarkSearchLabelColumn(b *testing.B) {
	pr := labelColumnProblem(1)
	for b.Loop() {
		if _, err := Search(pr); err != nil {
			b.Fatal(err)
		}
	}
}

func BenchmarkSearchLabelColumn10M(b *testing.B) {
	pr := labelColumnProblem(100)
	for b.Loop() {
		if _, err := Search(pr); err != nil {
			b.Fatal(err)
		}
	}
}

func BenchmarkSearchThreeThresholds(b *testing.B) {
	cells, cc, _, err := Coarsen(banded(savingsBands, 2, 3, 4), Composition{Positives: savingsPositives})
	if err != nil {
		b.Fatal(err)
	}
	var claims []Claim
	for _, m := range Measures() {
		for j := range cells.Candidates {
			a, _ := trueValue(cells, Claim{j, m, 0.5}, cc.Positives)
			claims = append(claims, Claim{j, m, savingsCeiling(a)})
		}
	}
	pr := Problem{Population: cells, Claims: claims, Anticipated: cc, Confidence: 0.95, Multiplicity: plan.Holm, ProducerRisk: 0.1}
	for b.Loop() {
		if _, err := Search(pr); err != nil {
			b.Fatal(err)
		}
	}
}

// BenchmarkJudgeRatio: judging one miss-rate claim of the label-column
// plan (p-value and bound over its floor's lattice).
func BenchmarkJudgeRatio(b *testing.B) {
	pr := labelColumnProblem(1)
	pr.Claims = pr.Claims[1:2] // fnr
	res, err := Search(pr)
	if err != nil {
		b.Fatal(err)
	}
	cd := res.Design.Claims[0].ClaimDesign
	s := withPositives([]int{cd.Counted[0] - cd.BAccept, 9}, cd.Counted)
	for b.Loop() {
		if _, err := cd.Judge(pr.Population, s, res.Design.Level); err != nil {
			b.Fatal(err)
		}
	}
}

// demoSpec is the demo's weld-scan plan with measures: three thresholds,
// fnr below 0.20 and error below 0.02 for each, 240 000 decisions at 3 %
// prevalence, with the anticipated values given.
func demoSpec(anticipated ...string) (Spec, *plan.File) {
	th := func(v float64) *float64 { return &v }
	var cands []plan.Candidate
	for _, t := range []float64{0.35, 0.50, 0.65} {
		cands = append(cands, plan.Candidate{Name: "defect_score>=" + fmtFloat(t), ScoreColumn: "defect_score", Threshold: th(t), Positive: "defect", Negative: "sound"})
	}
	spec := Spec{Candidates: cands, Positive: "defect", Prevalence: 0.03, Decisions: 240000, Anticipated: anticipated,
		Confidence: 0.95, ProducerRisk: 0.1, Multiplicity: plan.Bonferroni, Release: "best:fnr"}
	for _, m := range []string{"fnr", "error"} {
		for _, c := range cands {
			ceiling := 0.2
			if m == "error" {
				ceiling = 0.02
			}
			spec.Claims = append(spec.Claims, plan.MeasureClaim{Candidate: c.Name, Measure: m, Ceiling: ceiling})
		}
	}
	f := &plan.File{Candidates: cands, Inputs: plan.Inputs{Confidence: 0.95, ProducerRisk: 0.1, Multiplicity: plan.Bonferroni}}
	return spec, f
}

// demoNovember is the demo's November log drawn with --strata section:
// four sections crossed with the four score bands (manifest.json's
// strata).
func demoNovember() ([]Stratum, [][]bool) {
	sizes := [][4]int64{{41437, 1349, 426, 1345}, {101771, 3080, 762, 2087}, {79171, 2411, 686, 1822}, {3310, 123, 42, 178}}
	var strata []Stratum
	var flagged [][]bool
	for u, row := range sizes {
		for i, n := range row {
			strata = append(strata, Stratum{Label: fmt.Sprintf("%d|%d", u, i), Population: n})
			flagged = append(flagged, []bool{i >= 1, i >= 2, i >= 3})
		}
	}
	return strata, flagged
}

// BenchmarkPeriodDesignDemo sizes the demo's plan on its November log's
// sixteen strata (what draw does).
func BenchmarkPeriodDesignDemo(b *testing.B) {
	spec, f := demoSpec("fnr:0.10", "error:0.01")
	m, err := BuildPlan(spec)
	if err != nil {
		b.Fatal(err)
	}
	f.Measures = m
	strata, flagged := demoNovember()
	var pd *PeriodDesign
	for b.Loop() {
		if pd, err = NewPeriodDesign(f, strata, flagged); err != nil {
			b.Fatal(err)
		}
	}
	b.ReportMetric(float64(m.Design.Total), "plan-labels")
	b.ReportMetric(float64(sum(pd.Sample)), "draw-labels")
}

// BenchmarkPeriodDesignDemoRealistic is BenchmarkPeriodDesignDemo with
// anticipated values near the November log's true ones (one per
// threshold).
func BenchmarkPeriodDesignDemoRealistic(b *testing.B) {
	spec, f := demoSpec("fnr:0.035,0.11,0.25", "error:0.032,0.007,0.008")
	m, err := BuildPlan(spec)
	if err != nil {
		b.Fatal(err)
	}
	f.Measures = m
	strata, flagged := demoNovember()
	var pd *PeriodDesign
	for b.Loop() {
		if pd, err = NewPeriodDesign(f, strata, flagged); err != nil {
			b.Fatal(err)
		}
	}
	b.ReportMetric(float64(m.Design.Total), "plan-labels")
	b.ReportMetric(float64(sum(pd.Sample)), "draw-labels")
}
