package assemble_test

import (
	"errors"
	"fmt"
	"math"
	"os"
	"sort"
	"strings"
	"testing"

	"probity/plan"
	"probity/plan/verdict"
	"probity/sampling"
	"probity/sampling/drawfolder"
)

// The promise of every record — a candidate whose true error is at or
// above the ceiling is accepted with probability at most δ — checked by
// running the whole audit many times on invented populations holding
// exactly D* = ⌈ceiling·N⌉ errors, spread over the strata the ways most
// likely to break it. A run accepts too often when the number of
// acceptances is improbably high for a rate of δ: P(Bin(R, δ) ≥ accepted)
// < 0.001 (a one-sided binomial test at level 0.001; common practice, no
// source). Repetitions: PROBITY_DEEP_MC=1 for a deeper run (ten times as
// many), -short for a smoke run.

// spread places D errors over strata of sizes N. A new adversarial spread
// is one line in spreads.
type spread struct {
	name string
	// order ranks the strata: the errors fill them whole, lowest rank
	// first; nil spreads them in proportion to N_h.
	order func(N []int64, h int) float64
}

var spreads = []spread{
	{"evenly", nil},
	{"smallest stratum first", func(N []int64, h int) float64 { return float64(N[h]) }},
	{"largest stratum first", func(N []int64, h int) float64 { return -float64(N[h]) }},
}

// place puts D errors into strata of sizes N.
func (sp spread) place(N []int64, D int64) []int64 {
	out := make([]int64, len(N))
	if sp.order == nil {
		var total, got int64
		for _, v := range N {
			total += v
		}
		for h := range N {
			out[h] = D * N[h] / total
			got += out[h]
		}
		for h := 0; got < D; h = (h + 1) % len(N) {
			if out[h] < N[h] {
				out[h]++
				got++
			}
		}
		return out
	}
	idx := make([]int, len(N))
	for h := range idx {
		idx[h] = h
	}
	sort.SliceStable(idx, func(a, b int) bool { return sp.order(N, idx[a]) < sp.order(N, idx[b]) })
	rest := D
	for _, h := range idx {
		out[h] = min(rest, N[h])
		rest -= out[h]
	}
	return out
}

// The invented populations (ceiling 5 %, confidence 90 %: every plan
// allows 10 %).
func fourStrata() []int64   { return []int64{6000, 3000, 800, 200} }
func fourRounding() []int64 { return []int64{5360, 2340, 980, 320} } // shares 26.8/11.7/4.9/1.6 of 45
func manySmallStrata() []int64 { // 57 strata of 150–542 decisions and 43 of 6–10
	N := make([]int64, 100)
	for h := range N {
		if h < 57 {
			N[h] = 150 + int64(h)*7
		} else {
			N[h] = 6 + int64(h%5)
		}
	}
	return N
}

const riskCeiling, riskConfidence = 0.05, 0.90

// riskInputs is a plan for one candidate at the ceiling and confidence
// above: with anticipated error p0 sized for 90 % acceptance at p0, or
// the zero-failure plan.
func riskInputs(p0 *float64) plan.Inputs {
	return plan.Inputs{Ceiling: riskCeiling, Confidence: riskConfidence, CandidateCount: 1, Anticipated: p0, ProducerRisk: 0.1,
		Method: plan.MethodExact, Multiplicity: plan.Bonferroni, Design: plan.DesignFixed, Require: plan.RequireAll}
}

// reps is the number of repetitions for a base of r.
func reps(r int) int {
	switch {
	case os.Getenv("PROBITY_DEEP_MC") != "":
		return 10 * r
	case testing.Short():
		return max(r/10, 20)
	}
	return r
}

// acceptRate runs the pipeline R times on fresh periods and tests the
// acceptance rate against the plan's risk δ; it returns the count.
func acceptRate(t *testing.T, p *pipeline, R int, tag string) int {
	t.Helper()
	p.assembleAgrees(t, tag+"-check")
	hits := 0
	for i := 0; i < R; i++ {
		if p.run(t, fmt.Sprintf("%s-%d", tag, i)) {
			hits++
		}
	}
	delta := 1 - p.plan.Inputs.Confidence
	if pv := plan.BinomialSF(hits-1, R, delta); pv < 0.001 {
		t.Errorf("%s: accepted %d of %d at the ceiling; P(Bin(%d, %.3g) ≥ %d) = %.3g < 0.001", p.name, hits, R, R, delta, hits, pv)
	}
	return hits
}

