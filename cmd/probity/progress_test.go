package main

import (
	"bytes"
	"encoding/json"
	"fmt"
	"os"
	"path/filepath"
	"strings"
	"testing"
	"time"

	"probity/plan"
	"probity/plan/sequential"
	"probity/plan/testkit/golden"
	"probity/sampling/drawfolder"
	"probity/sampling/safewrite"
)

// progressFixture writes, into a temp dir, a plan for two column
// candidates (model-a, model-b; classes ok/bad), a draw folder of the
// plan's n items plus 2 spares whose ledger says model-a always predicts
// "ok" and model-b predicts "bad" on every 4th item, and returns the paths
// and n. The scenario is invented. With seq the plan is sequential.
type progressFiles struct {
	dir, plan, draw string
	n, c            int
	file            *plan.File
	ledger          []drawfolder.LedgerRow
	worksheet       []drawfolder.WorksheetRow
}

func progressFixture(t *testing.T, seq bool) progressFiles {
	t.Helper()
	p0 := 0.02
	in := plan.Inputs{Ceiling: 0.1, Confidence: 0.95, CandidateCount: 2, Anticipated: &p0, ProducerRisk: 0.10,
		Method: plan.MethodExact, Multiplicity: plan.Bonferroni, Design: plan.DesignFixed, Require: plan.RequireAll}
	if seq {
		in.Design = plan.DesignSequential
	}
	f, err := plan.Build(in, plan.Meta{ToolVersion: "test", Created: time.Date(2026, 11, 30, 0, 0, 0, 0, time.UTC), Seed: "5eed",
		Classes: []string{"ok", "bad"}, Candidates: []plan.Candidate{{Name: "model-a", Column: "pred_a"}, {Name: "model-b", Column: "pred_b"}}})
	if err != nil {
		t.Fatal(err)
	}
	if seq {
		if _, err := sequential.Apply(f, 0); err != nil {
			t.Fatal(err)
		}
	}
	dir := t.TempDir()
	data, err := f.Marshal()
	if err != nil {
		t.Fatal(err)
	}
	planPath := filepath.Join(dir, "plan.yaml")
	if err := os.WriteFile(planPath, data, 0o644); err != nil {
		t.Fatal(err)
	}
	n := f.Rule.SampleSize
	var led []drawfolder.LedgerRow
	var ws []drawfolder.WorksheetRow
	for i := 1; i <= n+2; i++ {
		id := fmt.Sprintf("dec-%05d", i)
		b := "ok"
		if i%4 == 0 {
			b = "bad"
		}
		led = append(led, drawfolder.LedgerRow{Item: i, RecordID: id, Stratum: "all", StratumSize: 100000, StratumSample: n,
			Weight: 100000 / float64(n), Key: fmt.Sprintf("%064x", i), Spare: i > n, Predictions: []string{"ok", b}})
		ws = append(ws, drawfolder.WorksheetRow{Item: i, RecordID: id})
	}
	folder := &drawfolder.Content{
		Manifest: &drawfolder.Manifest{Format: drawfolder.ManifestFormat, ToolVersion: "test", PlanFingerprint: plan.Fingerprint(data), Seed: "5eed", SelectionSeed: "5eed",
			Strata: []drawfolder.StratumInfo{{Label: "all", Population: 100000, Sample: n, Spare: 2, Weight: 100000 / float64(n)}}, SampleSize: n, Spares: 2},
		Candidates: []string{"model-a", "model-b"},
		Ledger:     led, Worksheet: ws,
	}
	draw := filepath.Join(dir, "draw")
	if err := drawfolder.Write(draw, folder, safewrite.FolderOptions{}); err != nil {
		t.Fatal(err)
	}
	return progressFiles{dir: dir, plan: planPath, draw: draw, n: n, c: f.Rule.AcceptanceNumber, file: f, ledger: led, worksheet: ws}
}

// label writes a labeled copy of the worksheet: the first k items get
// "ok" (so model-b errs on every 4th), then edit may change rows.
func (pf progressFiles) label(t *testing.T, k int, edit func(rows []drawfolder.WorksheetRow)) string {
	t.Helper()
	rows := append([]drawfolder.WorksheetRow{}, pf.worksheet...)
	for i := 0; i < k && i < len(rows); i++ {
		rows[i].Label = "ok"
	}
	if edit != nil {
		edit(rows)
	}
	var buf bytes.Buffer
	if err := drawfolder.WriteWorksheet(&buf, nil, rows); err != nil {
		t.Fatal(err)
	}
	path := filepath.Join(pf.dir, "labels.csv")
	if err := os.WriteFile(path, buf.Bytes(), 0o644); err != nil {
		t.Fatal(err)
	}
	return path
}

func runProgressCmd(t *testing.T, args ...string) (int, string, string) {
	t.Helper()
	return runTest(t, append([]string{"progress"}, args...))
}

func dirEntries(t *testing.T, dir string) []string {
	t.Helper()
	var names []string
	filepath.Walk(dir, func(p string, info os.FileInfo, err error) error {
		names = append(names, p)
		return nil
	})
	return names
}

