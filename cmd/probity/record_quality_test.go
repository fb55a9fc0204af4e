package main

import (
	"bytes"
	"encoding/csv"
	"fmt"
	"os"
	"os/exec"
	"path/filepath"
	"slices"
	"strings"
	"testing"
	"time"

	"probity/plan"
	"probity/plan/chrono"
	"probity/plan/record"
	"probity/plan/testkit/needs"
	"probity/sampling"
	"probity/sampling/drawfolder"
	"probity/sampling/safewrite"
)

// lqFixture is an invented audit of a seam-inspection classifier with
// double labeling: a zero-failure plan (ceiling 10 %, confidence 90 %, one
// candidate: n = 22, c = 0, so a single error rejects), a log of 300
// decisions where the candidate is always right, and a draw with
// --double 6. Labels are the truth unless a test edits them, so without
// edits the audit passes.
type lqFixture struct {
	dir, planPath, draw string
	ledger              []drawfolder.LedgerRow
	worksheet, second   []drawfolder.WorksheetRow
	truth               map[string]string
}

func newLQFixture(t *testing.T) *lqFixture { t.Helper(); return newLQFixtureSpares(t, 0) }

// newLQFixtureSpares is newLQFixture with this many spares drawn.
func newLQFixtureSpares(t *testing.T, spares int) *lqFixture {
	t.Helper()
	fx := &lqFixture{dir: t.TempDir(), truth: map[string]string{}}
	in := plan.Inputs{Ceiling: 0.1, Confidence: 0.9, CandidateCount: 1, ProducerRisk: 0.1,
		Method: plan.MethodExact, Multiplicity: plan.Bonferroni, Design: plan.DesignFixed, Require: plan.RequireAll}
	f, err := plan.Build(in, plan.Meta{ToolVersion: "test", Created: time.Date(2026, 11, 30, 9, 0, 0, 0, time.UTC), CreatedFrom: chrono.SourceClock,
		Seed: "a1b2c3d4e5f60718293a4b5c6d7e8f90", System: "Seam inspector", SystemVersion: "1.3",
		Classes: []string{"defect", "ok"}, Candidates: []plan.Candidate{{Name: "seam-cnn", Column: "pred"}}})
	if err != nil {
		t.Fatal(err)
	}
	if f.Rule.SampleSize != 22 || f.Rule.AcceptanceNumber != 0 {
		t.Fatalf("plan n = %d, c = %d; the fixture expects the zero-failure plan n = 22, c = 0", f.Rule.SampleSize, f.Rule.AcceptanceNumber)
	}
	data, err := f.Marshal()
	if err != nil {
		t.Fatal(err)
	}
	fx.planPath = filepath.Join(fx.dir, "plan.yaml")
	lqWrite(t, fx.planPath, data)
	var buf bytes.Buffer
	w := csv.NewWriter(&buf)
	w.Write([]string{"record_id", "scan", "pred"})
	for i := 1; i <= 300; i++ {
		id := fmt.Sprintf("s%04d", i)
		truth := "ok"
		if i%7 == 0 {
			truth = "defect"
		}
		fx.truth[id] = truth
		w.Write([]string{id, fmt.Sprintf("scan-%04d.png", i), truth})
	}
	w.Flush()
	logPath := filepath.Join(fx.dir, "log.csv")
	lqWrite(t, logPath, buf.Bytes())
	log, err := os.Open(logPath)
	if err != nil {
		t.Fatal(err)
	}
	defer log.Close()
	folder, err := sampling.Draw(sampling.DrawInput{Plan: f, PlanFingerprint: plan.Fingerprint(data), LogPath: logPath, Log: log,
		Format: "csv", IDColumn: "record_id", Show: []string{"scan"}, Double: 6,
		Alloc: sampling.AllocOptions{Rule: sampling.Proportional, Spare: spares}, ToolVersion: "test"})
	if err != nil {
		t.Fatal(err)
	}
	drawn := chrono.FromClock(time.Date(2026, 11, 30, 15, 0, 0, 0, time.UTC))
	folder.Manifest.Drawn = &drawn
	fx.draw = filepath.Join(fx.dir, "draw")
	if err := drawfolder.Write(fx.draw, folder, safewrite.FolderOptions{}); err != nil {
		t.Fatal(err)
	}
	fx.ledger, fx.worksheet, fx.second = folder.Ledger, folder.Worksheet, folder.Second
	if len(fx.second) != 6 {
		t.Fatalf("the draw doubled %d items, want 6", len(fx.second))
	}
	return fx
}