// zeroCountSpread is the spread of D errors most likely to leave a sample
// with n[h] items in stratum h without any error — the least favourable
// spread for a zero-failure plan: P(no error) = Π_h C(N_h − d_h, n_h)/C(N_h,
// n_h) is log-concave in d, so adding errors one at a time where they cost
// the least is exact (common practice, no source: marginal analysis).
func zeroCountSpread(N []int64, n []int, D int64) []int64 {
	d := make([]int64, len(N))
	// cost of one more error in stratum h: −ln(1 − n_h/(N_h − d_h))
	cost := func(h int) float64 {
		left := float64(N[h] - d[h])
		if d[h] >= N[h] || float64(n[h]) >= left {
			return math.Inf(1)
		}
		return -math.Log1p(-float64(n[h]) / left)
	}
	for ; D > 0; D-- {
		best := -1
		for h := range N {
			if d[h] < N[h] && (best < 0 || cost(h) < cost(best)) {
				best = h
			}
		}
		d[best]++
	}
	return d
}

// issueDesign is one row of issue 13's table, on a population of our own
// making: the plan's ceiling, p0 (nil: zero-failure), the draw's settings
// and where the errors sit.
type issueDesign struct {
	name    string
	N       []int64
	ceiling float64
	p0      *float64
	seq     bool
	alloc   sampling.AllocOptions
	// errs places D errors; n is the plan's sample size.
	errs func(N []int64, D int64, n int) []int64
	reps int
}

// issueDesigns are issue 13's designs on populations of our own making,
// each with the draw's defaults and, where the failure came from a gap,
// with the opt-out that leaves it (largest-remainder rounding, no minimum
// per stratum). Before the stratified count rule the gaps broke the
// promise here (88 % of 200 runs accepted with the errors in the strata
// left empty; 11.3 % exact for the rounded-down 1.6-item share); the
// Korn–Graubard verdict of the equal and minimum-60 rows stayed near δ on
// these populations (at most 12 % of 200 runs; 10.3 % exact at worst over
// a scan of 12 four-strata populations with the errors in one stratum).
func issueDesigns() []issueDesign {
	p1, p075 := 0.01, 0.0075
	large := func(N []int64, D int64, _ int) []int64 { return spreads[2].place(N, D) }
	// the 800-stratum first: where the old Korn–Graubard verdict accepted
	// most often on these strata
	third := func(N []int64, D int64, _ int) []int64 {
		return spread{"", func(_ []int64, h int) float64 { return math.Abs(float64(h - 2)) }}.place(N, D)
	}
	// the 1.6-item share: 45 items over 5360/2340/980/320 by largest
	// remainder are 27/12/5/1
	rounded := func(N []int64, D int64, _ int) []int64 { return zeroCountSpread(N, []int{27, 12, 5, 1}, D) }
	// first in the strata that largest-remainder rounding leaves without
	// an item (where the old rule accepted 88 % of the time)
	gaps := func(N []int64, D int64, n int) []int64 { return zeroCountSpread(N, largestRemainder(N, n), D) }
	equal := sampling.AllocOptions{Rule: sampling.Equal, MinPerStratum: 1, MinIfRoom: true}
	return []issueDesign{
		{"equal allocation, errors in the 800-stratum", fourStrata(), 0.02, &p1, false, equal, third, 300},
		{"proportional, minimum 60 per stratum, errors in the 800-stratum", fourStrata(), 0.02, &p1, false,
			sampling.AllocOptions{Rule: sampling.Proportional, Rounding: sampling.RoundUp, MinPerStratum: 60}, third, 300},
		{"zero-failure plan, equal allocation, errors in the largest", fourStrata(), 0.02, nil, false, equal, large, 300},
		{"zero-failure plan, proportional, a 1.6-item share rounded down", fourRounding(), 0.05, nil, false,
			sampling.AllocOptions{Rule: sampling.Proportional, Rounding: sampling.RoundLargestRemainder}, rounded, 300},
		{"the same with shares rounded up (the default)", fourRounding(), 0.05, nil, false,
			sampling.AllocOptions{Rule: sampling.Proportional, Rounding: sampling.RoundUp, MinPerStratum: 1, MinIfRoom: true}, rounded, 300},
		{"proportional, strata left empty, errors there first", manySmallStrata(), 0.015, &p075, false,
			sampling.AllocOptions{Rule: sampling.Proportional, Rounding: sampling.RoundLargestRemainder}, gaps, 100},
		{"the same with shares rounded up (the default)", manySmallStrata(), 0.015, &p075, false,
			sampling.AllocOptions{Rule: sampling.Proportional, Rounding: sampling.RoundUp, MinPerStratum: 1, MinIfRoom: true}, gaps, 100},
		{"sequential plan, one stratum (draw refuses strata)", []int64{10000}, 0.02, &p1, true, sampling.AllocOptions{}, large, 300},
	}
}

