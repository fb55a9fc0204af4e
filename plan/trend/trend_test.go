package trend

import (
	"errors"
	"math"
	"strings"
	"testing"

	"probity/plan"
	"probity/plan/record"
)

func entries(rs []record.Record) []Entry {
	es := make([]Entry, len(rs))
	for i, r := range rs {
		es[i] = Entry{Path: r.Period + ".json", Record: r}
	}
	return es
}

func TestBuildYear(t *testing.T) {
	rs := yearRecords()
	// Give them out of order: Build sorts by period.
	rs[0], rs[7] = rs[7], rs[0]
	tr, err := Build(entries(rs), Options{Alpha: 0.05})
	if err != nil {
		t.Fatal(err)
	}
	if tr.Baseline != "2026-01" || tr.Latest.Label != "2026-12" || tr.Latest.OverallVerdict != record.Reject {
		t.Fatalf("baseline %s latest %s %s", tr.Baseline, tr.Latest.Label, tr.Latest.OverallVerdict)
	}
	if len(tr.Periods) != 12 || tr.Periods[0].Label != "2026-01" || tr.Periods[7].Label != "2026-08" {
		t.Fatalf("periods not sorted: %+v", tr.Periods)
	}
	names := []string{}
	for _, s := range tr.Candidates {
		names = append(names, s.Name)
	}
	if strings.Join(names, ",") != "router-a,router-b,threshold-0.62" {
		t.Fatalf("candidates %v", names)
	}
	b := tr.Candidates[1]
	// router-b: 0/613 in the baseline; 5/613 is flagged (p = 0.0310),
	// 4/613 is not (p = 0.0622).
	refs := []struct {
		period string
		p      float64
		tol    float64
		src    string
	}{
		{"2026-09", 0.062194002703289, 1e-12, "scipy.stats.fisher_exact([[4,609],[0,613]], 'greater') 1.10"},
		{"2026-10", 0.030995210839855163, 1e-12, "scipy.stats.fisher_exact([[5,608],[0,613]], 'greater') 1.10"},
		{"2026-12", 0.007679118521309855, 1e-12, "scipy.stats.fisher_exact([[7,606],[0,613]], 'greater') 1.10"},
	}
	for _, ref := range refs {
		var got *Point
		for i := range b.Rows {
			if b.Rows[i].Period == ref.period {
				got = &b.Rows[i]
			}
		}
		if got == nil || got.PValue == nil {
			t.Fatalf("no p-value for %s", ref.period)
		}
		if math.Abs(*got.PValue-ref.p) > ref.tol {
			t.Errorf("router-b %s: p = %.7g, want %.7g ± %g (%s)", ref.period, *got.PValue, ref.p, ref.tol, ref.src)
		}
	}
	if strings.Join(b.Flagged, ",") != "2026-10,2026-11,2026-12" {
		t.Errorf("router-b flagged %v, want 2026-10, 2026-11, 2026-12", b.Flagged)
	}
	// Flagged while still accepted: 2026-10 passes (5 ≤ c).
	if b.Rows[9].Verdict != record.Accept || !b.Rows[9].Flagged {
		t.Errorf("2026-10 should be flagged and accepted: %+v", b.Rows[9])
	}
	if b.Rows[0].PValue != nil || b.Rows[0].Flagged {
		t.Errorf("the baseline row has a test: %+v", b.Rows[0])
	}
	if len(tr.Candidates[0].Flagged) != 0 || len(tr.Candidates[2].Flagged) != 0 {
		t.Errorf("steady candidates flagged: %v %v", tr.Candidates[0].Flagged, tr.Candidates[2].Flagged)
	}
	if len(tr.Warnings) != 0 {
		t.Errorf("warnings on a consistent year: %v", tr.Warnings)
	}
	if tr.Class != (Class{Model: plan.ModelBinomial, Method: plan.MethodExact, Design: plan.DesignFixed, Ceiling: 0.02, Confidence: 0.95}) {
		t.Errorf("class %+v", tr.Class)
	}
}

