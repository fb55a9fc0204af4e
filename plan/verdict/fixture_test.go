package verdict

import (
	"fmt"
	"math"
	"strings"

	"probity/plan"
)

// testPlan builds a plan with one or more label-column candidates.
func testPlan(n, c int, ceiling, confidence float64, m int, multiplicity plan.Multiplicity) *plan.File {
	f := &plan.File{
		Format: plan.FileFormat, Seed: "00112233445566778899aabbccddeeff",
		Inputs: plan.Inputs{Ceiling: ceiling, Confidence: confidence, CandidateCount: m, Method: plan.MethodExact,
			Multiplicity: multiplicity, Design: plan.DesignFixed, Require: plan.RequireAll},
		Rule:    plan.Rule{Model: plan.ModelBinomial, SampleSize: n, AcceptanceNumber: c},
		Classes: []string{"ok", "defect"},
	}
	switch multiplicity {
	case plan.FixedSequence:
		f.Rule.PerCandidateRisk = 1 - confidence
	default:
		f.Rule.PerCandidateRisk = (1 - confidence) / float64(m)
	}
	for i := 0; i < m; i++ {
		f.Candidates = append(f.Candidates, plan.Candidate{Name: fmt.Sprintf("m%d", i+1), Column: fmt.Sprintf("pred_%d", i+1)})
	}
	return f
}

// itemsWithErrors builds the items of a design in which candidate k makes
// errs[k][h] errors in stratum h (the first ones of the stratum). The true
// label is "ok"; an error predicts "defect".
func itemsWithErrors(d Design, errs [][]int) []Item {
	var items []Item
	for h, s := range d.Strata {
		for i := 0; i < s.Sample; i++ {
			it := Item{RecordID: fmt.Sprintf("r%d-%d", h, i), Stratum: h, Label: "ok"}
			for k := range errs {
				p := "ok"
				if i < errs[k][h] {
					p = "defect"
				}
				it.Predictions = append(it.Predictions, p)
			}
			items = append(items, it)
		}
	}
	return items
}

// oneStratum is an unstratified sample of n from a large population.
func oneStratum(n int) Design {
	return Design{Strata: []Stratum{{Label: "all", Population: 1_000_000, Sample: n}}}
}

// largestC is the plan's acceptance number for n at risk α: the largest c
// with P(X ≤ c | n, ceiling) ≤ α (−1 when none), computed by scanning.
func largestC(n int, ceiling, alpha float64) int {
	c := -1
	for x := 0; x <= n; x++ {
		if plan.BinomialCDF(x, n, ceiling) <= alpha {
			c = x
		} else {
			break
		}
	}
	return c
}

func pow(a, b float64) float64 { return math.Pow(a, b) }

func containsStr(s, sub string) bool { return strings.Contains(s, sub) }