// other is the class that is not truth.
func other(label string) string { return map[string]string{"ok": "defect", "defect": "ok"}[label] }

// write labels a copy of rows with the truth and labeler, applies edit and
// writes it to name.
func (fx *lqFixture) write(t *testing.T, name string, rows []drawfolder.WorksheetRow, labeler string, edit func([]drawfolder.WorksheetRow)) string {
	t.Helper()
	rows = append([]drawfolder.WorksheetRow(nil), rows...)
	for i := range rows {
		rows[i].Label, rows[i].Labeler = fx.truth[rows[i].RecordID], labeler
	}
	if edit != nil {
		edit(rows)
	}
	var buf bytes.Buffer
	if err := drawfolder.WriteWorksheet(&buf, []string{"scan"}, rows); err != nil {
		t.Fatal(err)
	}
	path := filepath.Join(fx.dir, name)
	lqWrite(t, path, buf.Bytes())
	return path
}

// adjudication writes an adjudication file with one row per (item, label).
func (fx *lqFixture) adjudication(t *testing.T, name string, rows ...[2]string) string {
	t.Helper()
	var b strings.Builder
	b.WriteString("item,record_id,final_label,decided_by,note\n")
	for _, r := range rows {
		var item int
		fmt.Sscan(r[0], &item)
		fmt.Fprintf(&b, "%d,%s,%s,Dana Reyes,\"checked the scan again, %s\"\n", item, fx.ledger[item-1].RecordID, r[1], r[1])
	}
	path := filepath.Join(fx.dir, name)
	lqWrite(t, path, []byte(b.String()))
	return path
}

func lqWrite(t *testing.T, path string, data []byte) {
	t.Helper()
	if err := os.WriteFile(path, data, 0o644); err != nil {
		t.Fatal(err)
	}
}

func lqRun(t *testing.T, args ...string) (int, string, string) {
	t.Helper()
	return runTest(t, args)
}

func lqRecord(t *testing.T, path string) *record.Record {
	t.Helper()
	data, err := os.ReadFile(filepath.Join(path, "record.json"))
	if err != nil {
		t.Fatal(err)
	}
	rec, err := record.Decode(data)
	if err != nil {
		t.Fatal(err)
	}
	return rec
}

