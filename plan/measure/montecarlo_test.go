package measure

import (
	"fmt"
	"math"
	"math/rand/v2"
	"os"
	"sort"
	"strings"
	"testing"

	"probity/plan"
)

// fill puts total items into the strata listed in order, each taking as
// many as it can hold (cap[h]); it returns the count per stratum.
func fill(total int64, order []int, cap []int64) []int64 {
	out := make([]int64, len(cap))
	for _, h := range order {
		d := min(total, cap[h])
		out[h] = d
		total -= d
	}
	if total > 0 {
		panic(fmt.Sprintf("fill: %d items do not fit", total))
	}
	return out
}

// spreadOrder is a way to put a side's events into its strata: order
// returns the strata in the order they fill. A new adversarial spread is
// one line in aSpreads or bSpreads.
type spreadOrder struct {
	name  string
	order func(strata []int, p Population, counted []int) []int
}

func byKey(strata []int, key func(h int) float64) []int {
	out := append([]int(nil), strata...)
	sort.SliceStable(out, func(i, j int) bool { return key(out[i]) < key(out[j]) })
	return out
}

var (
	// where the numerator's events (misses for fnr, false alarms for fpr)
	// sit; strata are in score order, lowest first
	aSpreads = []spreadOrder{
		{"near the threshold", func(s []int, _ Population, _ []int) []int {
			return byKey(s, func(h int) float64 { return -float64(h) })
		}},
		{"in the most confident band", func(s []int, _ Population, _ []int) []int { return byKey(s, func(h int) float64 { return float64(h) }) }},
		{"where fewest are counted per decision", func(s []int, p Population, k []int) []int {
			return byKey(s, func(h int) float64 { return float64(k[h]) / float64(p.Strata[h].Population) })
		}},
	}
	// where the complement of the denominator's other part sits (false
	// positives for fnr, false negatives for fpr)
	bSpreads = []spreadOrder{
		{"complement where fewest are counted", func(s []int, p Population, k []int) []int {
			return byKey(s, func(h int) float64 { return float64(k[h]) / float64(p.Strata[h].Population) })
		}},
		{"complement in the largest stratum", func(s []int, p Population, _ []int) []int {
			return byKey(s, func(h int) float64 { return -float64(p.Strata[h].Population) })
		}},
	}
)

// ceilingPopulation is a composition whose ratio claim sits exactly at its
// ceiling: the denominator's other part is B, spread by bs, and the
// numerator is a* = the least A with A/(A + B) ≥ ceiling, spread by as.
func ceilingPopulation(p Population, c Claim, counted []int, B int64, as, bs spreadOrder) (Composition, bool) {
	a, b := c.sides(p)
	capOf := func() []int64 {
		v := make([]int64, len(p.Strata))
		for h, s := range p.Strata {
			v[h] = s.Population
		}
		return v
	}()
	A := ratioBadCount(B, c.Ceiling)
	Na, Nb := a.population(p), b.population(p)
	if A > Na || B > Nb || B < 1 {
		return Composition{}, false
	}
	ea := fill(A, as.order(a.strata, p, counted), capOf)
	eb := fill(Nb-B, bs.order(b.strata, p, counted), capOf) // complement events
	pos := make([]int64, len(p.Strata))
	for _, h := range a.strata {
		if a.ev == positives {
			pos[h] = ea[h]
		} else {
			pos[h] = p.Strata[h].Population - ea[h]
		}
	}
	for _, h := range b.strata {
		if b.ev == positives {
			pos[h] = eb[h]
		} else {
			pos[h] = p.Strata[h].Population - eb[h]
		}
	}
	return Composition{Positives: pos}, true
}

