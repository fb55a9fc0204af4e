package main

import (
	"bytes"
	"encoding/json"
	"fmt"
	"math"
	"math/rand/v2"
	"os"
	"os/exec"
	"path/filepath"
	"strconv"
	"strings"
	"testing"

	"probity/plan/numfmt"
	"probity/plan/record"
	"probity/plan/testkit/needs"
	"probity/sampling/drawfolder"
)

// measureFixture is an invented audit of a plan with measures, run through
// the commands: a log of 3000 decisions of a parts inspector with a score,
// whose hidden truth ("pos" about 6 % of the time) only the labels reveal;
// a plan on the miss rate and the overall error (or only the error) of
// the threshold 0.5; the file draw; the worksheet labeled with the truth.
type measureFixture struct {
	dir, planPath, logPath, draw, labels string
	truth                                map[string]string
}

// newMeasureFixture writes the log and plans, draws and labels. A
// positive's score is U^(1/posShape) (Beta(posShape, 1)), a negative's
// 1 − U^(1/8): posShape 3 misses about 12 % of the positives at 0.5,
// posShape 1 half of them. planArgs are added to the plan's command line
// (the measures, the release).
func newMeasureFixture(t *testing.T, posShape float64, planArgs ...string) *measureFixture {
	t.Helper()
	fx := &measureFixture{dir: t.TempDir(), truth: map[string]string{}}
	r := rand.New(rand.NewPCG(7, 11))
	var log bytes.Buffer
	log.WriteString("record_id,score\n")
	for i := range 3000 {
		id := fmt.Sprintf("part-%05d", i)
		pos, u := r.Float64() < 0.06, r.Float64()
		score := 1 - math.Pow(u, 1.0/8)
		fx.truth[id] = "neg"
		if pos {
			score, fx.truth[id] = math.Pow(u, 1/posShape), "pos"
		}
		fmt.Fprintf(&log, "%s,%.4f\n", id, score)
	}
	fx.logPath = filepath.Join(fx.dir, "log.csv")
	writeFile(t, fx.logPath, log.Bytes())
	fx.planPath = filepath.Join(fx.dir, "plan.yaml")
	args := append([]string{"plan", "--confidence", "0.95", "--producer-risk", "0.2", "--thresholds", "score:0.5", "--positive", "pos",
		"--negative", "neg", "--prevalence", "0.06", "--decisions", "3000", "--system", "parts-inspector", "--date", "2026-11-01T00:00:00Z",
		"--out", fx.planPath}, planArgs...)
	if code, _, stderr := runProbity(t, args...); code != exitOK {
		t.Fatalf("plan: exit %d: %s", code, stderr)
	}
	fx.draw = filepath.Join(fx.dir, "draw")
	if code, _, stderr := runProbity(t, "draw", "--plan", fx.planPath, "--log", fx.logPath, "--out", fx.draw, "--date", "2026-11-02T00:00:00Z"); code != exitOK {
		t.Fatalf("draw: exit %d: %s", code, stderr)
	}
	header, rows, err := drawfolder.ReadWorksheet(filepath.Join(fx.draw, drawfolder.WorksheetFile))
	if err != nil {
		t.Fatal(err)
	}
	for i := range rows {
		if !rows[i].Spare {
			rows[i].Label = fx.truth[rows[i].RecordID]
		}
	}
	var buf bytes.Buffer
	if err := drawfolder.WriteWorksheet(&buf, showColumns(header), rows); err != nil {
		t.Fatal(err)
	}
	fx.labels = filepath.Join(fx.dir, "labels.csv")
	writeFile(t, fx.labels, buf.Bytes())
	return fx
}

// showColumns are the shown columns of a worksheet header (between the
// record id, or the spare mark, and the label).
func showColumns(h []string) []string {
	first := 2
	if len(h) > 2 && h[2] == drawfolder.SpareColumn {
		first = 3
	}
	end := len(h) - 2
	if h[len(h)-1] == "labeler" {
		end--
	}
	return h[first:end]
}

// record runs record into a new folder and returns its exit code, output
// and folder.
func (fx *measureFixture) record(t *testing.T, name string, args ...string) (int, string, string, string) {
	t.Helper()
	out := filepath.Join(fx.dir, name)
	code, stdout, stderr := runProbity(t, append([]string{"record", "--plan", fx.planPath, "--draw", fx.draw, "--labels", fx.labels,
		"--out", out, "--date", "2026-11-03T00:00:00Z"}, args...)...)
	return code, stdout, stderr, out
}

