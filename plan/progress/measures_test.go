package progress

import (
	"fmt"
	"math/rand/v2"
	"slices"
	"testing"

	"probity/plan"
	"probity/plan/measure"
	"probity/plan/record"
	"probity/plan/record/claims"
	"probity/plan/sequential"
	"probity/plan/verdict"
	"probity/sampling/drawfolder"
)

// measuresWorld is a small audit of measures: one label-column candidate
// on two sections (four strata: section × prediction), the plan's design
// on them (measure.NewPeriodDesign, as the draw sizes it) and a worksheet
// whose items interleave the strata in a random key order.
type measuresWorld struct {
	plan   *plan.File
	man    *drawfolder.Manifest
	ledger []drawfolder.LedgerRow
}

func newMeasuresWorld(t *testing.T, mult plan.Multiplicity, rng *rand.Rand) *measuresWorld {
	t.Helper()
	cands := []plan.Candidate{{Name: "model", Column: "pred"}}
	spec := measure.Spec{Candidates: cands, Positive: "pos", Prevalence: 0.05, Decisions: 4000,
		Anticipated: []string{"fnr:0.1", "fpr:0.02"}, Confidence: 0.95, ProducerRisk: 0.1, Multiplicity: mult,
		Claims: []plan.MeasureClaim{{Candidate: "model", Measure: "fnr", Ceiling: 0.35}, {Candidate: "model", Measure: "error", Ceiling: 0.06},
			{Candidate: "model", Measure: "fdr", Ceiling: 0.5}}}
	m, err := measure.BuildPlan(spec)
	if err != nil {
		t.Fatal(err)
	}
	f := &plan.File{Classes: []string{"neg", "pos"}, Candidates: cands, Inputs: plan.Inputs{Confidence: 0.95, ProducerRisk: 0.1, Multiplicity: mult}, Measures: m}
	strata := []measure.Stratum{{Label: "a|neg", Population: 2500}, {Label: "a|pos", Population: 120}, {Label: "b|neg", Population: 1300}, {Label: "b|pos", Population: 80}}
	flagged := [][]bool{{false}, {true}, {false}, {true}}
	pd, err := measure.NewPeriodDesign(f, strata, flagged)
	if err != nil {
		t.Fatal(err)
	}
	w := &measuresWorld{plan: f, man: &drawfolder.Manifest{Measures: &drawfolder.MeasuresInfo{Positive: "pos", Flagged: flagged, Level: pd.Level}}}
	for h, s := range strata {
		w.man.Strata = append(w.man.Strata, drawfolder.StratumInfo{Label: s.Label, Population: s.Population, Sample: pd.Sample[h]})
		w.man.SampleSize += pd.Sample[h]
	}
	for i, cd := range pd.Claims {
		w.man.Measures.Claims = append(w.man.Measures.Claims, drawfolder.MeasureClaimInfo{Candidate: "model", Measure: cd.Measure.String(),
			Ceiling: cd.Ceiling, Counted: cd.Counted, Floor: cd.Floor, BAccept: cd.BAccept, Planned: !slices.Contains(pd.Unplanned, i)})
	}
	// key order: a random interleaving of the strata's items
	var order []int
	for h := range strata {
		for range pd.Sample[h] {
			order = append(order, h)
		}
	}
	rng.Shuffle(len(order), func(i, j int) { order[i], order[j] = order[j], order[i] })
	for i, h := range order {
		pred := "neg"
		if flagged[h][0] {
			pred = "pos"
		}
		w.ledger = append(w.ledger, drawfolder.LedgerRow{Item: i + 1, RecordID: fmt.Sprintf("r%05d", i), Stratum: strata[h].Label,
			StratumSize: strata[h].Population, StratumSample: pd.Sample[h], Predictions: []string{pred}})
	}
	return w
}

// TestMeasuresStopNeverReversed: on random truths (the rates of positives
// per stratum drawn so that claims land on both sides of their ceilings)
// and random prefixes, every claim progress decides gets that verdict from
// the record's judgement of the whole labeled sample (claims.Judge), for
// each multiplicity; and a fully labeled worksheet decides every claim as
// the record does.
func TestMeasuresStopNeverReversed(t *testing.T) {
	rng := rand.New(rand.NewPCG(14, 7))
	decided := 0
	for _, mult := range []plan.Multiplicity{plan.Bonferroni, plan.Holm, plan.FixedSequence} {
		w := newMeasuresWorld(t, mult, rng)
		index := map[string]int{}
		for h, s := range w.man.Strata {
			index[s.Label] = h
		}
		for trial := range 40 {
			// positive rates: cleared strata 0–12 %, flagged 20–100 %
			rate := map[string]float64{"a|neg": 0.12 * rng.Float64(), "b|neg": 0.12 * rng.Float64(), "a|pos": 0.2 + 0.8*rng.Float64(), "b|pos": 0.2 + 0.8*rng.Float64()}
			labels := make([]string, len(w.ledger))
			var items []verdict.Item
			for i, l := range w.ledger {
				labels[i] = "neg"
				if rng.Float64() < rate[l.Stratum] {
					labels[i] = "pos"
				}
				if trial%5 == 0 && rng.IntN(40) == 0 {
					labels[i] = drawfolder.Unsure // in the prefix only: the record would use a spare
				}
				items = append(items, verdict.Item{RecordID: l.RecordID, Item: l.Item, Stratum: index[l.Stratum], Label: labels[i], Predictions: l.Predictions})
			}
			// the record's verdicts, with unsure items labeled as their truth
			final := slices.Clone(items)
			for i := range final {
				if final[i].Label == drawfolder.Unsure {
					final[i].Label = "pos"
				}
			}
			res, err := claims.Judge(w.plan, w.man, sortedByStratum(final))
			if err != nil {
				t.Fatal(err)
			}
			for _, L := range []int{0, rng.IntN(len(w.ledger)), len(w.ledger) / 2, len(w.ledger)} {
				ws := make([]drawfolder.WorksheetRow, len(w.ledger))
				for i, l := range w.ledger {
					ws[i] = drawfolder.WorksheetRow{Item: l.Item, RecordID: l.RecordID, Line: i + 2}
					if i < L {
						ws[i].Label = labels[i]
					}
				}
				got, err := AssessMeasures(Input{Plan: w.plan, Ledger: w.ledger, Worksheet: ws, WorksheetName: "labels.csv", Strata: w.man.Strata}, w.man)
				if err != nil {
					t.Fatal(err)
				}
				for i, c := range got.Claims {
					want := sequential.Reject
					if res.Measures[i].Verdict == record.Accept {
						want = sequential.Accept
					}
					if c.Decision != sequential.Continue {
						decided++
						if c.Decision != want {
							t.Fatalf("%v trial %d, %d labeled: %s of %s decided %s, the record says %s", mult, trial, L, c.Measure, c.Candidate, c.Decision, want)
						}
					}
					if L == len(w.ledger) && !slices.Contains(labels, drawfolder.Unsure) && c.Decision != want {
						t.Fatalf("%v trial %d, all labeled: %s of %s is %s, the record says %s", mult, trial, c.Measure, c.Candidate, c.Decision, want)
					}
				}
			}
		}
	}
	if decided < 100 {
		t.Errorf("only %d decisions: the test exercises too little", decided)
	}
	t.Logf("%d decisions checked", decided)
}

// sortedByStratum puts items in the record's order: within a stratum, in
// key (worksheet) order.
func sortedByStratum(items []verdict.Item) []verdict.Item {
	out := slices.Clone(items)
	slices.SortStableFunc(out, func(a, b verdict.Item) int { return a.Stratum - b.Stratum })
	return out
}
