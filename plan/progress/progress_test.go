package progress

import (
	"errors"
	"fmt"
	"strings"
	"testing"

	"probity/plan"
	"probity/plan/inputerr"
	"probity/plan/sequential"
	"probity/sampling/drawfolder"
)

// fixture builds a plan with the given candidates and rule, a ledger of
// n items (+ spares) whose predictions are all "ok", and a worksheet with
// the given labels ("" unlabeled). A candidate errs on an item when the
// label is "bad". (Invented data; common practice, no source.)
func fixture(n, c, spares int, cands []string, labels []string) Input {
	p := &plan.File{
		Format: plan.FileFormat, Seed: "00", Classes: []string{"ok", "bad"},
		Inputs: plan.Inputs{Ceiling: 0.2, Confidence: 0.95, CandidateCount: len(cands), Multiplicity: plan.Bonferroni, Design: plan.DesignFixed, Require: plan.RequireAll},
		Rule:   plan.Rule{SampleSize: n, AcceptanceNumber: c},
	}
	for _, name := range cands {
		p.Candidates = append(p.Candidates, plan.Candidate{Name: name, Column: name})
	}
	var led []drawfolder.LedgerRow
	var ws []drawfolder.WorksheetRow
	for i := 0; i < n+spares; i++ {
		preds := make([]string, len(cands))
		for j := range preds {
			preds[j] = "ok"
		}
		id := fmt.Sprintf("r%03d", i+1)
		led = append(led, drawfolder.LedgerRow{Item: i + 1, RecordID: id, Spare: i >= n, Predictions: preds})
		l := ""
		if i < len(labels) {
			l = labels[i]
		}
		ws = append(ws, drawfolder.WorksheetRow{Item: i + 1, RecordID: id, Label: l, Line: i + 2})
	}
	return Input{Plan: p, Ledger: led, Worksheet: ws, WorksheetName: "labels.csv"}
}

func labelsOf(s string) []string {
	var out []string
	for _, ch := range s {
		switch ch {
		case 'o':
			out = append(out, "ok")
		case 'x':
			out = append(out, "bad")
		case '?':
			out = append(out, drawfolder.Unsure)
		case '_':
			out = append(out, "")
		}
	}
	return out
}

func TestFixedCurtailment(t *testing.T) {
	cases := []struct {
		labels  string
		want    sequential.Decision
		stopped int
		maxRem  int
	}{
		{"oxoxoox", sequential.Reject, 7, 0},             // third error at item 7 > c = 2
		{"oooooooooooooooooo", sequential.Accept, 18, 0}, // 0 errors, 2 left: at most 2 ≤ c
		{"xoooooooooooooooooo", sequential.Accept, 19, 0},
		{"xxooooooooooooooooo", sequential.Continue, 0, 1},
		{"oooo", sequential.Continue, 0, 16},
		{"", sequential.Continue, 0, 20},
		{"xxoooooooooooooooooo", sequential.Accept, 20, 0},
	}
	for _, c := range cases {
		in := fixture(20, 2, 0, []string{"A"}, labelsOf(c.labels))
		res, err := Assess(in)
		if err != nil {
			t.Fatalf("%q: %v", c.labels, err)
		}
		got := res.Candidates[0]
		if got.Decision != c.want || got.StoppedAt != c.stopped || got.MaxRemaining != c.maxRem {
			t.Errorf("%q: %s at %d, max remaining %d; want %s at %d, %d (%s)", c.labels, got.Decision, got.StoppedAt, got.MaxRemaining, c.want, c.stopped, c.maxRem, got.Reason)
		}
	}
}

// The prefix rule: a gap followed by labels is refused, naming both items.
func TestGapBreaksPrefixRule(t *testing.T) {
	in := fixture(20, 2, 0, []string{"A"}, labelsOf("ooo_oo"))
	_, err := Assess(in)
	var ie *inputerr.Error
	if !errors.As(err, &ie) {
		t.Fatalf("err = %v, want *inputerr.Error", err)
	}
	if ie.Line != 6 || ie.Field != "label" || !strings.Contains(ie.Msg, "item 5 is labeled but item 4 above it (line 5) is not") || !strings.Contains(ie.Msg, "prefix") {
		t.Errorf("error = %q (line %d, column %s)", ie.Error(), ie.Line, ie.Field)
	}
	if !strings.Contains(ie.Hint, "label item 4") {
		t.Errorf("hint = %q", ie.Hint)
	}
}

