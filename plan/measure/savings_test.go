package measure

import (
	"fmt"
	"math"
	"strconv"
	"strings"
	"testing"

	"probity/plan"
)

// The savings table of the closing note: an invented classifier of
// 100 000 decisions a period with 3 % true positives, its scores in five
// bands (from a binormal model: negatives' logit score N(−3, 1),
// positives' N(1.6, 1.2)):
//
//	band          [0, .05)  [.05, .2)  [.2, .5)  [.5, .8)  [.8, 1]
//	decisions       50 649     41 200     5 293     1 145    1 713
//	true positives       3         19       254     1 014    1 712
//
// Four views of it:
//
//   - label column: one model, the threshold 0.5 applied upstream; its
//     strata are its two predicted classes;
//   - one threshold: the threshold candidate 0.5 on a sample stratified by
//     the five bands;
//   - three thresholds: the candidates 0.2, 0.5 and 0.8 judged on one
//     sample stratified by the five bands, each measure claimed for all
//     three (a family of three, Bonferroni);
//   - three, cells: the same family on the four cells the thresholds cut
//     (Coarsen merges the two bands below 0.2).
//
// Each claim's ceiling is min(max(2a, a + 0.01), (1 + a)/2) for its
// anticipated value a, to two significant digits.
var (
	savingsBands     = []int64{50649, 41200, 5293, 1145, 1713}
	savingsPositives = []int64{3, 19, 254, 1014, 1712}
)

func savingsCeiling(a float64) float64 {
	c := math.Min(math.Max(2*a, a+0.01), (1+a)/2)
	v, _ := strconv.ParseFloat(strconv.FormatFloat(c, 'g', 2, 64), 64) // two significant digits
	return v
}

// savingsView is one view: a population, its composition and its claims
// for a measure.
type savingsView struct {
	name   string
	pop    Population
	pos    []int64
	claims func(m Measure) []Claim
}

func savingsViews(t *testing.T) []savingsView {
	label, lc, _, err := Coarsen(banded(savingsBands, 3), Composition{Positives: savingsPositives})
	if err != nil {
		t.Fatal(err)
	}
	three := banded(savingsBands, 2, 3, 4)
	cells, cc, _, err := Coarsen(three, Composition{Positives: savingsPositives})
	if err != nil {
		t.Fatal(err)
	}
	one := banded(savingsBands, 3)
	claimsFor := func(p Population, pos []int64) func(Measure) []Claim {
		return func(m Measure) []Claim {
			var out []Claim
			for j := range p.Candidates {
				a, _ := trueValue(p, Claim{j, m, 0.5}, pos)
				out = append(out, Claim{j, m, savingsCeiling(a)})
			}
			return out
		}
	}
	return []savingsView{
		{"label column", label, lc.Positives, claimsFor(label, lc.Positives)},
		{"one threshold, 5 bands", one, savingsPositives, claimsFor(one, savingsPositives)},
		{"three thresholds, 5 bands", three, savingsPositives, claimsFor(three, savingsPositives)},
		{"three thresholds, cells", cells, cc.Positives, claimsFor(cells, cc.Positives)},
	}
}

// savingsWant locks the table (design and uniform labels per view, in the
// order of savingsViews); after a deliberate change, read the logged table
// and update it.
var savingsWant = map[Measure][8]int{
	Error: {749, 749, 750, 750, 1080, 1080, 1080, 1080},
	FNR:   {3658, 3663, 4099, 4268, 41060, 42747, 33345, 34267},
	FPR:   {20, 351, 27, 471, 38, 615, 38, 615},
	FOR:   {593, 611, 595, 613, 1031, 1049, 1030, 1048},
	FDR:   {244, 8504, 247, 8585, 640, 27791, 640, 27791},
}

// TestSavingsTable: for each measure and view, the labels the design
// needs and what a uniform sample (proportional allocation, the same rules
// and risks) needs; confidence 0.95, producer's risk 0.1 per claim at the
// anticipated composition. The design is never larger than the uniform
// sample.
func TestSavingsTable(t *testing.T) {
	views := savingsViews(t)
	var b strings.Builder
	fmt.Fprintf(&b, "%-7s", "")
	for _, v := range views {
		fmt.Fprintf(&b, " | %-26s", v.name)
	}
	fmt.Fprintf(&b, "\n%-7s", "measure")
	for range views {
		fmt.Fprintf(&b, " | %7s %8s %8s", "design", "uniform", "saving")
	}
	b.WriteString("\n")
	for _, m := range Measures() {
		var got [8]int
		fmt.Fprintf(&b, "%-7s", m)
		for i, v := range views {
			pr := Problem{Population: v.pop, Claims: v.claims(m), Anticipated: Composition{Positives: v.pos},
				Confidence: 0.95, Multiplicity: plan.Bonferroni, ProducerRisk: 0.1}
			res, err := Search(pr)
			if err != nil {
				t.Fatalf("%s, %s: %v", m, v.name, err)
			}
			got[2*i], got[2*i+1] = res.Design.Total, res.Uniform.Total
			if res.Design.Total > res.Uniform.Total {
				t.Errorf("%s, %s: the design needs %d labels, more than the uniform sample's %d", m, v.name, res.Design.Total, res.Uniform.Total)
			}
			fmt.Fprintf(&b, " | %7d %8d %7.1f×", got[2*i], got[2*i+1], float64(got[2*i+1])/float64(got[2*i]))
		}
		b.WriteString("\n")
		if want, ok := savingsWant[m]; ok && got != want {
			t.Errorf("%s: labels %v, locked %v", m, got, want)
		}
	}
	b.WriteString("ceilings (anticipated):")
	for _, v := range views[:3] {
		for _, m := range Measures() {
			fmt.Fprintf(&b, "\n  %-12s %-5s", v.name, m)
			for _, c := range v.claims(m) {
				a, _ := trueValue(v.pop, c, v.pos)
				fmt.Fprintf(&b, "  %s %.4g (%.4g)", v.pop.Candidates[c.Candidate].Name, c.Ceiling, a)
			}
		}
	}
	t.Logf("labels needed, 3 %% prevalence, 100 000 decisions, confidence 0.95, producer's risk 0.1:\n%s", b.String())
}