// TestPipelineRiskIssueDesigns runs issue 13's designs at the ceiling.
// 300 repetitions detect at level 0.001 an acceptance rate of 17 % or more
// with probability above 0.8 (22 %: above 0.999); the 100 % of the empty
// strata needs far fewer.
func TestPipelineRiskIssueDesigns(t *testing.T) {
	var table strings.Builder
	for i, d := range issueDesigns() {
		R := reps(d.reps)
		in := riskInputs(d.p0)
		in.Ceiling = d.ceiling
		var N int64
		for _, v := range d.N {
			N += v
		}
		errs := d.errs(d.N, plan.BadLotErrors(N, d.ceiling), planSize(t, in))
		p := newPipeline(t, d.name, in, d.seq, d.N, errs, d.alloc)
		hits := acceptRate(t, p, R, fmt.Sprint("issue-", i))
		fmt.Fprintf(&table, "%-64s n = %4d  errors %-22s accepted %4d of %d (%.1f %%)\n", d.name, p.plan.Rule.SampleSize, shortList(errs), hits, R, 100*float64(hits)/float64(R))
	}
	t.Logf("acceptance at the ceiling (every plan allows 10 %%), whole pipeline:\n%s", table.String())
}

// TestPipelineRiskAllocations runs every allocation (proportional with
// each rounding, equal, Neyman, a minimum per stratum) against every spread
// of D* errors on two populations. Each cell is also computed exactly —
// the acceptance probability of the rule the judgement applied
// (verdict.Applied, the count rule's convolution) — which must be at most
// δ and agree with the simulated rate (two-sided binomial test at level
// 0.001). The sequential design, which the record refuses on a stratified
// draw, runs on the one-stratum draw of each population.
func TestPipelineRiskAllocations(t *testing.T) {
	R := reps(40)
	p0 := 0.025
	allocs := []struct {
		name string
		a    sampling.AllocOptions
	}{
		{"proportional (rounded up)", sampling.AllocOptions{Rule: sampling.Proportional, Rounding: sampling.RoundUp, MinPerStratum: 1, MinIfRoom: true}},
		{"proportional (largest remainder)", sampling.AllocOptions{Rule: sampling.Proportional, Rounding: sampling.RoundLargestRemainder}},
		{"equal", sampling.AllocOptions{Rule: sampling.Equal, MinPerStratum: 1, MinIfRoom: true}},
		{"neyman", sampling.AllocOptions{Rule: sampling.Neyman, Anticipated: map[string]float64{"s000": 0.0125, "s001": 0.025, "s002": 0.05, "s003": 0.075}, MinPerStratum: 1, MinIfRoom: true}},
		{"proportional, minimum 40", sampling.AllocOptions{Rule: sampling.Proportional, Rounding: sampling.RoundUp, MinPerStratum: 40}},
	}
	delta := 1 - riskConfidence
	var table strings.Builder
	for _, N := range [][]int64{fourStrata(), fourRounding()} {
		var total int64
		for _, v := range N {
			total += v
		}
		for _, sp := range spreads {
			errs := sp.place(N, plan.BadLotErrors(total, riskCeiling))
			for ai, al := range allocs {
				p := newPipeline(t, fmt.Sprintf("N %v, %s, %s", N, al.name, sp.name), riskInputs(&p0), false, N, errs, al.a)
				hits := acceptRate(t, p, R, fmt.Sprint("alloc-", ai))
				exact := p.exactAccept(t, errs)
				if exact > delta+1e-12 {
					t.Errorf("%s: exact acceptance %.5g exceeds δ = %v", p.name, exact, delta)
				}
				if lo, hi := plan.BinomialCDF(hits, R, exact), plan.BinomialSF(hits-1, R, exact); math.Min(lo, hi) < 0.0005 {
					t.Errorf("%s: %d of %d accepted, exact %.5g: the pipeline disagrees with the rule's convolution", p.name, hits, R, exact)
				}
				fmt.Fprintf(&table, "%-26s %-34s %-24s %4d of %d   exact %.4f\n", fmt.Sprint(N), al.name, sp.name, hits, R, exact)
			}
		}
		// sequential: refused on a stratified draw, judged on one stratum
		D := plan.BadLotErrors(total, riskCeiling)
		seq := newPipeline(t, fmt.Sprintf("N %v, sequential", N), riskInputs(&p0), true, N, spreads[0].place(N, D), allocs[2].a)
		c, err := seq.draw("refused")
		if err != nil {
			t.Fatal(err)
		}
		f, err := drawfolder.OpenContent(c, seq.fp, []string{"model"})
		if err != nil {
			t.Fatal(err)
		}
		if _, err := seq.judge(f, labeled(t, c, nil), false); !errors.Is(err, verdict.ErrStratifiedSequential) {
			t.Errorf("a sequential plan on a stratified draw: %v, want refusal", err)
		}
		one := newPipeline(t, fmt.Sprintf("N %d in one stratum, sequential", total), riskInputs(&p0), true, []int64{total}, []int64{D}, sampling.AllocOptions{})
		Rs := reps(100)
		hits := acceptRate(t, one, Rs, "seq")
		fmt.Fprintf(&table, "%-26d %-34s %-24s %4d of %d   sequential\n", total, "one stratum", "-", hits, Rs)
	}
	t.Logf("acceptance at the ceiling (plan allows 10 %%):\n%s", table.String())
}

