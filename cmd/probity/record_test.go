package main

import (
	"bytes"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"probity/plan"
	"probity/plan/record"
	"probity/sampling/drawfolder"
)

func readRecord(t *testing.T, dir string) *record.Record {
	t.Helper()
	data, err := os.ReadFile(filepath.Join(dir, "record.json"))
	if err != nil {
		t.Fatal(err)
	}
	r, err := record.Decode(data)
	if err != nil {
		t.Fatal(err)
	}
	return r
}

func TestRecordAcceptedExitsZero(t *testing.T) {
	t.Parallel()
	fx := newRecFixture(t, false, 0)
	labels := fx.labels(t, "labels.csv", nil)
	out := filepath.Join(fx.dir, "rec")
	code, stdout, stderr := runProbity(t, "record", "--plan", fx.planPath, "--draw", fx.draw, "--labels", labels, "--out", out, "--date", "2026-12-01")
	if code != exitOK || stderr != "" {
		t.Fatalf("exit %d\nstdout %s\nstderr %s", code, stdout, stderr)
	}
	for _, want := range []string{"sorter-a  ACCEPT  0/", "overall: ACCEPT (every candidate must be accepted)", "wrote record.json, record.pdf into " + out} {
		if !strings.Contains(stdout, want) {
			t.Errorf("stdout lacks %q:\n%s", want, stdout)
		}
	}
	if got := strings.Join(listDir(t, out), ","); got != "record.json,record.pdf" {
		t.Errorf("record folder holds %s", got)
	}
	r := readRecord(t, out)
	if r.OverallVerdict != record.Accept || r.Date != "2026-12-01" || r.System != "Parcel sorter" || len(r.Strata) != 3 || len(r.OC) == 0 || r.Method.Bound != plan.BoundStratifiedCount {
		t.Errorf("record: %+v", r)
	}
	if id, _ := record.ID(r); r.Fingerprints.Labels != record.SHA256(mustRead(t, labels)) || r.RecordID != id {
		t.Errorf("fingerprints %+v, id %s", r.Fingerprints, r.RecordID)
	}
	if len(r.Signoff) != 3 || r.Signoff[0].Meaning == "" || r.Signoff[0].Name != "" {
		t.Errorf("sign-off %+v", r.Signoff)
	}
	if strings.Count(string(listDirAll(t, fx.dir)), ".tmp") != 0 {
		t.Errorf("temporary files left: %s", listDirAll(t, fx.dir))
	}
}

func mustRead(t *testing.T, path string) []byte {
	t.Helper()
	data, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	return data
}

func listDirAll(t *testing.T, dir string) string {
	var names []string
	filepath.Walk(dir, func(p string, info os.FileInfo, err error) error {
		names = append(names, filepath.Base(p))
		return nil
	})
	return strings.Join(names, " ")
}

func TestRecordRejectedExitsOneAndStillWrites(t *testing.T) {
	t.Parallel()
	fx := newRecFixture(t, true, 0)
	labels := fx.labels(t, "labels.csv", nil)
	out := filepath.Join(fx.dir, "rec")
	code, stdout, stderr := runProbity(t, "record", "--plan", fx.planPath, "--draw", fx.draw, "--labels", labels, "--out", out, "--date", "2026-12-01", "--use", "medical")
	if code != exitRejected || stderr != "" {
		t.Fatalf("exit %d, stderr %q\n%s", code, stderr, stdout)
	}
	if !strings.Contains(stdout, "sorter-b  REJECT") || !strings.Contains(stdout, "sorter-a  ACCEPT") || !strings.Contains(stdout, "overall: REJECT") {
		t.Errorf("stdout:\n%s", stdout)
	}
	r := readRecord(t, out)
	if r.Candidates[1].Verdict != record.Reject || r.Candidates[1].Errors == 0 || r.Use != "medical" {
		t.Errorf("%+v", r.Candidates)
	}
}

func TestRecordIsDeterministic(t *testing.T) {
	t.Parallel()
	fx := newRecFixture(t, true, 0)
	labels := fx.labels(t, "labels.csv", nil)
	var first [2][]byte
	for i := 0; i < 2; i++ {
		out := filepath.Join(fx.dir, "rec"+string(rune('1'+i)))
		runProbity(t, "record", "--plan", fx.planPath, "--draw", fx.draw, "--labels", labels, "--out", out, "--date", "2026-12-01")
		js, pdf := mustRead(t, filepath.Join(out, "record.json")), mustRead(t, filepath.Join(out, "record.pdf"))
		if i == 0 {
			first = [2][]byte{js, pdf}
			continue
		}
		if !bytes.Equal(js, first[0]) || !bytes.Equal(pdf, first[1]) {
			t.Errorf("same inputs and --date gave different record.json or record.pdf")
		}
	}
}

