package measure

import (
	"testing"

	"probity/plan"
)

// bruteCase is a small problem for the brute-force reference.
type bruteCase struct {
	name   string
	pop    Population
	pos    []int64
	claims []Claim
	conf   float64
	beta   float64
	min    int
}

var bruteCases = []bruteCase{
	{
		name:   "label column, all five measures",
		pop:    binary(30, 120),
		pos:    []int64{24, 3},
		claims: []Claim{{0, Error, 0.15}, {0, FNR, 0.45}, {0, FPR, 0.12}, {0, FOR, 0.12}, {0, FDR, 0.5}},
		conf:   0.9, beta: 0.2,
	},
	{
		name:   "label column, miss rate alone",
		pop:    binary(40, 90),
		pos:    []int64{30, 2},
		claims: []Claim{{0, FNR, 0.3}},
		conf:   0.9, beta: 0.2,
	},
	{
		name:   "label column, false-alarm and discovery rates, a minimum of 2",
		pop:    binary(25, 110),
		pos:    []int64{20, 4},
		claims: []Claim{{0, FPR, 0.15}, {0, FDR, 0.45}},
		conf:   0.8, beta: 0.25, min: 2,
	},
	{
		name:   "three score bands, two thresholds",
		pop:    banded([]int64{36, 20, 12}, 1, 2),
		pos:    []int64{1, 5, 10},
		claims: []Claim{{1, FNR, 0.6}, {0, FDR, 0.8}, {1, FOR, 0.3}, {0, Error, 0.4}},
		conf:   0.9, beta: 0.25,
	},
}

// TestSearchAgainstBruteForce: the search's total is the fewest labels
// over every allocation of the strata, found by the brute force of
// testdata/bruteforce.py with scipy.stats tails (the rules restated, every
// allocation visited); the uniform total likewise over proportional
// allocations. Feasibility is compared at the target ± 1e-9 (Go's and
// scipy's tails differ in the last digits): the Go total must lie between
// the lenient and the strict reference. The reference also checks that
// the Go design's allocation meets every claim.
func TestSearchAgainstBruteForce(t *testing.T) {
	// a shorter list of floors keeps the reference to seconds; the search
	// is exact for whatever list it is given
	save := floorMargins
	defer func() { floorMargins = save }()
	floorMargins = []float64{0.01, 0.05, 0.2}
	for _, bc := range bruteCases {
		pr := Problem{Population: bc.pop, Claims: bc.claims, Anticipated: Composition{Positives: bc.pos},
			Confidence: bc.conf, Multiplicity: plan.Bonferroni, ProducerRisk: bc.beta, MinPerStratum: bc.min}
		res, err := Search(pr)
		if err != nil {
			t.Fatalf("%s: %v", bc.name, err)
		}
		in := map[string]any{
			"N": stratumSizes(bc.pop), "positives": bc.pos, "candidates": sides(bc.pop), "claims": claimsJSON(bc.claims),
			"alpha": pr.Level(), "beta": bc.beta, "margins": floorMargins, "min_per_stratum": bc.min,
			"check": res.Design.Sample,
		}
		type answer struct {
			Total   int   `json:"total"`
			Sample  []int `json:"sample"`
			Uniform int   `json:"uniform_total"`
			Met     bool  `json:"check_met"`
		}
		var ref struct{ Lenient, Strict answer }
		in["tolerance"] = 1e-9
		runPython(t, "testdata/bruteforce.py", in, &ref)
		lenient, strict := ref.Lenient, ref.Strict
		t.Logf("%s: search %d %v (uniform %d); brute force %d %v (uniform %d)", bc.name,
			res.Design.Total, res.Design.Sample, res.Uniform.Total, strict.Total, strict.Sample, strict.Uniform)
		if res.Design.Total < lenient.Total || res.Design.Total > strict.Total {
			t.Errorf("%s: the search needs %d labels %v, the brute force %d–%d (%v)", bc.name, res.Design.Total, res.Design.Sample, lenient.Total, strict.Total, strict.Sample)
		}
		if res.Uniform.Total < lenient.Uniform || res.Uniform.Total > strict.Uniform {
			t.Errorf("%s: the uniform sample needs %d labels, the brute force %d–%d", bc.name, res.Uniform.Total, lenient.Uniform, strict.Uniform)
		}
		if !lenient.Met {
			t.Errorf("%s: the brute force finds that the search's allocation %v does not meet every claim", bc.name, res.Design.Sample)
		}
		for _, c := range res.Design.Claims {
			if c.ProducerRisk > bc.beta+1e-12 {
				t.Errorf("%s: %s has producer's risk %v above %v", bc.name, c.Measure, c.ProducerRisk, bc.beta)
			}
			for h, k := range c.Counted {
				if k > res.Design.Sample[h] {
					t.Errorf("%s: %s counts %d items of stratum %d, which has %d labels", bc.name, c.Measure, k, h, res.Design.Sample[h])
				}
			}
		}
	}
}

func stratumSizes(p Population) []int64 {
	out := make([]int64, len(p.Strata))
	for h, s := range p.Strata {
		out[h] = s.Population
	}
	return out
}

func sides(p Population) [][]bool {
	out := make([][]bool, len(p.Candidates))
	for j, c := range p.Candidates {
		out[j] = c.Positive
	}
	return out
}

func claimsJSON(cs []Claim) []map[string]any {
	out := make([]map[string]any, len(cs))
	for i, c := range cs {
		out[i] = map[string]any{"candidate": c.Candidate, "measure": c.Measure.String(), "ceiling": c.Ceiling}
	}
	return out
}
