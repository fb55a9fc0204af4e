package claims_test

import (
	"bytes"
	"fmt"
	"os"
	"slices"
	"sort"
	"strings"
	"testing"
	"time"

	"probity/plan"
	"probity/plan/measure"
	"probity/plan/record"
	"probity/plan/record/claims"
	"probity/plan/record/intake"
	"probity/sampling"
	"probity/sampling/drawfolder"
)

// The whole audit of a measure at its ceiling, through the real draw: an
// invented prediction log with rare positives and a hidden truth, a plan
// with measures (measure.BuildPlan, as probity plan builds it), each run a
// fresh period (a new selection seed) drawn by sampling.Draw — which
// stratifies by the candidates' predictions, crossed with the user's
// sections, and sizes the design on the log's strata —, the folder it
// would write read back (drawfolder.OpenContent), the worksheet labeled
// from the hidden truth, the record's intake (intake.Check) and the
// record's judgement of the claims (claims.Judge).
//
// The truth puts the claim exactly at its ceiling, its events spread the
// worst ways the design allows: first into the stratum with the fewest
// labels per decision (the count rule's least favourable spread; within a
// stratum the draw's keys make the labeled items a simple random sample,
// so which rows hold the events does not matter), or first into the band
// next to the threshold. The numerator's events (misses for fnr, false
// alarms for fpr) and the denominator's complement events (false alarms
// for fnr, misses for fpr) are both spread so.
//
// The claim's stated risk is its share of δ = 0.05 (Bonferroni over the
// plan's K claims: δ/K). The test fails when the one-sided binomial test
// of "acceptance rate ≤ δ/K" rejects at level 0.001. PROBITY_DEEP_MC=1
// runs ten times the repetitions; -short skips it (six scenarios, about
// 100 s in all on one core of the development machine, most of it the
// draw's design search).

// drawDelta is the plan's δ.
const drawDelta = 0.05

// drawSections are the user's strata of the log: three sections of
// 9 000, 4 000 and 2 000 decisions.
var drawSections = []struct {
	name string
	size int
}{{"north", 9000}, {"south", 4000}, {"tunnels", 2000}}

// drawScenario is one audit: the candidates, the claim under test (the
// plan's first) and how its events are spread.
type drawScenario struct {
	name      string
	threshold bool // score-threshold candidates (else one label column)
	measure   string
	ceiling   float64
	spread    string // "fewest" (fewest labels per decision first) or "near" (next to the threshold first)
	runs      int    // repetitions (before drawReps)
	// prevalence is the truth's share of positives (the plan anticipates
	// 3 %)
	prevalence float64
}

// drawPipeline is a scenario's plan and log; truth[id] is the hidden label.
type drawPipeline struct {
	plan   *plan.File
	fp     string
	cands  []string
	log    []byte
	truth  map[string]string
	strata []string
}

// scoreOf is the score of the i-th decision of a section: 88 % below
// 0.4, 7.3 % in [0.4, 0.5) (near the threshold, cleared) and 4.7 % at or
// above 0.5 (flagged) — the share the plan anticipates for the 0.5
// threshold (0.92·3 % caught positives and 2 % of the negatives).
func scoreOf(i, n int) float64 {
	u := (float64(i) + 0.5) / float64(n)
	switch {
	case u < 0.88:
		return 0.4 * u / 0.88
	case u < 0.953:
		return 0.4 + 0.1*(u-0.88)/0.073
	}
	return 0.5 + 0.5*(u-0.953)/0.047
}