// TestRecordBadInputLeavesNothing: each bad input exits 2 with a one-line
// message naming the file and what, and no --out folder is left behind.
func TestRecordBadInputLeavesNothing(t *testing.T) {
	t.Parallel()
	fx := newRecFixture(t, true, 0)
	good := fx.labels(t, "labels.csv", nil)
	other := newRecFixture(t, false, 0)
	cases := []struct {
		name   string
		labels string
		extra  []string
		plan   string
		want   []string
	}{
		{"removed row", fx.labels(t, "removed.csv", func(r []drawfolder.WorksheetRow) []drawfolder.WorksheetRow { return append(r[:3:3], r[4:]...) }), nil, "",
			[]string{"removed.csv: rows differ from the draw's worksheet — a row is missing: item 4", "hint: label every row"}},
		{"changed id", fx.labels(t, "changed.csv", func(r []drawfolder.WorksheetRow) []drawfolder.WorksheetRow { r[0].RecordID = "forged"; return r }), nil, "",
			[]string{"changed.csv: rows differ from the draw's worksheet", `line 2: record_id "forged" (item 1) is not in this draw`}},
		{"label outside the classes", fx.labels(t, "bad.csv", func(r []drawfolder.WorksheetRow) []drawfolder.WorksheetRow { r[2].Label = "maybe"; return r }), nil, "",
			[]string{`bad.csv line 4, field label: label "maybe" (item 3) is not one of the plan's classes (ok, defect), blank or "unsure"`, "hint: use exactly one of: ok, defect"}},
		{"incomplete", fx.labels(t, "partial.csv", func(r []drawfolder.WorksheetRow) []drawfolder.WorksheetRow {
			r[1].Label = ""
			r[5].Label = "unsure"
			return r
		}), nil, "",
			[]string{"partial.csv, field label: 2 items are unlabeled or unsure and no spare replaces them (items 2, 6)", "--allow-incomplete"}},
		{"other plan", good, nil, other.planPath,
			[]string{"manifest.json, field plan_fingerprint: the draw was made from the plan with SHA-256", "hint: pass the plan file the draw was made with"}},
		{"bad use", good, []string{"--use", "aviation"}, "", []string{`--use "aviation" is not one of general, safety, medical, vehicle, credit, employment`}},
		{"bad date", good, []string{"--date", "1.12.2026"}, "", []string{`--date "1.12.2026" is not a time: give YYYY-MM-DD`}},
		{"bad sign-off", good, []string{"--signoff", writeTemp(t, fx.dir, "signoff.yaml", "approved:\n  name: A\n  when: today\n")}, "", []string{"signoff.yaml line 2, field approved"}},
		{"missing key", good, []string{"--sign-key", filepath.Join(fx.dir, "nokey")}, "", []string{"cannot read --sign-key", "probity keygen"}},
	}
	for _, c := range cases {
		out := filepath.Join(fx.dir, "out-"+strings.ReplaceAll(c.name, " ", "-"))
		planPath := fx.planPath
		if c.plan != "" {
			planPath = c.plan
		}
		args := append([]string{"record", "--plan", planPath, "--draw", fx.draw, "--labels", c.labels, "--out", out}, c.extra...)
		code, stdout, stderr := runProbity(t, args...)
		if code != exitBadInput {
			t.Errorf("%s: exit %d, want 2\n%s%s", c.name, code, stdout, stderr)
		}
		for _, w := range c.want {
			if !strings.Contains(stderr, w) {
				t.Errorf("%s: stderr lacks %q:\n%s", c.name, w, stderr)
			}
		}
		if !strings.HasPrefix(stderr, "probity: ") || strings.Count(stderr, "\n") > 2 {
			t.Errorf("%s: not the one-line shape:\n%s", c.name, stderr)
		}
		if stdout != "" {
			t.Errorf("%s: stdout %q", c.name, stdout)
		}
		if _, err := os.Stat(out); err == nil {
			t.Errorf("%s: --out %s was left behind", c.name, out)
		}
	}
	if s := listDirAll(t, fx.dir); strings.Contains(s, ".tmp") {
		t.Errorf("temporary files left: %s", s)
	}
}

func writeTemp(t *testing.T, dir, name, text string) string {
	p := filepath.Join(dir, name)
	writeFile(t, p, []byte(text))
	return p
}