// TestRecordJudgesOnTheAdjudicatedLabel: item 1 is doubled; the first
// labeler gives the truth (the candidate is right), the second the other
// class. The verdict follows the adjudication exactly: adjudicated to the
// truth, 0 errors and ACCEPT; adjudicated to the other class, 1 error and
// REJECT (c = 0); unadjudicated under --allow-unadjudicated, counted as an
// error: REJECT; unadjudicated without it: refused, nothing written.
func TestRecordJudgesOnTheAdjudicatedLabel(t *testing.T) {
	t.Parallel()
	fx := newLQFixture(t)
	item1 := fx.ledger[0]
	if !item1.Double {
		t.Fatal("item 1 is not doubled")
	}
	truth := fx.truth[item1.RecordID]
	first := fx.write(t, "labeled.csv", fx.worksheet, "ana", nil)
	second := fx.write(t, "labeled-second.csv", fx.second, "bea", func(rows []drawfolder.WorksheetRow) {
		rows[0].Label = other(truth)
	})
	base := []string{"record", "--plan", fx.planPath, "--draw", fx.draw, "--labels", first, "--second", second, "--date", "2026-12-01"}
	out := func(name string) string { return filepath.Join(fx.dir, name) }

	code, _, stderr := lqRun(t, append(base, "--out", out("rec-open"))...)
	if code != exitBadInput || !strings.Contains(stderr, "1 doubled items have two different labels and need an adjudication: items 1") ||
		!strings.Contains(stderr, "hint: ") {
		t.Errorf("open disagreement: exit %d, stderr %q; want 2 naming item 1 with a hint", code, stderr)
	}
	if names := lqList(out("rec-open")); len(names) != 0 {
		t.Errorf("a refused record left %v behind", names)
	}

	cases := []struct {
		name     string
		extra    []string
		exit     int
		errors   int
		verdict  string
		resolved string
	}{
		{"adjudicated to the truth", []string{"--adjudicated", fx.adjudication(t, "adj-truth.csv", [2]string{"1", truth})}, exitOK, 0, record.Accept, record.ResolvedAdjudicated},
		{"adjudicated to the other class", []string{"--adjudicated", fx.adjudication(t, "adj-other.csv", [2]string{"1", other(truth)})}, exitRejected, 1, record.Reject, record.ResolvedAdjudicated},
		{"left open", []string{"--allow-unadjudicated"}, exitRejected, 1, record.Reject, record.ResolvedCountedAsError},
	}
	for i, c := range cases {
		dir := out(fmt.Sprintf("rec-%d", i))
		code, stdout, stderr := lqRun(t, append(append(base, "--out", dir), c.extra...)...)
		if code != c.exit {
			t.Fatalf("%s: exit %d, want %d\nstdout %s\nstderr %s", c.name, code, c.exit, stdout, stderr)
		}
		rec := lqRecord(t, dir)
		cand := rec.Candidates[0]
		if cand.Errors != c.errors || cand.Verdict != c.verdict || cand.Labeled != 22 {
			t.Errorf("%s: %d errors of %d, %s; want %d of 22, %s", c.name, cand.Errors, cand.Labeled, cand.Verdict, c.errors, c.verdict)
		}
		q := rec.LabelQuality
		if q == nil {
			t.Fatalf("%s: record.json has no label_quality", c.name)
		}
		if q.Doubled != 6 || q.Compared != 6 || q.Disagreed != 1 || len(q.Disagreements) != 1 || q.Disagreements[0].Resolution != c.resolved {
			t.Errorf("%s: label quality %+v", c.name, q)
		}
		if want := record.SHA256(lqRead(t, second)); q.SecondWorksheet != want {
			t.Errorf("%s: second worksheet fingerprint %q, want %q", c.name, q.SecondWorksheet, want)
		}
		if c.resolved == record.ResolvedCountedAsError {
			if q.Unadjudicated != 1 || !strings.Contains(strings.Join(rec.Deviations.Notes, "\n"), "1 doubled item whose two labels disagree was not adjudicated and was counted as an error for every candidate") {
				t.Errorf("%s: unadjudicated %d, deviations %q", c.name, q.Unadjudicated, rec.Deviations.Notes)
			}
		} else if q.Adjudications == "" || q.Disagreements[0].DecidedBy != "Dana Reyes" {
			t.Errorf("%s: adjudication not recorded: %+v", c.name, q.Disagreements[0])
		}
	}
}

// TestRecordAdjudicationOverridesTheFirstLabel: the first labeler is
// wrong on item 2 (so on the first labels alone the candidate makes an
// error and is rejected); the second labeler is right and the adjudication
// agrees with the second: the record accepts.
func TestRecordAdjudicationOverridesTheFirstLabel(t *testing.T) {
	t.Parallel()
	fx := newLQFixture(t)
	truth := fx.truth[fx.ledger[1].RecordID]
	first := fx.write(t, "labeled.csv", fx.worksheet, "ana", func(rows []drawfolder.WorksheetRow) { rows[1].Label = other(truth) })
	second := fx.write(t, "labeled-second.csv", fx.second, "bea", nil)
	dir := filepath.Join(fx.dir, "single")
	code, _, stderr := lqRun(t, "record", "--plan", fx.planPath, "--draw", fx.draw, "--labels", first, "--out", dir, "--date", "2026-12-01")
	if code != exitRejected {
		t.Fatalf("first labels alone: exit %d (%s), want 1", code, stderr)
	}
	dir = filepath.Join(fx.dir, "double")
	code, stdout, stderr := lqRun(t, "record", "--plan", fx.planPath, "--draw", fx.draw, "--labels", first, "--out", dir, "--date", "2026-12-01",
		"--second", second, "--adjudicated", fx.adjudication(t, "adj.csv", [2]string{"2", truth}))
	if code != exitOK {
		t.Fatalf("adjudicated: exit %d, want 0\n%s\n%s", code, stdout, stderr)
	}
	if rec := lqRecord(t, dir); rec.Candidates[0].Errors != 0 || rec.LabelQuality.Disagreements[0].Final != truth {
		t.Errorf("errors %d, disagreement %+v", rec.Candidates[0].Errors, rec.LabelQuality.Disagreements[0])
	}
	// record.pdf carries the Label quality section (text by pdftotext,
	// poppler-utils).
	txt, err := exec.Command(needs.Program(t, "pdftotext"), filepath.Join(dir, "record.pdf"), "-").Output()
	if err != nil {
		t.Fatal(err)
	}
	text := strings.Join(strings.Fields(string(txt)), " ")
	for _, want := range []string{"Label quality", "Cohen's kappa", "Gwet's AC1", "Disagreements and their resolution",
		"adjudicated: " + truth, "Dana Reyes: checked the scan again", "What label error does to the bound"} {
		if !strings.Contains(text, want) {
			t.Errorf("record.pdf lacks %q", want)
		}
	}
}