// verifyArgs are verify's arguments for a record folder, recomputing from
// the fixture's files.
func (fx *measureFixture) verifyArgs(dir string) []string {
	return []string{"--plan", fx.planPath, "--draw", fx.draw, "--labels", fx.labels, dir}
}

// trueFNR is the miss rate of "pos when score ≥ 0.5" on the fixture's log.
func (fx *measureFixture) trueFNR(t *testing.T) float64 {
	t.Helper()
	data := mustRead(t, fx.logPath)
	fn, pos := 0, 0
	for _, line := range strings.Split(strings.TrimSpace(string(data)), "\n")[1:] {
		id, cell, _ := strings.Cut(line, ",")
		if fx.truth[id] != "pos" {
			continue
		}
		pos++
		if score, err := strconv.ParseFloat(cell, 64); err != nil {
			t.Fatal(err)
		} else if score < 0.5 {
			fn++
		}
	}
	return float64(fn) / float64(pos)
}

// TestRecordOfMeasures: a plan on the miss rate and the overall error,
// drawn and labeled from the hidden truth, gives a record whose console,
// record.json (--json too) and PDF show every claim and name the
// release; verify recomputes it, measures included.
func TestRecordOfMeasures(t *testing.T) {
	t.Parallel()
	fx := newMeasureFixture(t, 3, "--measure", "fnr:0.4", "--measure", "error:0.08", "--anticipated", "fnr:0.15",
		"--anticipated", "error:0.03", "--release", "best:fnr")
	code, stdout, stderr, out := fx.record(t, "rec")
	if code != exitOK {
		t.Fatalf("record: exit %d\n%s%s", code, stdout, stderr)
	}
	rec, err := record.Decode(mustRead(t, filepath.Join(out, record.JSONFile)))
	if err != nil {
		t.Fatal(err)
	}
	if len(rec.Measures) != 2 || rec.Released == nil || rec.Released.Candidate != "score>=0.5" || rec.ReleaseRule != "best:fnr" {
		t.Fatalf("measures %+v, released %+v, rule %q", rec.Measures, rec.Released, rec.ReleaseRule)
	}
	fnr := rec.Measures[0]
	if fnr.Measure != "fnr" || fnr.Verdict != record.Accept || fnr.Estimate == nil || fnr.LabeledOther == 0 {
		t.Fatalf("fnr claim %+v", fnr)
	}
	// the estimate is near the log's true miss rate (a loose check: the
	// sample holds a few dozen positives; common practice, no source)
	if truth := fx.trueFNR(t); math.Abs(*fnr.Estimate-truth) > 0.15 || fnr.UpperBound < truth {
		t.Errorf("fnr estimate %.3f, bound %.3f; true %.3f", *fnr.Estimate, fnr.UpperBound, truth)
	}
	for _, want := range []string{
		`measures for the positive class "pos", upper bounds one-sided at 97.5 %, rounded up:`,
		"released: score>=0.5 (the accepted candidate with the lowest estimated fnr)",
		"overall: ACCEPT",
	} {
		if !strings.Contains(stdout, want) {
			t.Errorf("console lacks %q:\n%s", want, stdout)
		}
	}
	for _, m := range rec.Measures {
		line := fmt.Sprintf("  score>=0.5  %-7s  %8s", m.Measure, numfmt.Setting(m.Ceiling))
		if !strings.Contains(stdout, line) {
			t.Errorf("console lacks the %s claim %q:\n%s", m.Measure, line, stdout)
		}
	}

	// --json prints record.json, with the per-measure objects
	code, js, _, _ := fx.record(t, "rec-json", "--json")
	if code != exitOK {
		t.Fatalf("record --json: exit %d", code)
	}
	var doc map[string]any
	if err := json.Unmarshal([]byte(js), &doc); err != nil {
		t.Fatalf("record --json: %v", err)
	}
	ms, _ := doc["measures"].([]any)
	if len(ms) != 2 || doc["released"] != "score>=0.5" {
		t.Fatalf("record --json: measures %v, released %v", doc["measures"], doc["released"])
	}
	for _, key := range []string{"candidate", "measure", "ceiling", "estimate", "upper_bound", "verdict"} {
		if _, ok := ms[0].(map[string]any)[key]; !ok {
			t.Errorf("record --json: a measure lacks %q", key)
		}
	}

	text := pdfText(t, filepath.Join(out, record.PDFFile))
	page1, _, _ := strings.Cut(text, "\f")
	for _, want := range []string{"RELEASE DECISION", "Released: score>=0.5 (the accepted candidate with the lowest estimated fnr)",
		"Claims by measure", "False-negative rate (miss rate), fnr", "Error rate, error", "score>=0.5 (released)",
		"a candidate whose measure is at or above its ceiling is accepted with probability at most 2.5 %"} {
		if !strings.Contains(oneLine(page1), want) {
			t.Errorf("page 1 lacks %q:\n%s", want, page1)
		}
	}
	for _, want := range []string{"Results by measure", "Misses among the true positives (pos): FN / (FN + TP)", "Estimated confusion in the population",
		"Estimated prevalence of pos", "Roy 1953", "Suissa & Shuster", "Berger (Technometrics 24, 1982)", "Hoeffding 1956",
		"I approve the release of score>=0.5, the candidate this record names as released"} {
		if !strings.Contains(oneLine(text), want) {
			t.Errorf("the PDF lacks %q", want)
		}
	}
	// the overall error's count rule does not decide here, and is not shown
	for _, bad := range []string{"OVERALL VERDICT", "Operating characteristic", "stratified count rule: accept when"} {
		if strings.Contains(text, bad) {
			t.Errorf("the PDF of measures shows %q", bad)
		}
	}

	// verify recomputes the record, measures included (and fails only for
	// want of authentication: the record is not sealed)
	code, vout, verr := runProbity(t, append([]string{"verify"}, fx.verifyArgs(out)...)...)
	if code != exitRejected || !strings.Contains(vout, "judgement recomputed from the inputs: every field of record.json agrees") {
		t.Errorf("verify: exit %d\n%s%s", code, vout, verr)
	}
}

