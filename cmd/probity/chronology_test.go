package main

import (
	"os"
	"path/filepath"
	"strings"
	"testing"
	"time"

	"probity/plan/record"
	"probity/sampling/drawfolder"
	"probity/sampling/labelserver"
	"probity/sampling/labeltrail"
	"probity/sampling/loggen"
)

// The times come from the clock unless the operator supplies them with
// --date, and each artifact says which: plan.yaml (created_from),
// manifest.json (drawn) and record.json (chronology).
func TestTimesFromTheClockOrTheOperator(t *testing.T) {
	t.Parallel()
	dir := t.TempDir()
	p := filepath.Join(dir, "plan.yaml")
	if code, _, stderr := runProbity(t, "plan", "--ceiling", "0.05", "--confidence", "0.9", "--candidate", "a=model_a", "--candidate", "b=model_b",
		"--classes", "fraud,ok", "--seed", "s", "--out", p); code != exitOK {
		t.Fatal(stderr)
	}
	if got := string(mustRead(t, p)); !strings.Contains(got, "created: 2026-12-01T12:00:00Z\ncreated_from: clock\n") {
		t.Errorf("plan from the clock:\n%s", got)
	}
	supplied := filepath.Join(dir, "supplied.yaml")
	if code, _, stderr := runProbity(t, "plan", "--ceiling", "0.05", "--confidence", "0.9", "--candidate", "a=model_a", "--candidate", "b=model_b",
		"--classes", "fraud,ok", "--seed", "s", "--date", "2026-11-20T10:00:00+01:00", "--out", supplied); code != exitOK {
		t.Fatal(stderr)
	}
	if got := string(mustRead(t, supplied)); !strings.Contains(got, "created: 2026-11-20T09:00:00Z\ncreated_from: operator\n") {
		t.Errorf("plan with --date:\n%s", got)
	}
	log := writeGenLog(t, dir, "log.csv", loggen.Config{Rows: 500, Seed: 2})
	out := filepath.Join(dir, "draw")
	code, stdout, stderr := runProbity(t, "draw", "--plan", supplied, "--log", log, "--out", out, "--date", "2026-11-21 08:00:00")
	if code != exitOK || !strings.Contains(stdout, "drawn at 2026-11-21T08:00:00Z (supplied by the operator)\n") {
		t.Fatalf("exit %d\n%s%s", code, stdout, stderr)
	}
	m, _, err := drawfolder.ReadManifest(filepath.Join(out, drawfolder.ManifestFile))
	if err != nil || m.Drawn == nil || m.Drawn.String() != "2026-11-21T08:00:00Z (supplied by the operator)" {
		t.Errorf("manifest drawn %v, %v", m.Drawn, err)
	}
	// from the clock (2026-12-01T12:00:00Z in these tests)
	clocked := filepath.Join(dir, "draw-clock")
	if code, _, stderr := runProbity(t, "draw", "--plan", supplied, "--log", log, "--out", clocked); code != exitOK {
		t.Fatal(stderr)
	}
	if m, _, _ := drawfolder.ReadManifest(filepath.Join(clocked, drawfolder.ManifestFile)); m.Drawn == nil || m.Drawn.String() != "2026-12-01T12:00:00Z (system clock)" {
		t.Errorf("manifest drawn %v", m.Drawn)
	}
	// a bad --date is refused before anything is read
	code, _, stderr = runProbity(t, "draw", "--plan", supplied, "--log", log, "--out", filepath.Join(dir, "x"), "--date", "21.11.2026")
	if code != exitBadInput || !strings.Contains(stderr, `--date "21.11.2026" is not a time`) {
		t.Errorf("exit %d: %s", code, stderr)
	}
}

// A draw dated before its plan was made is refused: exit 2, naming both
// times, and no folder is left.
func TestDrawBeforeThePlanRefused(t *testing.T) {
	t.Parallel()
	dir := t.TempDir()
	log := writeGenLog(t, dir, "log.csv", loggen.Config{Rows: 800, Seed: 3})
	out := filepath.Join(dir, "out")
	code, stdout, stderr := runDrawCmd(t, nil, "--plan", drawPlan, "--log", log, "--out", out, "--date", "2026-11-29")
	want := "probity: the chronology is broken: the sample would be drawn at 2026-11-29T00:00:00Z (supplied by the operator), before its plan was made (2026-11-30T09:00:00Z (source not stated), in " + drawPlan + ")\nhint: give the true time of the draw with --date"
	if code != exitBadInput || !strings.HasPrefix(stderr, want) || stdout != "" {
		t.Errorf("exit %d\n%s\nwant %s", code, stderr, want)
	}
	if _, err := os.Stat(out); !os.IsNotExist(err) {
		t.Error("a refused draw left its folder")
	}
}

