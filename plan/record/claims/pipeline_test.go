package claims

import (
	"fmt"
	"math/rand/v2"
	"slices"
	"testing"

	"probity/plan"
	"probity/plan/measure"
	"probity/plan/verdict"
	"probity/sampling/drawfolder"
)

// The whole pipeline at the ceiling, for the miss rate (fnr) and the
// false-alarm rate (fpr) with rare positives (3 % of 20 000 decisions):
// the plan (measure.BuildPlan), the draw's design on the log's strata
// (measure.NewPeriodDesign, as the draw sizes it) recorded in a manifest
// as the draw records it, each stratum's labeled items a simple random
// sample in key order (the draw's SHA-256 key order is a uniformly random
// order; here a seeded generator stands in for the keys), labels read from
// a hidden truth whose measure is exactly at its ceiling, and the record's
// judgement (Judge). Score bands are the user's strata: three cleared
// (confident 0–0.2, 0.2–0.4, near the threshold 0.4–0.5) and two flagged
// (near 0.5–0.6, confident 0.6–1). The truth's events are spread the worst
// ways: concentrated near the threshold, or in the most confident band.
//
// Each scenario runs 300 times; the claim is accepted with probability at
// most its level δ/K = 0.05 (one claim). The test fails when the one-sided
// binomial test of "acceptance rate ≤ 0.05" rejects at level 0.001:
// P(Bin(300, 0.05) ≥ accepted) < 0.001 (at most 27 acceptances pass).

// bands are the strata: size, and whether the candidate flags them.
var pipelineBands = []struct {
	label   string
	size    int64
	flagged bool
}{
	{"0-0.2", 14000, false}, {"0.2-0.4", 3000, false}, {"0.4-0.5", 1000, false},
	{"0.5-0.6", 1000, true}, {"0.6-1", 1000, true},
}

// spread puts k events into the strata in the given order, each filled to
// its capacity before the next: a new adversarial spread is one line.
func spread(k int64, capacity []int64, order []int) []int64 {
	out := make([]int64, len(capacity))
	for _, h := range order {
		n := min(k, capacity[h])
		out[h], k = n, k-n
	}
	if k > 0 {
		panic("spread: the strata cannot hold the events")
	}
	return out
}

var (
	nearThreshold = map[bool][]int{false: {2, 1, 0}, true: {3, 4}} // cleared, flagged
	mostConfident = map[bool][]int{false: {0, 1, 2}, true: {4, 3}}
)

// truthAt is the positives per band for a measure exactly at its ceiling:
// fnr 180 misses among 600 positives (0.3), the 420 caught ones flagged;
// fpr 1940 false alarms among 19 400 negatives (0.1), the other 60
// flagged items positive, the 540 other positives cleared.
func truthAt(m string, order map[bool][]int) []int64 {
	var cleared, flagged []int64
	for _, b := range pipelineBands {
		if b.flagged {
			cleared, flagged = append(cleared, 0), append(flagged, b.size)
		} else {
			cleared, flagged = append(cleared, b.size), append(flagged, 0)
		}
	}
	add := func(x, y []int64) []int64 {
		for i := range x {
			x[i] += y[i]
		}
		return x
	}
	switch m {
	case "fnr":
		return add(spread(180, cleared, order[false]), spread(420, flagged, order[true]))
	default: // fpr: the false alarms take the order's flagged bands first
		fp := spread(1940, flagged, order[true])
		pos := make([]int64, len(flagged))
		for h := range flagged {
			pos[h] = flagged[h] - fp[h]
		}
		return add(pos, spread(540, cleared, order[false]))
	}
}

