package main

import (
	"os"
	"path/filepath"
	"strings"
	"testing"

	"probity/plan/record"
	"probity/sampling/drawfolder"
	"probity/sampling/loggen"
)

// A plan that declares its log's time column, a month's log with two days
// missing: draw says so (and warns), the manifest records it, the record
// states it and carries it on page 1 as a caveat, verify recomputes it and
// draw --check finds the same.
func TestCompletenessEndToEnd(t *testing.T) {
	t.Parallel()
	dir := t.TempDir()
	p := filepath.Join(dir, "plan.yaml")
	if code, _, stderr := runProbity(t, "plan", "--ceiling", "0.05", "--confidence", "0.9", "--candidate", "a=model_a", "--candidate", "b=model_b",
		"--classes", "fraud,ok", "--seed", "s", "--time-column", loggen.TimeColumn, "--date", "2026-11-01", "--out", p); code != exitOK {
		t.Fatal(stderr)
	}
	if !strings.Contains(string(mustRead(t, p)), "time_column: decided_at\n") {
		t.Fatalf("plan:\n%s", mustRead(t, p))
	}
	log := writeGenLog(t, dir, "log.csv", loggen.Config{Rows: 2000, Seed: 8, Month: "2026-11", SkipDays: []int{17, 18}})
	draw := filepath.Join(dir, "draw")
	code, stdout, stderr := runProbity(t, "draw", "--plan", p, "--log", log, "--out", draw, "--period", "2026-11")
	if code != exitOK {
		t.Fatal(stderr)
	}
	for _, want := range []string{"times (decided_at): 2000 rows from 2026-11-01T", "days 2026-11-01 to 2026-11-30 (30, period): 2 without rows: 2026-11-17/2026-11-18\n"} {
		if !strings.Contains(stdout, want) {
			t.Errorf("draw output lacks %q:\n%s", want, stdout)
		}
	}
	if !strings.Contains(stderr, "probity: warning: the log does not cover days 2026-11-01 to 2026-11-30: 2 days without rows") {
		t.Errorf("no warning: %q", stderr)
	}
	if code, out, _ := runProbity(t, "draw", "--check", draw, "--plan", p, "--log", log); code != exitOK {
		t.Errorf("draw --check: exit %d\n%s", code, out)
	}
	// the labels: every sample item labeled as model_a predicted
	names := []string{"a", "b"}
	ledger, err := drawfolder.ReadLedger(filepath.Join(draw, drawfolder.LedgerFile), names)
	if err != nil {
		t.Fatal(err)
	}
	_, rows, err := drawfolder.ReadWorksheet(filepath.Join(draw, drawfolder.WorksheetFile))
	if err != nil {
		t.Fatal(err)
	}
	for i := range rows {
		if !ledger[i].Spare {
			rows[i].Label = ledger[i].Predictions[0]
		}
	}
	labels := filepath.Join(dir, "labels.csv")
	lf, err := os.Create(labels)
	if err != nil {
		t.Fatal(err)
	}
	if err := drawfolder.WriteWorksheet(lf, nil, rows); err != nil {
		t.Fatal(err)
	}
	lf.Close()
	key := filepath.Join(dir, "key")
	if code, _, stderr := runProbity(t, "keygen", "--out", key); code != exitOK {
		t.Fatal(stderr)
	}
	rec := filepath.Join(dir, "rec")
	if code, _, stderr := runProbity(t, "record", "--plan", p, "--draw", draw, "--labels", labels, "--out", rec, "--sign-key", key); code == exitBadInput || code == exitInternal {
		t.Fatal(stderr)
	}
	r, err := record.Decode(mustRead(t, filepath.Join(rec, record.JSONFile)))
	if err != nil {
		t.Fatal(err)
	}
	if c := r.Completeness; c == nil || c.EmptyDayCount != 2 || len(r.Caveats) == 0 || r.Caveats[len(r.Caveats)-1].Kind != record.CaveatIncompletePeriod {
		t.Fatalf("record completeness %+v, caveats %+v", r.Completeness, r.Caveats)
	}
	text := pdfText(t, filepath.Join(rec, record.PDFFile))
	page1, _, _ := strings.Cut(text, "\f")
	for _, want := range []string{"has no row on 2 of the 30 days of the period (2026-11-01 to 2026-11-30): 2026-11-17/2026-11-18"} {
		if !strings.Contains(strings.Join(strings.Fields(page1), " "), want) {
			t.Errorf("page 1 lacks %q:\n%s", want, page1)
		}
	}
	for _, want := range []string{"Data completeness", "Time column", "decided_at", "Days without rows", "2: 2026-11-17/2026-11-18"} {
		if !strings.Contains(text, want) {
			t.Errorf("record.pdf lacks %q", want)
		}
	}
	code, stdout, _ = runProbity(t, "verify", rec, "--pub", key+".pub", "--plan", p, "--draw", draw, "--labels", labels, "--log", log)
	if !strings.Contains(stdout, "judgement recomputed from the inputs: every field of record.json agrees") ||
		!strings.Contains(stdout, "the draw folder holds exactly the") {
		t.Errorf("verify: exit %d\n%s", code, stdout)
	}
}

// The options that go with a time column, refused when they cannot apply.
func TestTimeColumnOptionsRefused(t *testing.T) {
	t.Parallel()
	dir := t.TempDir()
	p := filepath.Join(dir, "plan.yaml")
	if code, _, stderr := runProbity(t, "plan", "--ceiling", "0.05", "--confidence", "0.9", "--candidate", "a=model_a",
		"--classes", "fraud,ok", "--seed", "s", "--time-column", loggen.TimeColumn, "--date", "2026-11-01", "--out", p); code != exitOK {
		t.Fatal(stderr)
	}
	log := writeGenLog(t, dir, "log.csv", loggen.Config{Rows: 300, Seed: 8, Month: "2026-11"})
	for _, tc := range []struct {
		args []string
		want string
	}{
		{[]string{"draw", "--plan", p, "--log", log, "--out", filepath.Join(dir, "o1"), "--time-column", "score"}, "--time-column score is not the time column decided_at the plan declares"},
		{[]string{"draw", "--plan", drawPlan, "--log", log, "--out", filepath.Join(dir, "o2"), "--days", "2026-11-01/2026-11-30"}, "--days needs a time column"},
		{[]string{"draw", "--plan", p, "--log", log, "--out", filepath.Join(dir, "o3"), "--days", "2026-11-30/2026-11-01"}, `--days "2026-11-30/2026-11-01" is not a range of days FROM/TO`},
		{[]string{"draw", "--plan", drawPlan, "--log", log, "--out", filepath.Join(dir, "o4"), "--time-column", "score"}, `field score: the time "0.`},
		{[]string{"draw", "--plan", p, "--selected", log, "--out", filepath.Join(dir, "o5")}, "declares the time column decided_at, whose days without rows a draw inside a database does not count"},
		{[]string{"draw", "--plan", p, "--sql", "postgres", "--table", "t", "--time-column", "decided_at"}, "--time-column cannot be used with --sql"},
	} {
		code, _, stderr := runProbity(t, tc.args...)
		if code != exitBadInput || !strings.Contains(stderr, tc.want) {
			t.Errorf("%v: exit %d, %q; want %q", tc.args, code, stderr, tc.want)
		}
	}
}