// The back-dating: record --date 1999-01-01 fails the chronology
// (exit 2, the three times named, nothing written), where it used to issue
// a record dated before its own plan.
func TestBackDatedRecordRefused(t *testing.T) {
	t.Parallel()
	fx := newRecFixture(t, true, 0)
	labels := fx.labels(t, "labels.csv", nil)
	rec := filepath.Join(fx.dir, "rec")
	code, stdout, stderr := runProbity(t, "record", "--plan", fx.planPath, "--draw", fx.draw, "--labels", labels, "--out", rec, "--date", "1999-01-01")
	want := "probity: the chronology is broken: the record is issued before the sample was drawn (plan created 2026-11-30T09:00:00Z (system clock), sample drawn 2026-11-30T15:00:00Z (system clock), record issued 1999-01-01T00:00:00Z (supplied by the operator))\n" +
		"hint: --date 1999-01-01 is not a time this record can be issued at"
	if code != exitBadInput || !strings.HasPrefix(stderr, want) || stdout != "" {
		t.Errorf("exit %d\n%s\nwant %s", code, stderr, want)
	}
	if _, err := os.Stat(rec); !os.IsNotExist(err) {
		t.Error("a refused record left its folder")
	}
	// From the clock (2026-12-01T12:00:00Z here) the record states its
	// three times; the PDF shows them.
	code, _, stderr = runProbity(t, "record", "--plan", fx.planPath, "--draw", fx.draw, "--labels", labels, "--out", rec, "--json")
	if code == exitBadInput || code == exitInternal {
		t.Fatal(stderr)
	}
	r, err := record.Decode(mustRead(t, filepath.Join(rec, record.JSONFile)))
	if err != nil || r.Chronology == nil || r.Date != "2026-12-01" ||
		r.Chronology.Issued.String() != "2026-12-01T12:00:00Z (system clock)" || r.Chronology.Drawn.String() != "2026-11-30T15:00:00Z (system clock)" {
		t.Fatalf("record %v: %+v", err, r.Chronology)
	}
	text := pdfText(t, filepath.Join(rec, record.PDFFile))
	for _, want := range []string{"Issued", "2026-12-01 12:00:00 UTC", "Chronology", "Plan made", "2026-11-30 09:00:00 UTC (system clock)",
		"Sample drawn", "2026-11-30 15:00:00 UTC (system clock)", "Record issued", "2026-12-01 12:00:00 UTC (system clock)"} {
		if !strings.Contains(text, want) {
			t.Errorf("record.pdf lacks %q", want)
		}
	}
}

// verify fails a record whose chronology was edited (re-encoded in
// canonical form, so only the check of the times can catch it), and one
// whose draw time no longer matches the draw folder's.
func TestVerifyChecksTheChronology(t *testing.T) {
	t.Parallel()
	fx := newRecFixture(t, true, 0)
	labels := fx.labels(t, "labels.csv", nil)
	rec := filepath.Join(fx.dir, "rec")
	if code, _, stderr := runProbity(t, "record", "--plan", fx.planPath, "--draw", fx.draw, "--labels", labels, "--out", rec); code == exitBadInput || code == exitInternal {
		t.Fatal(stderr)
	}
	js := filepath.Join(rec, record.JSONFile)
	r, err := record.Decode(mustRead(t, js))
	if err != nil {
		t.Fatal(err)
	}
	r.Chronology.Issued.Time = r.Chronology.Issued.Time.AddDate(-30, 0, 0)
	r.Date = r.Chronology.Issued.Time.Format("2006-01-02")
	data, err := record.Encode(r)
	if err != nil {
		t.Fatal(err)
	}
	writeFile(t, js, data)
	code, stdout, _ := runProbity(t, "verify", rec, "--plan", fx.planPath, "--draw", fx.draw, "--labels", labels)
	if code != exitRejected || !strings.Contains(stdout, "FAIL  "+js+": the chronology is broken: the record is issued before the sample was drawn") {
		t.Errorf("edited issue time: exit %d\n%s", code, stdout)
	}
	// the drawn time moved, in order but not the manifest's
	r.Chronology.Issued.Time = r.Chronology.Issued.Time.AddDate(30, 0, 0)
	r.Date = r.Chronology.Issued.Time.Format("2006-01-02")
	r.Chronology.Drawn.Time = r.Chronology.Drawn.Time.Add(-time.Hour)
	data, _ = record.Encode(r)
	writeFile(t, js, data)
	code, stdout, _ = runProbity(t, "verify", rec, "--plan", fx.planPath, "--draw", fx.draw, "--labels", labels)
	if code != exitRejected || !strings.Contains(stdout, "chronology in order") || !strings.Contains(stdout, "chronology.drawn.time") {
		t.Errorf("edited draw time: exit %d\n%s", code, stdout)
	}
}