func TestBadWorksheets(t *testing.T) {
	in := fixture(10, 1, 0, []string{"A"}, labelsOf("oo"))
	in.Worksheet[1].Label = "maybe"
	if _, err := Assess(in); err == nil || !strings.Contains(err.Error(), `label "maybe" (item 2) is not one of the plan's classes (ok, bad)`) {
		t.Errorf("unknown label: %v", err)
	}
	in = fixture(10, 1, 0, []string{"A"}, labelsOf("oo"))
	in.Worksheet[3].RecordID = "other"
	if _, err := Assess(in); err == nil || !strings.Contains(err.Error(), `labels.csv line 5, field record_id: item 4 is "other"`) {
		t.Errorf("altered id: %v", err)
	}
	in = fixture(10, 1, 0, []string{"A"}, labelsOf("oo"))
	in.Worksheet = in.Worksheet[:9]
	if _, err := Assess(in); err == nil || !strings.Contains(err.Error(), "has 9 items but the draw's ledger has 10") {
		t.Errorf("removed row: %v", err)
	}
	in = fixture(10, 1, 0, []string{"A"}, nil)
	in.Plan.Candidates = nil
	if _, err := Assess(in); err == nil {
		t.Error("sizing-only plan accepted")
	}
}

// Unsure labels never make a stop that resolving them could reverse.
func TestUnsureIsBounded(t *testing.T) {
	// n 20, c 2: two errors and one unsure in 18: pessimistic 3 errors
	// would exceed c → no acceptance; optimistic 2 → no rejection.
	res, _ := Assess(fixture(20, 2, 0, []string{"A"}, labelsOf("xx?ooooooooooooooo")))
	if d := res.Candidates[0].Decision; d != sequential.Continue {
		t.Errorf("decision %s, want continue", d)
	}
	// three unsure and nothing else: no rejection (they may be correct)
	res, _ = Assess(fixture(20, 2, 0, []string{"A"}, labelsOf("???")))
	if d := res.Candidates[0].Decision; d != sequential.Continue {
		t.Errorf("decision %s, want continue", d)
	}
	if len(res.Notes) == 0 || !strings.Contains(res.Notes[0], "unsure") {
		t.Errorf("notes %v", res.Notes)
	}
}

func TestSparesIgnored(t *testing.T) {
	in := fixture(5, 0, 2, []string{"A"}, labelsOf("ooooox"))
	res, err := Assess(in)
	if err != nil {
		t.Fatal(err)
	}
	if res.Labeled != 5 || res.SparesLabeled != 1 || res.Candidates[0].Decision != sequential.Accept {
		t.Errorf("labeled %d spares %d decision %s", res.Labeled, res.SparesLabeled, res.Candidates[0].Decision)
	}
}

func TestOverallAndFixedSequence(t *testing.T) {
	in := fixture(20, 2, 0, []string{"A", "B"}, labelsOf("oooooooooooooooooo"))
	// B errs on items 1–3: rejected at 3
	for i := 0; i < 3; i++ {
		in.Ledger[i].Predictions[1] = "bad"
	}
	res, _ := Assess(in)
	if res.Candidates[0].Decision != sequential.Accept || res.Candidates[1].Decision != sequential.Reject || res.Overall != sequential.Reject {
		t.Errorf("all: %s %s overall %s", res.Candidates[0].Decision, res.Candidates[1].Decision, res.Overall)
	}
	in.Plan.Inputs.Require = plan.RequireAny
	res, _ = Assess(in)
	if res.Overall != sequential.Accept {
		t.Errorf("any: overall %s", res.Overall)
	}
	// fixed-sequence with B first: A is then not tested
	in.Plan.Inputs.Require = plan.RequireAll
	in.Plan.Inputs.Multiplicity = plan.FixedSequence
	in.Plan.Candidates[0], in.Plan.Candidates[1] = in.Plan.Candidates[1], in.Plan.Candidates[0]
	for i := range in.Ledger {
		p := in.Ledger[i].Predictions
		p[0], p[1] = p[1], p[0]
	}
	res, _ = Assess(in)
	if res.Candidates[0].Decision != sequential.Reject || res.Candidates[1].Decision != sequential.Reject || !strings.Contains(res.Candidates[1].Reason, "not tested") {
		t.Errorf("fixed-sequence: %+v", res.Candidates)
	}
}