// pipeline draws the labeled sample once: each stratum's decisions in a
// uniformly random order (the worksheet's key order), the first n_h
// labeled; decision i of stratum h is positive when i < pos[h]. perm[h]
// is the identity on entry and on return (the partial shuffle is undone).
func pipeline(rng *rand.Rand, n []int, pos []int64, perm [][]int32) Sample {
	s := make(Sample, len(n))
	for h := range n {
		p := perm[h]
		js := make([]int, n[h])
		s[h] = make([]Label, n[h])
		for i := 0; i < n[h]; i++ {
			j := i + rng.IntN(len(p)-i)
			js[i] = j
			p[i], p[j] = p[j], p[i]
			s[h][i].Positive = int64(p[i]) < pos[h]
		}
		for i := n[h] - 1; i >= 0; i-- {
			p[i], p[js[i]] = p[js[i]], p[i]
		}
	}
	return s
}

// mcCase is a population, a good composition to plan for, and the ratio
// claims to check at their ceilings.
type mcCase struct {
	name   string
	pop    Population
	good   []int64
	claims []Claim
}

var mcCases = []mcCase{
	{
		name:   "label column, prevalence 2 %",
		pop:    binary(3000, 37000),
		good:   []int64{2100, 150},
		claims: []Claim{{0, FNR, 0.15}, {0, FPR, 0.04}},
	},
	{
		name:   "five score bands, prevalence 1 %",
		pop:    banded([]int64{22000, 12000, 3000, 1800, 1200}, 3),
		good:   []int64{4, 16, 60, 800, 1100},
		claims: []Claim{{0, FNR, 0.15}, {0, FPR, 0.05}},
	},
	{
		name:   "five score bands, prevalence 5 %",
		pop:    banded([]int64{20000, 11000, 4000, 2600, 2400}, 3),
		good:   []int64{20, 100, 300, 1400, 2250},
		claims: []Claim{{0, FNR, 0.2}, {0, FPR, 0.06}},
	},
}