func TestRecordLabelQualityBadInput(t *testing.T) {
	t.Parallel()
	fx := newLQFixture(t)
	first := fx.write(t, "labeled.csv", fx.worksheet, "ana", nil)
	second := fx.write(t, "labeled-second.csv", fx.second, "bea", nil)
	sameLabeler := fx.write(t, "same.csv", fx.second, "Ana", nil)
	undoubled := fx.write(t, "undoubled.csv", append(append([]drawfolder.WorksheetRow(nil), fx.second...), fx.worksheet[10]), "bea", nil)
	base := []string{"record", "--plan", fx.planPath, "--draw", fx.draw, "--labels", first, "--date", "2026-12-01"}
	cases := []struct {
		name  string
		extra []string
		want  string
	}{
		{"adjudicated without second", []string{"--adjudicated", fx.adjudication(t, "a.csv")}, "--adjudicated only apply to double labeling, which needs --second FILE"},
		{"strict without second", []string{"--strict"}, "--strict only apply to double labeling"},
		{"item not doubled", []string{"--second", undoubled}, "was not drawn for a second label"},
		{"same labeler, strict", []string{"--second", sameLabeler, "--strict"}, `was labeled by "Ana" in both worksheets; its two labels are not independent (labeler independence enforced)`},
		{"extra adjudication row", []string{"--second", second, "--adjudicated", fx.adjudication(t, "b.csv", [2]string{"1", fx.truth[fx.ledger[0].RecordID]})}, "the labelers agreed on item 1"},
		{"adjudicated label outside the classes", []string{"--second", second, "--adjudicated", fx.adjudication(t, "c.csv", [2]string{"1", "maybe"})}, `final_label "maybe" is not one of the classes (defect, ok)`},
		{"missing second file", []string{"--second", filepath.Join(fx.dir, "nope.csv")}, "nope.csv"},
		{"second with an edited shown value", []string{"--second", fx.write(t, "edited.csv", fx.second, "bea", func(rows []drawfolder.WorksheetRow) { rows[2].Show[0] = "other.png" })},
			"item 3 differs from the draw's worksheet-second.csv (record id or shown values)"},
	}
	for i, c := range cases {
		dir := filepath.Join(fx.dir, fmt.Sprintf("out-%d", i))
		code, stdout, stderr := lqRun(t, append(append(base, "--out", dir), c.extra...)...)
		if code != exitBadInput || !strings.Contains(stderr, c.want) {
			t.Errorf("%s: exit %d, stderr %q; want 2 with %q", c.name, code, stderr, c.want)
		}
		if stdout != "" || len(lqList(dir)) != 0 {
			t.Errorf("%s: printed %q or left %v", c.name, stdout, lqList(dir))
		}
	}
	// Without --strict the same labeler on both copies is a warning in
	// the record, not a refusal.
	dir := filepath.Join(fx.dir, "warned")
	code, _, stderr := lqRun(t, append(append(base, "--out", dir), "--second", sameLabeler)...)
	if code != exitOK {
		t.Fatalf("same labeler without --strict: exit %d (%s)", code, stderr)
	}
	if w := strings.Join(lqRecord(t, dir).LabelQuality.Warnings, "\n"); !strings.Contains(w, "its two labels are not independent") {
		t.Errorf("warnings %q", w)
	}
	if !strings.Contains(stderr, "probity: warning: ") || !strings.Contains(stderr, "its two labels are not independent") {
		t.Errorf("the warning is not on stderr: %q", stderr)
	}
	// With --json stdout is record.json alone, label quality included;
	// the warning stays on stderr.
	dir = filepath.Join(fx.dir, "json")
	code, stdout, stderr := lqRun(t, append(append(base, "--out", dir), "--second", sameLabeler, "--json")...)
	if code != exitOK {
		t.Fatalf("--json: exit %d (%s)", code, stderr)
	}
	rec, err := record.Decode([]byte(stdout))
	if err != nil || rec.LabelQuality == nil || rec.LabelQuality.Doubled != 6 {
		t.Errorf("--json stdout is not record.json with label_quality: %v\n%s", err, stdout)
	}
	if !strings.Contains(stderr, "its two labels are not independent") {
		t.Errorf("--json: warning missing from stderr: %q", stderr)
	}
}