// exactAccept is the exact chance that the judgement accepts when stratum
// h holds errs[h] errors: under the count rule its convolution
// (CountRule.AcceptProbability) for the rule the judgement applies to this
// design, under the plan's rule P(Bin(n, D/N) ≤ c)'s exact analogue (the
// hypergeometric for one stratum).
func (p *pipeline) exactAccept(t *testing.T, errs []int64) float64 {
	t.Helper()
	c, err := p.draw("exact")
	if err != nil {
		t.Fatal(err)
	}
	d := verdict.Design{}
	for _, s := range c.Manifest.Strata {
		d.Strata = append(d.Strata, verdict.Stratum{Label: s.Label, Population: s.Population, Sample: s.Sample})
	}
	a, err := verdict.Choose(p.plan, d, c.Manifest.AnticipatedRates())
	if err != nil {
		t.Fatal(err)
	}
	if a.Kind != verdict.CountRule {
		t.Fatalf("%s: judged by the plan's rule", p.name)
	}
	v, err := a.Count.AcceptProbability(errs)
	if err != nil {
		t.Fatal(err)
	}
	return v
}

// planSize is the sample size of the plan for in.
func planSize(t *testing.T, in plan.Inputs) int {
	t.Helper()
	f, err := plan.Build(in, plan.Meta{ToolVersion: "test", Seed: "5eed"})
	if err != nil {
		t.Fatal(err)
	}
	return f.Rule.SampleSize
}

// largestRemainder is the draw's proportional allocation of n items by
// largest remainder over strata labeled in index order (as the pipeline's
// log labels them).
func largestRemainder(N []int64, n int) []int {
	var counts []sampling.StratumCount
	for h, v := range N {
		counts = append(counts, sampling.StratumCount{Label: fmt.Sprintf("s%03d", h), Population: v})
	}
	a, err := sampling.Allocate(counts, n, sampling.AllocOptions{Rule: sampling.Proportional, Rounding: sampling.RoundLargestRemainder})
	if err != nil {
		panic(err)
	}
	out := make([]int, len(a))
	for h := range a {
		out[h] = a[h].Sample
	}
	return out
}

// shortList prints a long list of counts by its non-zero entries.
func shortList(v []int64) string {
	if len(v) <= 6 {
		return fmt.Sprint(v)
	}
	nz := 0
	var sum int64
	for _, x := range v {
		if x > 0 {
			nz++
			sum += x
		}
	}
	return fmt.Sprintf("%d in %d of %d strata", sum, nz, len(v))
}
