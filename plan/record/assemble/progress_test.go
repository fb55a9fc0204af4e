package assemble_test

import (
	"fmt"
	"math/rand/v2"
	"testing"

	"probity/plan"
	"probity/plan/progress"
	"probity/plan/record"
	"probity/plan/sequential"
	"probity/sampling"
	"probity/sampling/drawfolder"
)

// TestProgressStopsAreNeverReversed: progress announces a stop only when
// the record cannot decide otherwise. For random draws of invented
// populations under every allocation and both designs, a worksheet is
// labeled from the top at random (some items unsure); wherever progress
// says "accept — stop" or "reject — stop", the worksheet is completed in
// several ways — the rest labeled at random, all errors, or all correct,
// each unsure item resolved either way or left unsure (then replaced by
// its stratum's spares, labeled at random, or counted as an error with
// incomplete labeling allowed) — and the record's judgement of every
// completion must be the announced decision. Fixed seed; the number of
// stops checked is logged (common practice, no source).
func TestProgressStopsAreNeverReversed(t *testing.T) {
	trials := 40
	if testing.Short() {
		trials = 8
	}
	p0 := 0.05
	in := plan.Inputs{Ceiling: 0.1, Confidence: 0.9, CandidateCount: 1, Anticipated: &p0, ProducerRisk: 0.1,
		Method: plan.MethodExact, Multiplicity: plan.Bonferroni, Design: plan.DesignFixed, Require: plan.RequireAll}
	N := []int64{900, 450, 120, 30}
	errs := []int64{50, 60, 20, 10} // 140 of 1500: near the ceiling of 10 %
	type setup struct {
		name string
		seq  bool
		N    []int64
		errs []int64
		a    sampling.AllocOptions
	}
	setups := []setup{
		{"proportional, rounded up", false, N, errs, sampling.AllocOptions{Rule: sampling.Proportional, Rounding: sampling.RoundUp, MinPerStratum: 1, MinIfRoom: true, Spare: 3}},
		{"proportional, largest remainder", false, N, errs, sampling.AllocOptions{Rule: sampling.Proportional, Rounding: sampling.RoundLargestRemainder, Spare: 3}},
		{"equal", false, N, errs, sampling.AllocOptions{Rule: sampling.Equal, Spare: 3}},
		{"neyman", false, N, errs, sampling.AllocOptions{Rule: sampling.Neyman, Spare: 3,
			Anticipated: map[string]float64{"s000": 0.03, "s001": 0.1, "s002": 0.15, "s003": 0.3}}},
		{"proportional, minimum 30", false, N, errs, sampling.AllocOptions{Rule: sampling.Proportional, Rounding: sampling.RoundUp, MinPerStratum: 30, Spare: 3}},
		{"one stratum", false, []int64{1500}, []int64{140}, sampling.AllocOptions{Spare: 3}},
		{"sequential, one stratum", true, []int64{1500}, []int64{140}, sampling.AllocOptions{Spare: 3}},
	}
	rng := rand.New(rand.NewPCG(13, 31))
	stops, completions := 0, 0
	for _, s := range setups {
		p := newPipeline(t, s.name, in, s.seq, s.N, s.errs, s.a)
		for trial := 0; trial < trials; trial++ {
			c, err := p.draw(fmt.Sprintf("%s-%d", s.name, trial))
			if err != nil {
				t.Fatal(err)
			}
			f, err := drawfolder.OpenContent(c, p.fp, []string{"model"})
			if err != nil {
				t.Fatal(err)
			}
			sample := 0
			for _, l := range c.Ledger {
				if !l.Spare {
					sample++
				}
			}
			// a labeled prefix: random labels, a few unsure; half the
			// prefixes end in the last tenth of the sample and carry about
			// the plan's c errors, where stops are close calls
			top := rng.IntN(sample + 1)
			errRate := []float64{0.02, 0.08, 0.2}[rng.IntN(3)]
			if trial%2 == 1 {
				top = sample - rng.IntN(sample/10+1)
				errRate = float64(p.plan.Rule.AcceptanceNumber) / float64(p.plan.Rule.SampleSize) * (0.2 + 0.8*rng.Float64())
			}
			rows := append([]drawfolder.WorksheetRow(nil), c.Worksheet...)
			for i := 0; i < top; i++ {
				rows[i].Label = randomLabel(rng, c.Ledger[i].Predictions[0], errRate)
				if rng.IntN(25) == 0 {
					rows[i].Label = drawfolder.Unsure
				}
			}
			// sometimes the spares are labeled too, so progress judges the
			// spare that replaces an unsure item (under the count rule the
			// record judges it after its stratum's sample items)
			if trial%4 == 3 && !s.seq {
				top = sample
				for i := range rows {
					if c.Ledger[i].Spare {
						rows[i].Label = randomLabel(rng, c.Ledger[i].Predictions[0], errRate)
					} else if rows[i].Label == "" {
						rows[i].Label = randomLabel(rng, c.Ledger[i].Predictions[0], errRate)
						if rng.IntN(25) == 0 {
							rows[i].Label = drawfolder.Unsure
						}
					}
				}
			}
			res, err := progress.Assess(progress.Input{Plan: p.plan, Ledger: c.Ledger, Worksheet: rows, WorksheetName: "labels.csv",
				Strata: c.Manifest.Strata, Rates: c.Manifest.AnticipatedRates()})
			if err != nil {
				t.Fatal(err)
			}
			dec := res.Candidates[0].Decision
			if dec == sequential.Continue {
				continue
			}
			stops++
			want := record.Accept
			if dec == sequential.Reject {
				want = record.Reject
			}
			for k := 0; k < 6; k++ {
				done, allow := complete(rng, c, rows, top, k, s.seq)
				l := labelsOf(t, c, done)
				r, err := p.judge(f, l, allow)
				if err != nil {
					t.Fatalf("%s, trial %d, completion %d: %v", s.name, trial, k, err)
				}
				completions++
				if r.Overall != want {
					t.Errorf("%s, trial %d: progress said %s after %d labels (%s), the record of completion %d says %s (%s)",
						s.name, trial, dec, res.Candidates[0].StoppedAt, res.Candidates[0].Reason, k, r.Overall, r.Candidates[0].Reason)
				}
			}
		}
	}
	t.Logf("%d stops, each completed 6 ways: %d records, none reversed a stop", stops, completions)
	if stops < trials*len(setups)/4 {
		t.Errorf("only %d stops: the test does not exercise stopping", stops)
	}
}