func lqRead(t *testing.T, path string) []byte {
	t.Helper()
	data, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	return data
}

func lqList(dir string) []string {
	entries, err := os.ReadDir(dir)
	if err != nil {
		return nil
	}
	var names []string
	for _, e := range entries {
		names = append(names, e.Name())
	}
	return names
}

// TestRecordFullAgreementChangesNothing: when the two labelers agree on
// every doubled item the judgement is the one made from the first labels
// alone, and record.json differs only by label_quality, by the record
// id (which also fingerprints the second worksheet) and by the deviation
// the single-label record states (the planned second labeling missing).
func TestRecordFullAgreementChangesNothing(t *testing.T) {
	t.Parallel()
	fx := newLQFixture(t)
	first := fx.write(t, "labeled.csv", fx.worksheet, "ana", func(rows []drawfolder.WorksheetRow) {
		rows[7].Label = other(rows[7].Label) // one error by the candidate, outside the doubled items
	})
	second := fx.write(t, "labeled-second.csv", fx.second, "bea", nil)
	single, double := filepath.Join(fx.dir, "single"), filepath.Join(fx.dir, "double")
	base := []string{"record", "--plan", fx.planPath, "--draw", fx.draw, "--labels", first, "--date", "2026-12-01"}
	c1, _, e1 := lqRun(t, append(base, "--out", single)...)
	c2, _, e2 := lqRun(t, append(base, "--out", double, "--second", second)...)
	if c1 != exitRejected || c2 != exitRejected {
		t.Fatalf("exit %d (%s) and %d (%s), want 1 and 1", c1, e1, c2, e2)
	}
	a, b := lqRecord(t, single), lqRecord(t, double)
	if b.LabelQuality == nil || b.LabelQuality.Disagreed != 0 || !b.LabelQuality.AC1.Defined {
		t.Fatalf("label quality %+v", b.LabelQuality)
	}
	if a.RecordID == b.RecordID {
		t.Errorf("the record with a second worksheet has the single-label record's id %s", a.RecordID)
	}
	if a.Deviations.DoubleNotLabeled == 0 || b.Deviations.DoubleNotLabeled != 0 {
		t.Errorf("double_not_labeled %d and %d, want the draw's doubled items and 0", a.Deviations.DoubleNotLabeled, b.Deviations.DoubleNotLabeled)
	}
	b.LabelQuality, b.RecordID, a.Deviations.DoubleNotLabeled = nil, a.RecordID, 0
	ja, err := record.Encode(a)
	if err != nil {
		t.Fatal(err)
	}
	jb, err := record.Encode(b)
	if err != nil {
		t.Fatal(err)
	}
	if !bytes.Equal(ja, jb) {
		t.Errorf("record.json without label_quality differs from the single-label record:\n%s\n---\n%s", ja, jb)
	}
}