// Under Holm, rejection waits until the errors exceed c_δ, the most the
// last step at the full δ accepts: n 100, ceiling 0.2, δ 0.05, M 2:
// Bonferroni c (δ/2 = 0.025) and c_δ from plan.BinomialPValueAtLeast.
func TestHolmRejectsLater(t *testing.T) {
	c := 0
	for plan.BinomialPValueAtLeast(c+1, 100, 0.2) <= 0.025 {
		c++
	}
	cd := c
	for plan.BinomialPValueAtLeast(cd+1, 100, 0.2) <= 0.05 {
		cd++
	}
	if cd == c {
		t.Fatalf("test needs c_δ > c (c = %d)", c)
	}
	labels := strings.Repeat("x", c+1)
	in := fixture(100, c, 0, []string{"A", "B"}, labelsOf(labels))
	in.Plan.Inputs.Multiplicity = plan.Holm
	res, err := Assess(in)
	if err != nil {
		t.Fatal(err)
	}
	if d := res.Candidates[0].Decision; d != sequential.Continue {
		t.Errorf("Holm with %d errors (c %d, c_δ %d): %s, want continue", c+1, c, cd, d)
	}
	in = fixture(100, c, 0, []string{"A", "B"}, labelsOf(strings.Repeat("x", cd+1)))
	in.Plan.Inputs.Multiplicity = plan.Holm
	res, _ = Assess(in)
	if d := res.Candidates[0].Decision; d != sequential.Reject {
		t.Errorf("Holm with %d errors: %s, want reject", cd+1, d)
	}
}

// A sequential plan stops where its own boundaries do: the same as
// sequential.Rule.Judge on the error sequence.
func TestSequentialPlanMatchesJudge(t *testing.T) {
	d, err := sequential.Search(sequential.Spec{Ceiling: 0.2, Anticipated: 0.1, ConsumerRisk: 0.05, ProducerRisk: 0.1, FixedSampleSize: 120})
	if err != nil {
		t.Fatal(err)
	}
	T := d.Rule.MaxSampleSize
	r, _ := sequential.NewRule(d.Rule)
	seen := map[sequential.Decision]int{}
	for seed := 0; seed < 40; seed++ {
		var labels []string
		var errs []bool
		k := 0
		for i := 0; i < T; i++ {
			k = (k*1103515245 + 12345 + seed) & 0x7fffffff
			bad := k%100 < 5+seed/2
			errs = append(errs, bad)
			if bad {
				labels = append(labels, "bad")
			} else {
				labels = append(labels, "ok")
			}
		}
		upto := 20 + seed*7
		in := fixture(T, d.FinalAcceptance, 0, []string{"A"}, labels[:min(upto, T)])
		in.Plan.Sequential = d.Rule
		in.Plan.Inputs.Design = plan.DesignSequential
		res, err := Assess(in)
		if err != nil {
			t.Fatal(err)
		}
		want, at := r.Judge(errs[:min(upto, T)])
		seen[want]++
		got := res.Candidates[0]
		if got.Decision != want || (want != sequential.Continue && got.StoppedAt != at) {
			t.Errorf("seed %d: progress %s at %d, Judge %s at %d", seed, got.Decision, got.StoppedAt, want, at)
		}
		if want == sequential.Continue {
			e := 0
			for _, b := range errs[:min(upto, T)] {
				if b {
					e++
				}
			}
			mr, _ := r.MaxRemaining(min(upto, T), e)
			if got.MaxRemaining != mr {
				t.Errorf("seed %d: max remaining %d, want %d", seed, got.MaxRemaining, mr)
			}
		}
	}
	if seen[sequential.Continue] == 0 || seen[sequential.Accept] == 0 || seen[sequential.Reject] == 0 {
		t.Errorf("the cases do not cover every decision: %v", seen)
	}
}