// newDrawPipeline writes the log without truth, builds the plan, draws one
// period to learn the design's strata and labels per decision, and places
// the truth with the claim under test at value.
func newDrawPipeline(t *testing.T, sc drawScenario, value float64) *drawPipeline {
	t.Helper()
	var cands []plan.Candidate
	if sc.threshold {
		for _, th := range []float64{0.4, 0.5} {
			th := th
			cands = append(cands, plan.Candidate{Name: fmt.Sprintf("score>=%.1f", th), ScoreColumn: "score", Threshold: &th, Positive: "defect", Negative: "sound"})
		}
	} else {
		cands = []plan.Candidate{{Name: "model", Column: "pred"}}
	}
	in := plan.Inputs{Ceiling: 0.05, Confidence: 1 - drawDelta, CandidateCount: len(cands), ProducerRisk: 0.1,
		Method: plan.MethodExact, Multiplicity: plan.Bonferroni, Design: plan.DesignFixed, Require: plan.RequireAll}
	f, err := plan.Build(in, plan.Meta{ToolVersion: "test", Created: time.Date(2026, 1, 1, 0, 0, 0, 0, time.UTC), Seed: "5eed",
		Classes: []string{"sound", "defect"}, Candidates: cands})
	if err != nil {
		t.Fatal(err)
	}
	spec := measure.Spec{Candidates: f.Candidates, Positive: "defect", Prevalence: 0.03, Decisions: 15000,
		Anticipated: []string{"fnr:0.08", "fpr:0.02"}, Confidence: 1 - drawDelta, ProducerRisk: 0.1, Multiplicity: plan.Bonferroni}
	// the claim under test first: the last candidate (the 0.5 threshold)
	spec.Claims = append(spec.Claims, plan.MeasureClaim{Candidate: cands[len(cands)-1].Name, Measure: sc.measure, Ceiling: sc.ceiling})
	for _, c := range cands[:len(cands)-1] {
		spec.Claims = append(spec.Claims, plan.MeasureClaim{Candidate: c.Name, Measure: sc.measure, Ceiling: sc.ceiling})
	}
	if f.Measures, err = measure.BuildPlan(spec); err != nil {
		t.Fatal(err)
	}
	data, err := f.Marshal()
	if err != nil {
		t.Fatal(err)
	}
	p := &drawPipeline{plan: f, fp: plan.Fingerprint(data), truth: map[string]string{}, strata: []string{"section"}}
	for _, c := range cands {
		p.cands = append(p.cands, c.Name)
	}
	// rows per stratum (section|band), in log order; the label column
	// predicts as the 0.5 threshold would
	var b strings.Builder
	b.WriteString("record_id,section,score,pred\n")
	rows := map[string][]string{} // stratum label → ids
	for _, s := range drawSections {
		for i := range s.size {
			score := scoreOf(i, s.size)
			pred := "sound"
			if score >= 0.5 {
				pred = "defect"
			}
			id := fmt.Sprintf("%s-%05d", s.name, i)
			fmt.Fprintf(&b, "%s,%s,%.4f,%s\n", id, s.name, score, pred)
			rows[drawStratum(sc.threshold, s.name, score)] = append(rows[drawStratum(sc.threshold, s.name, score)], id)
		}
	}
	p.log = []byte(b.String())
	c := p.draw(t, "design")
	p.placeTruth(t, sc, value, c.Manifest, rows)
	return p
}

// drawStratum is the label the draw gives a decision's stratum: the
// section, then the prediction (label column) or the band at the
// thresholds.
func drawStratum(threshold bool, section string, score float64) string {
	if !threshold {
		if score >= 0.5 {
			return section + "|defect"
		}
		return section + "|sound"
	}
	switch {
	case score < 0.4:
		return section + "|[0,0.4)"
	case score < 0.5:
		return section + "|[0.4,0.5)"
	}
	return section + "|[0.5,1]"
}

