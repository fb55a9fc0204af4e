package stratified

import (
	"fmt"
	"math"
	"math/rand/v2"
	"os"
	"strings"
	"testing"

	"probity/plan"
)

// failureDesign recreates, on populations of our own making, a design for
// which the earlier rules broke the promise (issue 13's table; the plan
// allows 10 %).
type failureDesign struct {
	name   string
	N      []int64
	n      int // labels (the simple-random-sample plan's n)
	rule   allocRule
	spread spread // where the errors sit at the ceiling
}

const failureCeiling, failureConfidence = 0.05, 0.90

func failureDesigns() []failureDesign {
	four := []int64{6000, 3000, 800, 200}
	small := spreads[1] // smallest stratum first
	srsN, _ := srsBinomialN(failureCeiling, 1-failureConfidence, failureCeiling/2)
	zeroN := int(math.Ceil(math.Log(1-failureConfidence) / math.Log(1-failureCeiling))) // c = 0
	return []failureDesign{
		{"equal allocation, errors in one small stratum", four, srsN, equal, small},
		{"proportional, minimum 60 per stratum, errors in the small stratum", four, srsN, withMin(proportional, 60), small},
		{"zero-failure plan, equal allocation", four, zeroN, equal, small},
		// shares 26.8/11.7/4.9/1.6 of 45: largest remainder gives the 1.6 share one item
		{"zero-failure plan, proportional, a 1.6-item share rounded to 1", []int64{5360, 2340, 980, 320}, zeroN, proportional, small},
		{"proportional, small strata rounded to zero items, errors there", manySmallStrata(), 700, proportional, spreads[3]},
	}
}

// TestFailureDesignsAtCeiling gives, for each failure design, the exact
// acceptance probability of the count rule at the ceiling with the errors
// where they broke the earlier rules, and the largest over the adversarial
// spreads of montecarlo_test.go; both must be at most 10 %.
func TestFailureDesignsAtCeiling(t *testing.T) {
	var out strings.Builder
	fmt.Fprintf(&out, "%-66s %-22s %5s %3s %-9s %9s %9s\n", "design (ceiling 5 %, plan allows 10 %)", "n_h", "n", "c", "counted", "issue's", "worst")
	for _, fd := range failureDesigns() {
		nh := allocate(fd.N, fd.n, fd.rule, nil)
		d := design(fd.N, nh)
		ant := make([]int64, len(fd.N))
		for h := range ant {
			ant[h] = int64(float64(fd.N[h]) * failureCeiling / 2)
		}
		thinned, _, err := CountedForPower(d, ant, failureCeiling, failureConfidence)
		if err != nil {
			t.Fatal(err)
		}
		for ci, counted := range [][]int{nil, thinned} {
			r := mustRule(t, d, counted, failureCeiling, failureConfidence)
			issue, err := r.AcceptProbability(fd.spread.place(d, r, r.BadLot))
			if err != nil {
				t.Fatal(err)
			}
			worst := issue
			for _, sp := range spreads {
				p, err := r.AcceptProbability(sp.place(d, r, r.BadLot))
				if err != nil {
					t.Fatal(err)
				}
				worst = math.Max(worst, p)
			}
			shown := fmt.Sprint(nh)
			if len(nh) > 6 {
				zero := 0
				for _, v := range nh {
					if v == 0 {
						zero++
					}
				}
				shown = fmt.Sprintf("%d strata, %d empty", len(nh), zero)
			}
			fmt.Fprintf(&out, "%-66s %-22s %5d %3d %-9s %8.2f%% %8.2f%%\n", fd.name, shown, fd.n, r.Accept, []string{"all", "thinned"}[ci], 100*issue, 100*worst)
			if worst > 1-failureConfidence+1e-12 {
				t.Errorf("%s (%s): acceptance %.4g at the ceiling exceeds 10 %%", fd.name, []string{"all", "thinned"}[ci], worst)
			}
		}
	}
	t.Log("\n" + out.String())
}

// TestFailureDesignsSequential is the sixth design of the table — a
// sequential plan with equal allocation — judged by Sequential after every
// label: the share of runs that ever accept at the ceiling, errors in the
// small stratum (Monte Carlo with the binomial test at level 0.001 as in
// montecarlo_test.go: 100 runs per spread looking after every 20th label; with
// PROBITY_DEEP_MC=1, 2000 runs looking after every label).
// TestSequentialAnytimeExact checks looks after every label exactly on
// small populations.
func TestFailureDesignsSequential(t *testing.T) {
	reps, every := 100, 20
	if os.Getenv("PROBITY_DEEP_MC") != "" {
		reps, every = 2000, 1
	}
	fd := failureDesigns()[0]
	nh := allocate(fd.N, 3*fd.n, equal, nil) // the sequential plan's largest sample
	d := design(fd.N, nh)
	priors := make([]Prior, len(d.Strata))
	for h := range priors {
		priors[h] = AnticipatedPrior(failureCeiling / 2)
	}
	r := mustRule(t, d, nil, failureCeiling, failureConfidence)
	order := roundRobin(nh)
	rng := rand.New(rand.NewPCG(5, 6))
	for _, sp := range []spread{fd.spread, spreads[2]} {
		D := sp.place(d, r, r.BadLot)
		hits := 0
		for i := 0; i < reps; i++ {
			if sequentialRun(t, rng, d, D, order, priors, every) {
				hits++
			}
		}
		t.Logf("sequential, equal allocation %v, errors %v (%s), a look every %d labels: ever accepted in %d of %d runs (%.2f %%)",
			nh, D, sp.name, every, hits, reps, 100*float64(hits)/float64(reps))
		if p := plan.BinomialSF(hits-1, reps, 1-failureConfidence); p < 0.001 {
			t.Errorf("%s: ever accepted in %d of %d runs at the ceiling; P(Bin ≥) = %.3g", sp.name, hits, reps, p)
		}
	}
}

// sequentialRun labels the items in order, judging after every few labels
// and after the last, and reports whether any look accepted.
func sequentialRun(t *testing.T, rng *rand.Rand, d Design, D []int64, order []int, priors []Prior, every int) bool {
	t.Helper()
	H := len(d.Strata)
	seen, errs := make([]int, H), make([]int, H)
	s := Sequential{Design: Design{Strata: append([]Stratum(nil), d.Strata...)}, Ceiling: failureCeiling, Confidence: failureConfidence, Priors: priors}
	for i, h := range order {
		left := d.Strata[h].Population - int64(seen[h])
		if rng.Int64N(left) < D[h]-int64(errs[h]) {
			errs[h]++
		}
		seen[h]++
		s.Design.Strata[h].Sample = seen[h]
		if (i+1)%every != 0 && i+1 != len(order) {
			continue
		}
		v, err := s.Judge(errs)
		if err != nil {
			t.Fatal(err)
		}
		if v.Accepted {
			return true
		}
	}
	return false
}
