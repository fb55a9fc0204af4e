package measure

import (
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