// placeTruth puts the claim under test exactly at θ with P positives (the
// scenario's prevalence): fnr puts ⌈θ·P⌉ misses among the tested candidate's
// cleared strata and leaves its flagged strata ⌈…⌉ false alarms (all of
// the flagged but the P − FN caught positives); fpr puts ⌈θ·(N − P)⌉
// false alarms among the flagged strata and the positives they leave over
// among the cleared. Each group of events is filled stratum by stratum in
// the spread's order.
func (p *drawPipeline) placeTruth(t *testing.T, sc drawScenario, theta float64, m *drawfolder.Manifest, rows map[string][]string) {
	t.Helper()
	test := len(p.plan.Candidates) - 1 // the 0.5 threshold, or the one label column
	var cleared, flagged []int
	for h := range m.Strata {
		if m.Measures.Flagged[h][test] {
			flagged = append(flagged, h)
		} else {
			cleared = append(cleared, h)
		}
	}
	perDecision := func(h int) float64 { return float64(m.Strata[h].Sample) / float64(m.Strata[h].Population) }
	near := func(h int) int { // 0 next to the 0.5 threshold, larger further away
		l := m.Strata[h].Label
		switch {
		case strings.HasSuffix(l, "[0.4,0.5)"):
			return 0
		case strings.HasSuffix(l, "[0.5,1]"), strings.HasSuffix(l, "|defect"):
			return 0
		}
		return 1
	}
	order := func(hs []int) []int {
		out := slices.Clone(hs)
		sort.SliceStable(out, func(i, j int) bool {
			if sc.spread == "near" && near(out[i]) != near(out[j]) {
				return near(out[i]) < near(out[j])
			}
			return perDecision(out[i]) < perDecision(out[j])
		})
		return out
	}
	var N int64
	for _, s := range m.Strata {
		N += s.Population
	}
	size := func(hs []int) int64 {
		var n int64
		for _, h := range hs {
			n += m.Strata[h].Population
		}
		return n
	}
	// events per stratum: fill in order
	fill := func(k int64, hs []int) map[int]int64 {
		out := map[int]int64{}
		for _, h := range hs {
			n := min(k, m.Strata[h].Population)
			out[h], k = n, k-n
		}
		if k > 0 {
			t.Fatalf("%s: %d events do not fit", sc.name, k)
		}
		return out
	}
	positives := map[int]int64{}
	P := int64(float64(N)*sc.prevalence + 0.5)
	switch sc.measure {
	case "fnr": // misses among the cleared, the caught ones leave false alarms where least labeled
		fn := ceilInt(theta * float64(P))
		for h, k := range fill(fn, order(cleared)) {
			positives[h] = k
		}
		// the false alarms (flagged negatives) are the denominator's
		// complement events: spread them the worst way, the caught
		// positives filling the best-labeled flagged strata first
		fp := size(flagged) - (P - fn)
		for h, k := range fill(fp, order(flagged)) {
			positives[h] = m.Strata[h].Population - k
		}
	case "fpr": // false alarms among the flagged, misses among the cleared where least labeled
		// the flagged hold all the positives but the misses; with M misses,
		// fpr = FP/(N − P) where FP = size(flagged) − (P − M)
		neg := N - P
		fp := ceilInt(theta * float64(neg))
		M := fp - size(flagged) + P // misses that make FP false alarms
		if M < 0 {
			t.Fatalf("%s: the flagged strata cannot hold %d false alarms", sc.name, fp)
		}
		for h, k := range fill(fp, order(flagged)) {
			positives[h] = m.Strata[h].Population - k
		}
		for h, k := range fill(M, order(cleared)) {
			positives[h] = k
		}
	}
	for h, s := range m.Strata {
		for i, id := range rows[s.Label] {
			p.truth[id] = "sound"
			if int64(i) < positives[h] {
				p.truth[id] = "defect"
			}
		}
	}
	if len(p.truth) != int(N) {
		t.Fatalf("%s: truth for %d of %d decisions", sc.name, len(p.truth), N)
	}
}

func ceilInt(v float64) int64 {
	r := int64(v)
	if float64(r) < v-1e-9 {
		r++
	}
	return r
}

// draw draws one period's sample.
func (p *drawPipeline) draw(t *testing.T, period string) *drawfolder.Content {
	t.Helper()
	in := sampling.DrawInput{Plan: p.plan, PlanFingerprint: p.fp, LogPath: "log.csv", Log: bytes.NewReader(p.log),
		Format: sampling.FormatCSV, Period: period, IDColumn: "record_id", StrataColumns: slices.Clone(p.strata),
		ToolVersion: "test", Workers: 1, ChunkSize: 1 << 16}
	// the prediction strata and the design's allocation, as draw adds them
	if err := sampling.AddPredictionStrata(&in); err != nil {
		t.Fatal(err)
	}
	c, err := sampling.Draw(in)
	if err != nil {
		t.Fatal(err)
	}
	if c.Manifest.Measures == nil {
		t.Fatal("the draw recorded no measures design")
	}
	return c
}