// oneLine joins a PDF's text into one line with single spaces, so a
// sentence wrapped across lines is found whole.
func oneLine(s string) string { return strings.Join(strings.Fields(s), " ") }

// TestVerifyCatchesAnEditedRelease: a forger who edits what record.json
// releases, or a claim's bound, recomputes the record id and renders a
// matching PDF; verify recomputes the claims from the labels and names
// the field.
func TestVerifyCatchesAnEditedRelease(t *testing.T) {
	t.Parallel()
	fx := newMeasureFixture(t, 1, "--measure", "fnr:0.4", "--measure", "error:0.08", "--anticipated", "fnr:0.15",
		"--anticipated", "error:0.03", "--release", "best:fnr")
	code, stdout, stderr, out := fx.record(t, "rec")
	// the true miss rate is about a half: nothing qualifies for release
	if code != exitRejected || !strings.Contains(stdout, "no candidate qualifies for release (the accepted candidate with the lowest estimated fnr)") {
		t.Fatalf("record: exit %d, want 1\n%s%s", code, stdout, stderr)
	}
	rec, err := record.Decode(mustRead(t, filepath.Join(out, record.JSONFile)))
	if err != nil {
		t.Fatal(err)
	}
	if rec.Released == nil || rec.Released.Candidate != "" || !strings.Contains(string(mustRead(t, filepath.Join(out, record.JSONFile))), `"released": null`) {
		t.Fatalf("released %+v", rec.Released)
	}
	text := oneLine(pdfText(t, filepath.Join(out, record.PDFFile)))
	for _, want := range []string{"No candidate qualifies for release", "no candidate is released: none qualifies under the release rule"} {
		if !strings.Contains(text, want) {
			t.Errorf("the PDF lacks %q", want)
		}
	}
	for _, attack := range []struct {
		name string
		edit func(*record.Record)
		want string
	}{
		{"release", func(r *record.Record) {
			r.Released = &record.Released{Candidate: "score>=0.5"}
			r.OverallVerdict = record.Accept
			for i := range r.Measures {
				r.Measures[i].Verdict = record.Accept
			}
		}, "released: "},
		{"bound", func(r *record.Record) { r.Measures[0].UpperBound = 0.3 }, "measures[0].upper_bound: "},
		{"estimated confusion", func(r *record.Record) { r.EstimatedConfusion[0].FN = 1 }, "estimated_confusion[0].fn: "},
	} {
		dir := copyRecordDir(t, out, filepath.Join(fx.dir, "forged-"+strings.ReplaceAll(attack.name, " ", "-")))
		forge(t, dir, attack.edit, true, nil)
		expectRefused(t, attack.name, fx.verifyArgs(dir), "differs from the judgement recomputed from the inputs", attack.want)
	}
}