func TestProgressFixedPlan(t *testing.T) {
	t.Parallel()
	pf := progressFixture(t, false)
	// c+1 model-b errors come at item 4(c+1)
	k := 4*(pf.c+1) + 3
	labels := pf.label(t, k, nil)
	before := dirEntries(t, pf.dir)
	code, out, errs := runProgressCmd(t, "--plan", pf.plan, "--draw", pf.draw, "--labels", labels)
	if code != exitOK || errs != "" {
		t.Fatalf("exit %d, stderr %q", code, errs)
	}
	for _, want := range []string{
		fmt.Sprintf("Fixed plan: %d labels, accept with at most %d errors", pf.n, pf.c),
		fmt.Sprintf("Labeled from the top: %d of %d.", k, pf.n),
		fmt.Sprintf("model-b    %d (stopped at %d)", k, 4*(pf.c+1)),
		"reject — stop",
		fmt.Sprintf("more than c = %d", pf.c),
		"Audit (require all): reject — stop",
	} {
		if !strings.Contains(out, want) {
			t.Errorf("stdout lacks %q:\n%s", want, out)
		}
	}
	if !strings.Contains(out, "model-a    "+fmt.Sprint(k)+"  ") || !strings.Contains(out, "continue") {
		t.Errorf("model-a should continue:\n%s", out)
	}
	if after := dirEntries(t, pf.dir); len(after) != len(before) {
		t.Errorf("progress wrote files: %v", after)
	}
	t.Log("\n" + out)
}

func TestProgressJSON(t *testing.T) {
	t.Parallel()
	pf := progressFixture(t, false)
	labels := pf.label(t, pf.n-pf.c, func(rows []drawfolder.WorksheetRow) {})
	code, out, errs := runProgressCmd(t, "--plan", pf.plan, "--draw", pf.draw, "--labels", labels, "--json")
	if code != exitOK {
		t.Fatalf("exit %d: %s", code, errs)
	}
	var got struct {
		PlanFingerprint string `json:"plan_fingerprint"`
		Design          string `json:"design"`
		SampleSize      int    `json:"sample_size"`
		Labeled         int    `json:"labeled"`
		Overall         string `json:"overall"`
		Candidates      []struct {
			Name         string `json:"name"`
			Decision     string `json:"decision"`
			Status       string `json:"status"`
			Stop         bool   `json:"stop"`
			StoppedAt    int    `json:"stopped_at"`
			MaxRemaining int    `json:"max_remaining"`
		} `json:"candidates"`
	}
	if err := json.Unmarshal([]byte(out), &got); err != nil {
		t.Fatalf("%v\n%s", err, out)
	}
	// model-a: 0 errors with c left → accept; model-b has rejected
	if got.Design != "fixed" || got.SampleSize != pf.n || got.Labeled != pf.n-pf.c || len(got.Candidates) != 2 {
		t.Fatalf("%+v", got)
	}
	a, b := got.Candidates[0], got.Candidates[1]
	if a.Decision != "accept" || a.Status != "accept — stop" || !a.Stop || a.StoppedAt != pf.n-pf.c || b.Decision != "reject" || got.Overall != "reject" {
		t.Errorf("%+v", got)
	}
	if len(got.PlanFingerprint) != 64 {
		t.Errorf("plan_fingerprint %q", got.PlanFingerprint)
	}
}

func TestProgressSequentialPlan(t *testing.T) {
	t.Parallel()
	pf := progressFixture(t, true)
	r, err := sequential.NewRule(pf.file.Sequential)
	if err != nil {
		t.Fatal(err)
	}
	k := 60
	labels := pf.label(t, k, nil)
	code, out, errs := runProgressCmd(t, "--plan", pf.plan, "--draw", pf.draw, "--labels", labels)
	if code != exitOK {
		t.Fatalf("exit %d: %s", code, errs)
	}
	// model-a: no errors in 60 — the boundaries decide as Judge does
	wantA, _ := r.Judge(make([]bool, k))
	if !strings.Contains(out, "Sequential plan: at most "+fmt.Sprint(pf.n)+" labels") {
		t.Errorf("header:\n%s", out)
	}
	line := ""
	for _, l := range strings.Split(out, "\n") {
		if strings.HasPrefix(l, "model-a") {
			line = l
		}
	}
	if !strings.Contains(line, map[sequential.Decision]string{sequential.Accept: "accept — stop", sequential.Continue: "continue", sequential.Reject: "reject — stop"}[wantA]) {
		t.Errorf("model-a line %q, Judge says %s", line, wantA)
	}
	t.Log("\n" + out)
}