func TestPipelineAtTheCeiling(t *testing.T) {
	th := 0.5
	cands := []plan.Candidate{{Name: "s>=0.5", ScoreColumn: "s", Threshold: &th, Positive: "pos", Negative: "neg"}}
	scenarios := []struct {
		measure string
		ceiling float64
		order   map[bool][]int
		name    string
	}{
		{"fnr", 0.3, nearThreshold, "misses near the threshold"},
		{"fnr", 0.3, mostConfident, "misses in the most confident band"},
		{"fpr", 0.1, nearThreshold, "false alarms near the threshold"},
		{"fpr", 0.1, mostConfident, "false alarms in the most confident band"},
	}
	const runs, level, delta = 300, 0.001, 0.05
	for si, sc := range scenarios {
		t.Run(sc.name, func(t *testing.T) {
			spec := measure.Spec{Candidates: cands, Positive: "pos", Prevalence: 0.03, Decisions: 20000,
				Anticipated: []string{"fnr:0.1", "fpr:0.05"},
				Claims:      []plan.MeasureClaim{{Candidate: "s>=0.5", Measure: sc.measure, Ceiling: sc.ceiling}},
				Confidence:  1 - delta, ProducerRisk: 0.1, Multiplicity: plan.Bonferroni}
			m, err := measure.BuildPlan(spec)
			if err != nil {
				t.Fatal(err)
			}
			f := &plan.File{Candidates: cands, Inputs: plan.Inputs{Confidence: 1 - delta, ProducerRisk: 0.1, Multiplicity: plan.Bonferroni}, Measures: m}
			var strata []measure.Stratum
			var flagged [][]bool
			for _, b := range pipelineBands {
				strata = append(strata, measure.Stratum{Label: b.label, Population: b.size})
				flagged = append(flagged, []bool{b.flagged})
			}
			pd, err := measure.NewPeriodDesign(f, strata, flagged)
			if err != nil {
				t.Fatal(err)
			}
			man := &drawfolder.Manifest{Measures: &drawfolder.MeasuresInfo{Positive: "pos", Flagged: flagged, Level: pd.Level}}
			for h, b := range pipelineBands {
				man.Strata = append(man.Strata, drawfolder.StratumInfo{Label: b.label, Population: b.size, Sample: pd.Sample[h]})
			}
			for i, cd := range pd.Claims {
				man.Measures.Claims = append(man.Measures.Claims, drawfolder.MeasureClaimInfo{Candidate: "s>=0.5", Measure: cd.Measure.String(),
					Ceiling: cd.Ceiling, Counted: cd.Counted, Floor: cd.Floor, BAccept: cd.BAccept, Planned: !slices.Contains(pd.Unplanned, i)})
			}
			truth := truthAt(sc.measure, sc.order)
			rng := rand.New(rand.NewPCG(2026, uint64(si)))
			accepted := 0
			for r := range runs {
				var items []verdict.Item
				for h, b := range pipelineBands {
					pred := "neg"
					if b.flagged {
						pred = "pos"
					}
					left, pos := b.size, truth[h]
					for i := range pd.Sample[h] {
						label := "neg"
						if rng.Int64N(left) < pos {
							label, pos = "pos", pos-1
						}
						left--
						items = append(items, verdict.Item{RecordID: fmt.Sprintf("r%d-%d-%d", r, h, i), Stratum: h, Label: label, Predictions: []string{pred}})
					}
				}
				res, err := Judge(f, man, items)
				if err != nil {
					t.Fatal(err)
				}
				if res.Measures[0].Verdict == "ACCEPT" {
					accepted++
				}
			}
			p := plan.BinomialSF(accepted-1, runs, delta) // P(Bin(300, 0.05) ≥ accepted)
			t.Logf("%s at %v: %d labels, accepted %d of %d (P(Bin(%d, %v) ≥ %d) = %.3g)", sc.measure, sc.ceiling, sum(pd.Sample), accepted, runs, runs, delta, accepted, p)
			if p < level {
				t.Errorf("accepted %d of %d at the ceiling: the stated risk %v is exceeded (one-sided binomial p = %.3g < %v)", accepted, runs, delta, p, level)
			}
		})
	}
}

func sum(xs []int) int {
	s := 0
	for _, x := range xs {
		s += x
	}
	return s
}