// drawAndJudge is one run: a fresh period, the worksheet labeled from the
// truth, the intake and the claims' judgement. It returns the tested
// claim's verdict and the labels drawn.
func (p *drawPipeline) drawAndJudge(t *testing.T, period string) (record.MeasureVerdict, int) {
	t.Helper()
	c := p.draw(t, period)
	f, err := drawfolder.OpenContent(c, p.fp, p.cands)
	if err != nil {
		t.Fatal(err)
	}
	rows := slices.Clone(c.Worksheet)
	for i := range rows {
		if !c.Ledger[i].Spare {
			rows[i].Label = p.truth[c.Ledger[i].RecordID]
		}
	}
	var buf bytes.Buffer
	if err := drawfolder.WriteWorksheet(&buf, c.Show, rows); err != nil {
		t.Fatal(err)
	}
	l, err := drawfolder.ParseLabels(buf.Bytes(), "labels.csv")
	if err != nil {
		t.Fatal(err)
	}
	checked, err := intake.Check(p.plan, p.fp, f, l, intake.Options{})
	if err != nil {
		t.Fatal(err)
	}
	res, err := claims.Judge(p.plan, f.Manifest, checked.Items)
	if err != nil {
		t.Fatal(err)
	}
	return res.Measures[0], c.Manifest.SampleSize
}

func drawReps(r int) int {
	switch {
	case os.Getenv("PROBITY_DEEP_MC") != "":
		return 10 * r
	}
	return r
}

func TestDrawPipelineAtTheCeiling(t *testing.T) {
	if testing.Short() {
		t.Skip("long (the draw searches the design again every period); runs without -short")
	}
	scenarios := []drawScenario{
		// the draw searches the design again on every period's strata:
		// about 0.7 s a run for two thresholds' miss rates on nine strata,
		// hence fewer runs there
		// (at fnr 0.3 the 4 % positives leave the flagged about the
		// false alarms the plan anticipates, so the denominator's side
		// passes and the numerator's test is what stands in the way;
		// fpr's ceiling 0.04 is the most false alarms the flagged 4.7 %
		// can hold with 3 % positives)
		{"fnr, thresholds, fewest labels first", true, "fnr", 0.3, "fewest", 60, 0.04},
		{"fnr, thresholds, near the threshold first", true, "fnr", 0.3, "near", 60, 0.04},
		{"fpr, thresholds, fewest labels first", true, "fpr", 0.04, "fewest", 300, 0.03},
		{"fpr, thresholds, near the threshold first", true, "fpr", 0.04, "near", 300, 0.03},
		{"fnr, label column, fewest labels first", false, "fnr", 0.3, "fewest", 60, 0.04},
		{"fpr, label column, fewest labels first", false, "fpr", 0.04, "fewest", 300, 0.03},
	}
	for _, sc := range scenarios {
		runs := drawReps(sc.runs)
		t.Run(sc.name, func(t *testing.T) {
			p := newDrawPipeline(t, sc, sc.ceiling)
			K := len(p.plan.Measures.Claims)
			risk := drawDelta / float64(K)
			accepted, labels := 0, 0
			for r := range runs {
				v, n := p.drawAndJudge(t, fmt.Sprintf("%s-%d", sc.spread, r))
				if v.Verdict == record.Accept {
					accepted++
				}
				labels = n
			}
			pv := plan.BinomialSF(accepted-1, runs, risk) // P(Bin(runs, δ/K) ≥ accepted)
			t.Logf("%s at %v: %d labels a run, accepted %d of %d (stated risk %.3g; P(Bin ≥ %d) = %.3g)", sc.measure, sc.ceiling, labels, accepted, runs, risk, accepted, pv)
			if pv < 0.001 {
				t.Errorf("accepted %d of %d at the ceiling: the stated risk %.3g is exceeded (one-sided binomial p = %.3g < 0.001)", accepted, runs, risk, pv)
			}
		})
	}
}

// TestDrawPipelinePower is the control of TestDrawPipelineAtTheCeiling:
// the same pipeline with the miss rate well below the ceiling (0.05
// against 0.3, misses where the fewest labels are) accepts, so the runs at
// the ceiling reject because of the truth and not because the pipeline
// cannot accept.
func TestDrawPipelinePower(t *testing.T) {
	sc := drawScenario{"fnr, label column, well below the ceiling", false, "fnr", 0.3, "fewest", 5, 0.03}
	p := newDrawPipeline(t, sc, 0.05)
	accepted := 0
	for r := range sc.runs {
		if v, _ := p.drawAndJudge(t, fmt.Sprintf("power-%d", r)); v.Verdict == record.Accept {
			accepted++
		}
	}
	// P(accept) ≈ 1 at fnr 0.05 (the design's producer's risk is 10 % at
	// the anticipated 0.08): at least 4 of 5 (common practice, no source)
	if accepted < 4 {
		t.Errorf("accepted %d of %d with fnr 0.05 against a ceiling of 0.3", accepted, sc.runs)
	}
}