func TestBuildBaselineOption(t *testing.T) {
	tr, err := Build(entries(yearRecords()), Options{Alpha: 0.05, Baseline: "2026-06"})
	if err != nil {
		t.Fatal(err)
	}
	b := tr.Candidates[1]
	if tr.Baseline != "2026-06" || b.Rows[5].PValue != nil {
		t.Fatalf("baseline row 2026-06 has a p-value: %+v", b.Rows[5])
	}
	// Earlier periods are compared too: 2026-01 (0 errors) vs 3 is not higher.
	if b.Rows[0].PValue == nil || *b.Rows[0].PValue != 1 {
		t.Errorf("2026-01 vs 2026-06: %+v, want p = 1", b.Rows[0])
	}
	_, err = Build(entries(yearRecords()), Options{Alpha: 0.05, Baseline: "2025-12"})
	var be *BaselineError
	if !errors.As(err, &be) || !strings.Contains(be.Hint(), "2026-01, 2026-02") {
		t.Errorf("unknown baseline: %v", err)
	}
	// Alpha is the level: at 0.1 the 4-error months are flagged too.
	tr, err = Build(entries(yearRecords()), Options{Alpha: 0.1})
	if err != nil {
		t.Fatal(err)
	}
	if got := strings.Join(tr.Candidates[1].Flagged, ","); got != "2026-08,2026-09,2026-10,2026-11,2026-12" {
		t.Errorf("alpha 0.1 flagged %s", got)
	}
	for _, a := range []float64{0, 1, -0.1, math.NaN()} {
		if _, err := Build(entries(yearRecords()), Options{Alpha: a}); !errors.Is(err, ErrOptions) {
			t.Errorf("alpha %v: err = %v", a, err)
		}
	}
}

func TestBuildRepeatedPeriod(t *testing.T) {
	rs := yearRecords()[:3]
	dup := rs[1]
	dup.RecordID = "000000000000"
	es := entries(append(rs, dup))
	es[3].Path = "copy/2026-02.json"
	_, err := Build(es, Options{Alpha: 0.05})
	var re *RepeatedPeriodError
	if !errors.As(err, &re) {
		t.Fatalf("err = %v, want RepeatedPeriodError", err)
	}
	if !strings.Contains(err.Error(), "2026-02.json") || !strings.Contains(err.Error(), "copy/2026-02.json") || re.SameRecord {
		t.Errorf("error %q must name both files", err)
	}
	es[3].Record.RecordID = rs[1].RecordID
	_, err = Build(es, Options{Alpha: 0.05})
	if !errors.As(err, &re) || !re.SameRecord || !strings.Contains(re.Hint(), "same record") {
		t.Errorf("same record twice: %v", err)
	}
}

func TestBuildRefusesMixedClasses(t *testing.T) {
	cases := []struct {
		field string
		edit  func(p *record.PlanInfo)
	}{
		{"plan.model", func(p *record.PlanInfo) { p.Model = plan.ModelHypergeometric; p.Population = 40000 }},
		{"plan.method", func(p *record.PlanInfo) { p.Method = plan.MethodHoeffding }},
		{"plan.design", func(p *record.PlanInfo) { p.Design = plan.DesignSequential }},
		{"plan.ceiling", func(p *record.PlanInfo) { p.Ceiling = 0.03 }},
		{"plan.confidence", func(p *record.PlanInfo) { p.Confidence = 0.99 }},
	}
	for _, c := range cases {
		rs := yearRecords()[:4]
		c.edit(&rs[2].Plan)
		_, err := Build(entries(rs), Options{Alpha: 0.05})
		var me *MixedClassError
		if !errors.As(err, &me) || me.Field != c.field {
			t.Errorf("%s: err = %v", c.field, err)
			continue
		}
		if !strings.Contains(err.Error(), "2026-03.json") || !strings.Contains(err.Error(), "2026-01.json") {
			t.Errorf("%s: error %q must name both files", c.field, err)
		}
	}
}

func TestBuildRefusesMixedPeriodShapes(t *testing.T) {
	rs := yearRecords()[:3]
	rs[2].Period = "2026-3"
	_, err := Build(entries(rs), Options{Alpha: 0.05})
	var pe *PeriodShapeError
	if !errors.As(err, &pe) || !strings.Contains(pe.Hint(), "zero-padded") {
		t.Fatalf("err = %v", err)
	}
}