// TestAdjudicatedUnsureItemLeavesItsSpareUnused (issue 16 item 3): the
// first labeler marks a doubled item unsure, its spare is labeled (it
// would replace it), the second labeler gives it a class and the
// adjudication settles it. The adjudicated label stands, the spare
// replaces nothing and is listed as unused; nothing is refused.
func TestAdjudicatedUnsureItemLeavesItsSpareUnused(t *testing.T) {
	fx := newLQFixtureSpares(t, 1)
	item1 := fx.ledger[0]
	var spare drawfolder.LedgerRow
	for _, r := range fx.ledger {
		if r.Spare {
			spare = r
		}
	}
	if !item1.Double || spare.RecordID == "" {
		t.Fatal("the fixture needs item 1 doubled and a spare")
	}
	truth := fx.truth[item1.RecordID]
	first := fx.write(t, "labeled.csv", fx.worksheet, "ana", func(rows []drawfolder.WorksheetRow) {
		rows[0].Label, rows[0].Note = "unsure", "scan too dark"
	})
	second := fx.write(t, "labeled-second.csv", fx.second, "bea", nil)
	out := filepath.Join(fx.dir, "rec")
	code, _, stderr := lqRun(t, "record", "--plan", fx.planPath, "--draw", fx.draw, "--labels", first, "--second", second,
		"--adjudicated", fx.adjudication(t, "adj.csv", [2]string{"1", truth}), "--date", "2026-12-01", "--out", out)
	if code != exitOK {
		t.Fatalf("exit %d: %s", code, stderr)
	}
	rec := lqRecord(t, out)
	if d := rec.Deviations; len(d.Replacements) != 0 || !slices.Equal(d.SparesUnused, []string{spare.RecordID}) || len(d.SparesUsed) != 0 {
		t.Errorf("deviations %+v: want spare %s unused and no replacement", d, spare.RecordID)
	}
	if rec.Candidates[0].Labeled != 22 {
		t.Errorf("labeled %d, want the 22 sample items (item 1 by its adjudicated label)", rec.Candidates[0].Labeled)
	}
}

// TestRecordNamesAPlannedSecondLabelingThatDidNotHappen: a draw made with
// --double 6 recorded without the second worksheet is a deviation from
// the plan, in record.json, on the console and in the PDF (issue 16 item
// 4); recorded with it, there is none.
func TestRecordNamesAPlannedSecondLabelingThatDidNotHappen(t *testing.T) {
	fx := newLQFixture(t)
	first := fx.write(t, "labeled.csv", fx.worksheet, "ana", nil)
	second := fx.write(t, "labeled-second.csv", fx.second, "bea", nil)
	dir := filepath.Join(fx.dir, "without")
	code, stdout, stderr := lqRun(t, "record", "--plan", fx.planPath, "--draw", fx.draw, "--labels", first, "--out", dir, "--date", "2026-12-01")
	if code != exitOK {
		t.Fatalf("exit %d\n%s%s", code, stdout, stderr)
	}
	rec := lqRecord(t, dir)
	if rec.Deviations.DoubleNotLabeled != 6 {
		t.Errorf("double_not_labeled %d, want 6", rec.Deviations.DoubleNotLabeled)
	}
	const said = "6 items were drawn for a second, independent label, but the record was made without second labels: label error was not measured"
	if !strings.Contains(stdout, "deviation: "+said) {
		t.Errorf("stdout does not say %q:\n%s", said, stdout)
	}
	flat := strings.Join(strings.Fields(pdfText(t, filepath.Join(dir, record.PDFFile))), " ")
	if !strings.Contains(flat, said) || strings.Contains(flat, "Deviations from the plan None.") {
		t.Errorf("record.pdf does not list the deviation:\n%s", flat)
	}
	dir = filepath.Join(fx.dir, "with")
	if code, stdout, stderr := lqRun(t, "record", "--plan", fx.planPath, "--draw", fx.draw, "--labels", first, "--second", second, "--out", dir, "--date", "2026-12-01"); code != exitOK {
		t.Fatalf("exit %d\n%s%s", code, stdout, stderr)
	} else if strings.Contains(stdout, "deviation:") || lqRecord(t, dir).Deviations.DoubleNotLabeled != 0 {
		t.Errorf("with the second labels, a deviation is named:\n%s", stdout)
	}
}