func TestRecordRefusesNonEmptyOut(t *testing.T) {
	t.Parallel()
	fx := newRecFixture(t, false, 0)
	labels := fx.labels(t, "labels.csv", nil)
	out := filepath.Join(fx.dir, "rec")
	os.Mkdir(out, 0o755)
	writeFile(t, filepath.Join(out, "keep.txt"), []byte("x"))
	code, _, stderr := runProbity(t, "record", "--plan", fx.planPath, "--draw", fx.draw, "--labels", labels, "--out", out)
	if code != exitBadInput || !strings.Contains(stderr, "is not empty") || !strings.Contains(stderr, "--force") {
		t.Errorf("exit %d: %s", code, stderr)
	}
	if got := strings.Join(listDir(t, out), ","); got != "keep.txt" {
		t.Errorf("out holds %s", got)
	}
	code, _, stderr = runProbity(t, "record", "--plan", fx.planPath, "--draw", fx.draw, "--labels", labels, "--out", out, "--force")
	if code != exitOK {
		t.Errorf("--force: exit %d: %s", code, stderr)
	}
	if got := strings.Join(listDir(t, out), ","); got != "keep.txt,record.json,record.pdf" {
		t.Errorf("out holds %s", got)
	}
}

func TestRecordAllowIncompleteCountsErrors(t *testing.T) {
	t.Parallel()
	fx := newRecFixture(t, false, 0)
	labels := fx.labels(t, "partial.csv", func(r []drawfolder.WorksheetRow) []drawfolder.WorksheetRow { r[1].Label = ""; return r })
	out := filepath.Join(fx.dir, "rec")
	code, stdout, stderr := runProbity(t, "record", "--plan", fx.planPath, "--draw", fx.draw, "--labels", labels, "--out", out, "--allow-incomplete")
	if code != exitOK || !strings.Contains(stdout, "sorter-a  ACCEPT  1/") || !strings.Contains(stdout, "--allow-incomplete") {
		t.Fatalf("exit %d\n%s%s", code, stdout, stderr)
	}
	r := readRecord(t, out)
	if !r.Deviations.AllowIncomplete || len(r.Deviations.Unlabeled) != 1 || r.Candidates[0].Missing != 1 || r.Candidates[0].Errors != 1 {
		t.Errorf("deviations %+v, candidate %+v", r.Deviations, r.Candidates[0])
	}
}

// TestRecordUnequalWeights: a draw with a minimum per stratum is judged by
// the stratified count rule, which the record names with its reason,
// sources and counted items; --bound, once the choice of a bound for
// unequal weights, is refused with a sentence saying why.
func TestRecordUnequalWeights(t *testing.T) {
	t.Parallel()
	fx := newRecFixture(t, false, 20)
	labels := fx.labels(t, "labels.csv", nil)
	out := filepath.Join(fx.dir, "rec")
	code, stdout, stderr := runProbity(t, "record", "--plan", fx.planPath, "--draw", fx.draw, "--labels", labels, "--out", out)
	if code != exitOK && code != exitRejected {
		t.Fatalf("exit %d\n%s%s", code, stdout, stderr)
	}
	r := readRecord(t, out)
	rule := r.Method.Rule
	if r.Method.Bound != plan.BoundStratifiedCount || r.Method.Approximate || rule == nil || rule.Name != record.RuleStratifiedCount ||
		!strings.Contains(r.Method.Statement, "N_h/N") || !strings.Contains(rule.Reason, "keeps the risk whatever the allocation") || len(rule.Sources) != 3 {
		t.Fatalf("method %+v, rule %+v", r.Method, rule)
	}
	counted := 0
	for _, s := range rule.Strata {
		counted += s.Counted
	}
	c := r.Candidates[0]
	if counted != rule.CountedSize || c.CountedErrors == nil || c.KornGraubardUpper == nil || !strings.Contains(c.Reason, "counted items") {
		t.Errorf("rule %+v, candidate %+v", rule, c)
	}
	code, _, stderr = runProbity(t, "record", "--plan", fx.planPath, "--draw", fx.draw, "--labels", labels, "--out", filepath.Join(fx.dir, "rec2"), "--bound", "weighted-hoeffding")
	if code != exitBadInput || !strings.Contains(stderr, "--bound is no longer an option") {
		t.Errorf("--bound: exit %d: %s", code, stderr)
	}
}

func TestRecordJSONPrintsTheRecord(t *testing.T) {
	t.Parallel()
	fx := newRecFixture(t, false, 0)
	labels := fx.labels(t, "labels.csv", nil)
	out := filepath.Join(fx.dir, "rec")
	code, stdout, _ := runProbity(t, "record", "--plan", fx.planPath, "--draw", fx.draw, "--labels", labels, "--out", out, "--json")
	if code != exitOK || stdout != string(mustRead(t, filepath.Join(out, "record.json"))) {
		t.Errorf("exit %d; stdout is not record.json:\n%s", code, stdout)
	}
}