// A label cannot precede its sample: the label trail takes the draw time
// from the manifest (here 2026-11-30 15:00), so a labeling page whose
// clock reads an hour before it refuses the label, and a record issued
// before the last label on its trail fails the chronology, naming the
// labeling span.
func TestLabelsOutsideTheChronologyRefused(t *testing.T) {
	t.Parallel()
	fx := newRecFixture(t, true, 0)
	early := startLabelAt(t, time.Date(2026, 11, 30, 14, 0, 0, 0, time.UTC), fx.draw, "--plan", fx.planPath)
	c, err := labelserver.Open(nil, early.addr[drawfolder.WorksheetFile])
	if err == nil {
		err = c.Name("Dana Example")
	}
	if err == nil {
		var st labelserver.StateView
		if st, err = c.State(); err == nil {
			item := st.Sequence[0].Item
			_, err = c.Label(labelserver.LabelRequest{Item: item, Label: "ok"})
		}
	}
	if code := early.close(); err == nil || !strings.Contains(err.Error()+early.err.String(), "before the draw") && !strings.Contains(err.Error()+early.err.String(), "earlier than the draw") {
		t.Errorf("a label an hour before the draw: exit %d, %v\n%s", code, err, early.err.String())
	}
}

// A record on a label trail is issued after the trail's last label: with
// --date before it, the chronology names the labeling span; from the clock
// (after it) the record states the span and the PDF prints it.
func TestRecordBeforeItsLabelsRefused(t *testing.T) {
	t.Parallel()
	fx := newRecFixture(t, true, 0)
	r := startLabel(t, fx.draw, "--plan", fx.planPath)
	trailSession(t, fx, r.addr[drawfolder.WorksheetFile])
	if code := r.close(); code != exitOK {
		t.Fatalf("label exit %d\n%s", code, r.err.String())
	}
	trail := filepath.Join(fx.draw, labeltrail.FileName)
	rec := filepath.Join(fx.dir, "rec")
	code, stdout, stderr := runProbity(t, "record", "--plan", fx.planPath, "--draw", fx.draw, "--trail", trail, "--out", rec, "--date", "2026-12-01T10:00:05Z")
	want := "probity: the chronology is broken: the record is issued before labeling ended (plan created 2026-11-30T09:00:00Z (system clock), sample drawn 2026-11-30T15:00:00Z (system clock), labeled 2026-12-01T10:00:"
	if code != exitBadInput || !strings.HasPrefix(stderr, want) || !strings.Contains(stderr, "record issued 2026-12-01T10:00:05Z (supplied by the operator))\nhint: --date ") || stdout != "" {
		t.Errorf("exit %d\n%s\nwant %s", code, stderr, want)
	}
	if _, err := os.Stat(rec); !os.IsNotExist(err) {
		t.Error("a refused record left its folder")
	}
	if code, _, stderr := runProbity(t, "record", "--plan", fx.planPath, "--draw", fx.draw, "--trail", trail, "--out", rec); code != exitOK && code != exitRejected {
		t.Fatalf("record from the clock: %d\n%s", code, stderr)
	}
	got, err := record.Decode(mustRead(t, filepath.Join(rec, record.JSONFile)))
	if err != nil || got.Chronology == nil || got.Chronology.Labeled == nil || got.Chronology.Labeled.First.Before(got.Chronology.Drawn.Time) {
		t.Fatalf("record %v: %+v", err, got.Chronology)
	}
	if text := pdfText(t, filepath.Join(rec, record.PDFFile)); !strings.Contains(text, "(label trail)") {
		t.Error("record.pdf does not print the labeling span")
	}
}