// TestMonteCarloRatiosAtTheCeiling runs the whole judgement many times —
// the plan's design from Search, a fresh random sample of each stratum,
// Judge — on populations whose miss rate or false-alarm rate is exactly at
// its ceiling, with rare positives (prevalence 1–5 %) and the numerator's
// events spread adversarially across the bands (near the threshold, in the
// most confident band, where fewest are counted per decision), the
// denominator's complement spread adversarially too, and the denominator
// part just below the planned floor, at it, as anticipated, and larger.
// Validity fails when the acceptance count is improbably high for a rate
// of α: P(Bin(R, α) ≥ observed) < 0.001 (a one-sided binomial test at
// level 0.001). The simulated rate must also agree with the exact
// AcceptProbability (two-sided, see maxRows). R = 1000 per row with a
// fixed seed; PROBITY_DEEP_MC=1 runs 20 000 with a seed from
// PROBITY_MC_SEED (default 1).
func TestMonteCarloRatiosAtTheCeiling(t *testing.T) {
	reps, seed := 1000, uint64(1)
	if os.Getenv("PROBITY_DEEP_MC") != "" {
		reps = 20000
		if s := os.Getenv("PROBITY_MC_SEED"); s != "" {
			fmt.Sscan(s, &seed)
		}
	}
	if testing.Short() {
		reps = 200
	}
	rng := rand.New(rand.NewPCG(seed, 14))
	rows, disagree := 0, []string(nil)
	var table strings.Builder
	fmt.Fprintf(&table, "%-34s %-4s %-8s %-8s %-38s %-36s %7s %7s %7s\n", "population", "", "floor", "B", "numerator spread", "complement spread", "α", "MC", "exact")
	for _, mc := range mcCases {
		pr := Problem{Population: mc.pop, Claims: mc.claims, Anticipated: Composition{Positives: mc.good},
			Confidence: 0.9, Multiplicity: plan.Bonferroni, ProducerRisk: 0.1}
		res, err := Search(pr)
		if err != nil {
			t.Fatalf("%s: %v", mc.name, err)
		}
		alpha := res.Design.Level
		perm := make([][]int32, len(mc.pop.Strata))
		for h, s := range mc.pop.Strata {
			perm[h] = make([]int32, s.Population)
			for i := range perm[h] {
				perm[h][i] = int32(i)
			}
		}
		for _, pc := range res.Design.Claims {
			cd := pc.ClaimDesign
			a, b := cd.sides(mc.pop)
			var B0 int64 = b.population(mc.pop)
			for _, e := range b.counts(mc.pop, Composition{Positives: mc.good}) {
				B0 -= e
			}
			seen := map[string]bool{} // spreads that coincide (one stratum a side) run once
			for _, B := range []int64{cd.Floor - 1, cd.Floor, B0, min(2*cd.Floor, b.population(mc.pop))} {
				for _, as := range aSpreads {
					for _, bs := range bSpreads {
						comp, ok := ceilingPopulation(mc.pop, cd.Claim, cd.Counted, B, as, bs)
						if key := fmt.Sprint(comp.Positives); !ok || seen[key] {
							continue
						} else {
							seen[key] = true
						}
						rows++
						hits := 0
						// the verdict is a function of the two sides'
						// counts: Judge each pair once
						judged := map[[2]int]bool{}
						for i := 0; i < reps; i++ {
							smp := pipeline(rng, res.Design.Sample, comp.Positives, perm)
							_, ea := countEvents(mc.pop, smp, a, cd.Counted)
							_, eb := countEvents(mc.pop, smp, b, cd.Counted)
							acc, seen := judged[[2]int{ea, eb}]
							if !seen {
								v, err := cd.Judge(mc.pop, smp, alpha)
								if err != nil {
									t.Fatal(err)
								}
								acc = v.Accepted
								judged[[2]int{ea, eb}] = acc
							}
							if acc {
								hits++
							}
						}
						exact, err := cd.AcceptProbability(mc.pop, comp, alpha)
						if err != nil {
							t.Fatal(err)
						}
						fmt.Fprintf(&table, "%-34s %-4s %-8d %-8d %-38s %-36s %7.4f %7.4f %7.4f\n", mc.name, cd.Measure, cd.Floor, B, as.name, bs.name, alpha, float64(hits)/float64(reps), exact)
						if p := plan.BinomialSF(hits-1, reps, alpha); p < 0.001 {
							t.Errorf("%s, %s, B = %d, %s, %s: %d of %d accepted at the ceiling; P(Bin(%d, %.3g) ≥ %d) = %.3g < 0.001",
								mc.name, cd.Measure, B, as.name, bs.name, hits, reps, reps, alpha, hits, p)
						}
						if exact > alpha+1e-12 {
							t.Errorf("%s, %s, B = %d, %s, %s: exact acceptance %.6g exceeds α", mc.name, cd.Measure, B, as.name, bs.name, exact)
						}
						if lo, hi := plan.BinomialCDF(hits, reps, exact), plan.BinomialSF(hits-1, reps, exact); math.Min(lo, hi) < 0.0005/float64(maxRows) {
							disagree = append(disagree, fmt.Sprintf("%s, %s, B = %d, %s, %s: simulated %d of %d, exact %.5g", mc.name, cd.Measure, B, as.name, bs.name, hits, reps, exact))
						}
					}
				}
			}
		}
	}
	t.Logf("acceptance at the ceiling, %d runs per row:\n%s", reps, table.String())
	if rows > maxRows {
		t.Errorf("%d rows; raise maxRows, which sets the agreement check's level", rows)
	}
	for _, d := range disagree {
		t.Errorf("the pipeline disagrees with AcceptProbability: %s", d)
	}
}

// maxRows bounds the rows of TestMonteCarloRatiosAtTheCeiling: the check
// that the simulation agrees with the exact formula is two-sided at level
// 0.0005/maxRows per row (Bonferroni), so that the whole table passes it
// by chance with probability at least 0.9995 (the validity check stays at
// 0.001 per row: it must catch inflation, and the rows' true rates are at
// or below α).
const maxRows = 160