func TestBuildWarnings(t *testing.T) {
	rs := yearRecords()[:8]
	// A new plan from 2026-05 with a fourth candidate (so M = 4 and the
	// bound confidence changes); router-a leaves in 2026-08.
	for i := 4; i < 8; i++ {
		rs[i].Plan.Fingerprint = fingerprint("second plan")
		for j := range rs[i].Candidates {
			rs[i].Candidates[j].BoundConfidence = 1 - 0.05/4
		}
		rs[i].Candidates = append(rs[i].Candidates, record.Candidate{Name: "router-c", Labeled: 613, Errors: 1,
			Estimate: 1.0 / 613, UpperBound: 0.009, BoundConfidence: 1 - 0.05/4, Verdict: record.Accept})
	}
	rs[7].Candidates = rs[7].Candidates[1:]
	// A stratified estimate in 2026-02.
	rs[1].Candidates[0].Estimate = 0.0021
	tr, err := Build(entries(rs), Options{Alpha: 0.05})
	if err != nil {
		t.Fatal(err)
	}
	all := strings.Join(tr.Warnings, "\n")
	for _, want := range []string{
		"records come from 2 different plans: plan " + fingerprint("plan of the ticket router audit")[:12] + " in 2026-01, 2026-02, 2026-03, 2026-04; plan " + fingerprint("second plan")[:12] + " in 2026-05, 2026-06, 2026-07, 2026-08",
		"candidate sets differ: router-c is not in 2026-01, 2026-02, 2026-03, 2026-04",
		"candidate sets differ: router-a is not in 2026-08",
		"router-c is not in the baseline period 2026-01, so none of its periods is tested",
		"router-b's upper bounds are at different confidences (98.333 % from 2026-01, 98.75 % from 2026-05)",
		"estimates in 2026-02 are stratified with unequal weights",
	} {
		if !strings.Contains(all, want) {
			t.Errorf("warnings lack %q:\n%s", want, all)
		}
	}
	// The candidate order: the latest record's, then earlier-only ones.
	var names []string
	for _, s := range tr.Candidates {
		names = append(names, s.Name)
	}
	if strings.Join(names, ",") != "router-b,threshold-0.62,router-c,router-a" {
		t.Errorf("order %v", names)
	}
}

func TestShapeAndPeriod(t *testing.T) {
	cases := []struct{ label, shape string }{
		{"2026-11", "9999-99"}, {"2026-Q3", "9999-A9"}, {"2026-w07", "9999-a99"}, {"2026.11.01", "9999.99.99"},
	}
	for _, c := range cases {
		if got := Shape(c.label); got != c.shape {
			t.Errorf("Shape(%q) = %q, want %q", c.label, got, c.shape)
		}
		if err := checkPeriod(c.label); err != nil {
			t.Errorf("checkPeriod(%q): %v", c.label, err)
		}
	}
	for _, bad := range []string{"", "-2026", "2026/11", "2026 11", strings.Repeat("9", 33), "2026-11é"} {
		if err := checkPeriod(bad); err == nil {
			t.Errorf("checkPeriod(%q) accepted", bad)
		}
	}
}

func TestBuildSingleRecordAndSequential(t *testing.T) {
	rs := yearRecords()[11:]
	tr, err := Build(entries(rs), Options{Alpha: 0.05})
	if err != nil {
		t.Fatal(err)
	}
	if tr.Baseline != "2026-12" || tr.Latest.Label != "2026-12" || len(tr.Candidates) != 3 {
		t.Fatalf("%+v", tr)
	}
	for _, s := range tr.Candidates {
		if len(s.Rows) != 1 || s.Rows[0].PValue != nil || len(s.Flagged) != 0 {
			t.Errorf("%s: a lone record has nothing to compare: %+v", s.Name, s)
		}
	}
	rs = yearRecords()[:2]
	for i := range rs {
		rs[i].Plan.Design = plan.DesignSequential
	}
	tr, err = Build(entries(rs), Options{Alpha: 0.05})
	if err != nil {
		t.Fatal(err)
	}
	if len(tr.Warnings) != 1 || !strings.Contains(tr.Warnings[0], "p-values are approximate") {
		t.Errorf("sequential warnings %v", tr.Warnings)
	}
}

// BenchmarkBuildYear measures sorting, checking and testing a year of
// three-candidate records (33 Fisher tests).
func BenchmarkBuildYear(b *testing.B) {
	es := entries(yearRecords())
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		if _, err := Build(es, Options{Alpha: 0.05}); err != nil {
			b.Fatal(err)
		}
	}
}

// BenchmarkFisherExactAuditSized is one test on two samples of 5 000.
func BenchmarkFisherExactAuditSized(b *testing.B) {
	for i := 0; i < b.N; i++ {
		if _, err := FisherExact(Table{A: 60, B: 4940, C: 35, D: 4965}, Greater); err != nil {
			b.Fatal(err)
		}
	}
}