// TestSafetyUseNeedsAMissMeasure: record --use safety refuses a plan of
// measures that claims neither fnr nor for, with exit 2, one line naming
// the plan and what it lacks, a hint, and no folder left behind; a plan
// that states why (plan --no-miss-measure-reason) is recorded, the reason
// shown as a deviation on page 1.
func TestSafetyUseNeedsAMissMeasure(t *testing.T) {
	t.Parallel()
	fx := newMeasureFixture(t, 3, "--measure", "error:0.08", "--anticipated", "error:0.03", "--anticipated", "fnr:0.15", "--release", "score>=0.5")
	code, stdout, stderr, out := fx.record(t, "rec", "--use", "safety")
	if code != exitBadInput || stdout != "" {
		t.Fatalf("record --use safety: exit %d, want 2\n%s%s", code, stdout, stderr)
	}
	lines := strings.Split(strings.TrimSpace(stderr), "\n")
	want := "probity: " + fx.planPath + ": a safety use needs a claim on the misses of the positive class pos (fnr or for), and the plan claims only error"
	if len(lines) != 2 || lines[0] != want || !strings.HasPrefix(lines[1], "hint: plan again with --measure fnr:CEILING") {
		t.Errorf("stderr %q, want %q and a hint", stderr, want)
	}
	if _, err := os.Stat(out); !os.IsNotExist(err) {
		t.Errorf("record left %s behind (%v)", out, err)
	}
	// the general use needs no such claim
	if code, stdout, stderr, _ := fx.record(t, "rec-general"); code != exitOK {
		t.Errorf("record --use general: exit %d\n%s%s", code, stdout, stderr)
	}

	reason := "the inspector only grades finish; a second station checks every part for cracks"
	fx2 := newMeasureFixture(t, 3, "--measure", "error:0.08", "--anticipated", "error:0.03", "--anticipated", "fnr:0.15", "--release", "score>=0.5",
		"--no-miss-measure-reason", reason)
	code, stdout, stderr, out = fx2.record(t, "rec", "--use", "safety")
	if code != exitOK || !strings.Contains(stdout, "deviation: no claim on missed positives (fnr or for) for a safety use; the plan states why: "+reason) {
		t.Fatalf("record --use safety with a reason: exit %d\n%s%s", code, stdout, stderr)
	}
	page1, _, _ := strings.Cut(pdfText(t, filepath.Join(out, record.PDFFile)), "\f")
	if !strings.Contains(oneLine(page1), "Deviation from what a safety use needs") || !strings.Contains(oneLine(page1), reason) {
		t.Errorf("page 1 does not state the reason:\n%s", page1)
	}
	code, vout, verr := runProbity(t, append([]string{"verify"}, fx2.verifyArgs(out)...)...)
	if code != exitRejected || !strings.Contains(vout, "every field of record.json agrees") {
		t.Errorf("verify: exit %d\n%s%s", code, vout, verr)
	}
}

// TestMeasuresPDFPages renders every page of a record of all five
// measures as an image (pdftoppm, at the resolution the layout was looked
// at) and finds each measure's table.
func TestMeasuresPDFPages(t *testing.T) {
	t.Parallel()
	pdftoppm := needs.Program(t, "pdftoppm")
	fx := newMeasureFixture(t, 3, "--measure", "fnr:0.4", "--measure", "fpr:0.1", "--measure", "for:0.05", "--measure", "fdr:0.5",
		"--measure", "error:0.08", "--anticipated", "fnr:0.15", "--anticipated", "error:0.03", "--release", "best:fnr")
	code, stdout, stderr, out := fx.record(t, "rec")
	if code != exitOK && code != exitRejected {
		t.Fatalf("record: exit %d\n%s%s", code, stdout, stderr)
	}
	dir := t.TempDir()
	if err := exec.Command(pdftoppm, "-png", "-r", "80", filepath.Join(out, record.PDFFile), filepath.Join(dir, "measures")).Run(); err != nil {
		t.Fatal(err)
	}
	if pages := listDir(t, dir); len(pages) < 5 {
		t.Errorf("pdftoppm rendered %d pages", len(pages))
	}
	text := pdfText(t, filepath.Join(out, record.PDFFile))
	for _, want := range []string{"False-positive rate (false-alarm rate), fpr", "False omission rate, for", "False discovery rate, fdr",
		"False alarms among the flagged decisions: FP / (FP + TP)"} {
		if !strings.Contains(oneLine(text), want) {
			t.Errorf("the PDF lacks %q", want)
		}
	}
}