func TestProgressBadInput(t *testing.T) {
	t.Parallel()
	pf := progressFixture(t, false)
	gap := pf.label(t, 10, func(rows []drawfolder.WorksheetRow) { rows[4].Label = "" })
	cases := []struct {
		name      string
		args      []string
		msg, hint string
	}{
		{"gap", []string{"--plan", pf.plan, "--draw", pf.draw, "--labels", gap},
			"labels.csv line 7, field label: item 6 is labeled but item 5 above it (line 6) is not: the labels must be a prefix of the worksheet",
			"hint: label item 5 and every unlabeled item above item 6"},
		{"missing flag", []string{"--plan", pf.plan, "--draw", pf.draw}, "probity: --labels is required", "hint: see 'probity progress --help'"},
		{"no such plan", []string{"--plan", filepath.Join(pf.dir, "nope.yaml"), "--draw", pf.draw, "--labels", gap}, "nope.yaml: no such file", "hint: check the path"},
	}
	for _, c := range cases {
		code, out, errs := runProgressCmd(t, c.args...)
		if code != exitBadInput || out != "" || !strings.Contains(errs, c.msg) || !strings.Contains(errs, c.hint) {
			t.Errorf("%s: exit %d, stdout %q, stderr %q", c.name, code, out, errs)
		}
		if lines := strings.Count(strings.TrimSpace(errs), "\n"); lines > 1 {
			t.Errorf("%s: more than a message and a hint: %q", c.name, errs)
		}
	}
	// a plan edited after the draw: fingerprint mismatch
	data, _ := os.ReadFile(pf.plan)
	edited := filepath.Join(pf.dir, "edited.yaml")
	os.WriteFile(edited, append(data, []byte("# edited\n")...), 0o644)
	code, _, errs := runProgressCmd(t, "--plan", edited, "--draw", pf.draw, "--labels", gap)
	if code != exitBadInput || !strings.Contains(errs, "plan_fingerprint") || !strings.Contains(errs, "hint: pass the plan file the draw was made with") {
		t.Errorf("edited plan: exit %d, %q", code, errs)
	}
	// a ledger changed after the draw
	ledger := filepath.Join(pf.draw, drawfolder.LedgerFile)
	ld, _ := os.ReadFile(ledger)
	os.WriteFile(ledger, bytes.Replace(ld, []byte("dec-00001"), []byte("dec-99999"), 1), 0o644)
	code, _, errs = runProgressCmd(t, "--plan", pf.plan, "--draw", pf.draw, "--labels", gap)
	if code != exitBadInput || !strings.Contains(errs, "ledger.csv: SHA-256") {
		t.Errorf("edited ledger: exit %d, %q", code, errs)
	}
	os.WriteFile(ledger, ld, 0o644)
	// a sequential plan whose boundaries were edited so they no longer meet
	sq := progressFixture(t, true)
	f := *sq.file
	rule := *f.Sequential
	rule.AcceptIfErrorsAtMost = append([]int{}, rule.AcceptIfErrorsAtMost...)
	rule.AcceptIfErrorsAtMost[rule.MaxSampleSize-1]--
	f.Sequential = &rule
	broken, _ := f.Marshal()
	os.WriteFile(sq.plan, broken, 0o644)
	code, _, errs = runProgressCmd(t, "--plan", sq.plan, "--draw", sq.draw, "--labels", sq.label(t, 5, nil))
	if code != exitBadInput || !strings.Contains(errs, "plan.yaml line 41, field sequential.accept_if_errors_at_most[169]: ") || !strings.Contains(errs, "the boundaries must meet") {
		t.Errorf("broken boundaries: exit %d, %q", code, errs)
	}
	// an unknown label
	bad := pf.label(t, 3, func(rows []drawfolder.WorksheetRow) { rows[1].Label = "OK" })
	code, _, errs = runProgressCmd(t, "--plan", pf.plan, "--draw", pf.draw, "--labels", bad)
	if code != exitBadInput || !strings.Contains(errs, `label "OK" (item 2) is not one of the plan's classes (ok, bad), blank or "unsure"`) {
		t.Errorf("unknown label: exit %d, %q", code, errs)
	}
}

// progressGolden compares got with testdata/progress/NAME (rewritten with
// -update).
func progressGolden(t *testing.T, name, got string) {
	t.Helper()
	golden.CompareString(t, filepath.Join("..", "..", "testdata", "progress", name), got)
}

// Golden outputs for a fixed and a sequential plan, human and --json
// (temp paths replaced by DIR).
func TestProgressGolden(t *testing.T) {
	t.Parallel()
	for _, seq := range []bool{false, true} {
		pf := progressFixture(t, seq)
		labels := pf.label(t, 30, func(rows []drawfolder.WorksheetRow) { rows[2].Label = drawfolder.Unsure })
		kind := "fixed"
		if seq {
			kind = "sequential"
		}
		for _, js := range []bool{false, true} {
			args := []string{"--plan", pf.plan, "--draw", pf.draw, "--labels", labels}
			name := kind + ".txt"
			if js {
				args = append(args, "--json")
				name = kind + ".json"
			}
			code, out, errs := runProgressCmd(t, args...)
			if code != exitOK {
				t.Fatalf("%s: exit %d: %s", name, code, errs)
			}
			progressGolden(t, name, strings.ReplaceAll(out, pf.dir, "DIR"))
		}
	}
}