// randomLabel is the true label that makes the prediction an error with
// probability rate.
func randomLabel(rng *rand.Rand, pred string, rate float64) string {
	other := map[string]string{"ok": "bad", "bad": "ok"}[pred]
	if rng.Float64() < rate {
		return other
	}
	return pred
}

// complete labels the rest of a worksheet labeled down to top: way 0 makes
// every remaining sample item and every unsure one an error, way 1 none,
// the others label at random, and an unsure item resolves to an error, to
// a correct label, or stays unsure,
// and then the stratum's spares are labeled (at random) or incomplete
// labeling is allowed (allow; always for a sequential plan, which uses no
// spares).
func complete(rng *rand.Rand, c *drawfolder.Content, rows []drawfolder.WorksheetRow, top, way int, seq bool) ([]drawfolder.WorksheetRow, bool) {
	out := append([]drawfolder.WorksheetRow(nil), rows...)
	rate := rng.Float64()
	switch way {
	case 0:
		rate = 1
	case 1:
		rate = 0
	}
	for i := range out {
		pred := c.Ledger[i].Predictions[0]
		switch {
		case c.Ledger[i].Spare:
		case i >= top:
			out[i].Label = randomLabel(rng, pred, rate)
		case out[i].Label == drawfolder.Unsure && way < 2:
			out[i].Label = randomLabel(rng, pred, rate) // the extremes resolve every unsure item
		case out[i].Label == drawfolder.Unsure:
			switch rng.IntN(3) {
			case 0:
				out[i].Label = randomLabel(rng, pred, 1)
			case 1:
				out[i].Label = randomLabel(rng, pred, 0)
			}
		}
	}
	allow := seq || rng.IntN(2) == 0 // a sequential plan uses no spares
	if !allow {
		// spares replace the unsure items of their stratum, in order
		need := map[string]int{}
		for i := range out {
			if !c.Ledger[i].Spare && out[i].Label == drawfolder.Unsure {
				need[c.Ledger[i].Stratum]++
			}
		}
		for i := range out {
			st := c.Ledger[i].Stratum
			if c.Ledger[i].Spare && need[st] > 0 {
				out[i].Label = randomLabel(rng, c.Ledger[i].Predictions[0], rate)
				need[st]--
			}
		}
		for _, v := range need {
			if v > 0 {
				allow = true // too few spares: count the rest as errors
			}
		}
	}
	return out, allow
}

// labelsOf reads the labeled worksheet back from its bytes.
func labelsOf(t *testing.T, c *drawfolder.Content, rows []drawfolder.WorksheetRow) *drawfolder.Labels {
	t.Helper()
	return labeled(t, c, func(r []drawfolder.WorksheetRow) { copy(r, rows) })
}
