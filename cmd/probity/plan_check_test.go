package main

import (
	"fmt"
	"os"
	"path/filepath"
	"strings"
	"testing"
	"time"

	"probity/plan"
	"probity/plan/chrono"
	"probity/sampling"
	"probity/sampling/drawfolder"
	"probity/sampling/loggen"
	"probity/sampling/safewrite"
)

// editPlan writes a copy of the plan at src with old replaced by new (the
// first occurrence) to dir/name and returns its path and the line of the
// edit.
func editPlan(t *testing.T, src, dir, name, old, new string) (string, int) {
	t.Helper()
	data, err := os.ReadFile(src)
	if err != nil {
		t.Fatal(err)
	}
	s := string(data)
	i := strings.Index(s, old)
	if i < 0 {
		t.Fatalf("%q is not in %s", old, src)
	}
	path := filepath.Join(dir, name)
	writeFile(t, path, []byte(s[:i]+new+s[i+len(old):]))
	return path, strings.Count(s[:i], "\n") + 1
}

// The attacks on the plan, through draw: a plan edited after
// probity plan wrote it is refused with exit 2, naming the file, the line
// and the field, and no draw folder is left. Before plans were checked on
// load, draw accepted every one of them (and the last two then stopped
// record with an internal error).
func TestDrawRefusesEditedPlans(t *testing.T) {
	t.Parallel()
	dir := t.TempDir()
	log := writeGenLog(t, dir, "log.csv", loggen.Config{Rows: 3000, Seed: 4})
	for i, tc := range []struct{ name, old, new, field string }{
		{"sample size", "sample_size: 581", "sample_size: 60", "rule.sample_size"},
		{"acceptance number", "acceptance_number: 5", "acceptance_number: 9", "rule.acceptance_number"},
		{"ceiling", "ceiling: 0.02", "ceiling: 0.05", "rule.sample_size"},
		{"consumer's risk", "consumer_risk: 0.024711494731420997", "consumer_risk: 0.01", "rule.consumer_risk"},
		{"producer's risk", "producer_risk: 0.07414912303290026", "producer_risk: 0.01", "rule.producer_risk"},
		{"positive = negative", "negative: ok", "negative: fraud", "candidates[1].negative"},
		{"threshold .nan", "threshold: 0.7", "threshold: .nan", "candidates[1].threshold"},
		{"sequential without its section", "design: fixed", "design: sequential", "inputs.design"},
	} {
		t.Run(tc.name, func(t *testing.T) {
			p, line := editPlan(t, drawPlan, dir, fmt.Sprintf("plan-%d.yaml", i), tc.old, tc.new)
			if tc.field == "rule.sample_size" && tc.old != "sample_size: 581" {
				line = 19 // the rule's sample size, which the edited input no longer gives
			}
			out := filepath.Join(dir, fmt.Sprintf("out-%d", i))
			code, stdout, stderr := runDrawCmd(t, nil, "--plan", p, "--log", log, "--out", out)
			want := fmt.Sprintf("probity: %s line %d, field %s: ", p, line, tc.field)
			if code != exitBadInput || !strings.HasPrefix(stderr, want) || !strings.Contains(stderr, "\nhint: ") {
				t.Fatalf("exit %d, stderr %q; want exit 2 and %q", code, stderr, want)
			}
			if stdout != "" {
				t.Errorf("stdout %q", stdout)
			}
			if _, err := os.Stat(out); !os.IsNotExist(err) {
				t.Errorf("a refused draw left %s", out)
			}
		})
	}
}

// drawUnchecked draws the fixture's log under a plan file that is not
// checked — what draw did before plans were checked on load — into
// dir/name.
func drawUnchecked(t *testing.T, fx *recFixture, planPath, name string) string {
	t.Helper()
	data, err := os.ReadFile(planPath)
	if err != nil {
		t.Fatal(err)
	}
	p, _, err := plan.Decode(data, planPath)
	if err != nil {
		t.Fatal(err)
	}
	log, err := os.Open(fx.logPath)
	if err != nil {
		t.Fatal(err)
	}
	defer log.Close()
	folder, err := sampling.Draw(sampling.DrawInput{Plan: p, PlanFingerprint: plan.Fingerprint(data), LogPath: "log.csv", Log: log,
		Format: "csv", IDColumn: "record_id", StrataColumns: []string{"depot"}, Show: fx.show,
		Alloc: sampling.AllocOptions{Rule: sampling.Proportional, Spare: 2}, ToolVersion: "test"})
	if err != nil {
		t.Fatal(err)
	}
	drawn := chrono.FromClock(time.Date(2026, 11, 30, 15, 0, 0, 0, time.UTC))
	folder.Manifest.Drawn = &drawn
	out := filepath.Join(fx.dir, name)
	if err := drawfolder.Write(out, folder, safewrite.FolderOptions{}); err != nil {
		t.Fatal(err)
	}
	return out
}

// The first attack end to end: rule.sample_size edited down to 60
// and the sample drawn from the edited plan. record refuses it (exit 2,
// nothing written) where it used to sign "ACCEPT 20/60 errors"; progress
// and verify refuse the plan too.
func TestEditedPlanRefusedByRecordProgressVerify(t *testing.T) {
	t.Parallel()
	fx := newRecFixture(t, true, 0)
	n := fx.file.Rule.SampleSize
	edited, line := editPlan(t, fx.planPath, fx.dir, "edited.yaml", fmt.Sprintf("sample_size: %d", n), "sample_size: 60")
	draw := drawUnchecked(t, fx, edited, "draw-edited")
	_, rows, err := drawfolder.ReadWorksheet(filepath.Join(draw, drawfolder.WorksheetFile))
	if err != nil {
		t.Fatal(err)
	}
	for i := range rows {
		rows[i].Label = fx.truth[rows[i].RecordID]
	}
	labels := filepath.Join(fx.dir, "edited-labels.csv")
	f, err := os.Create(labels)
	if err != nil {
		t.Fatal(err)
	}
	if err := drawfolder.WriteWorksheet(f, fx.show, rows); err != nil {
		t.Fatal(err)
	}
	f.Close()
	want := fmt.Sprintf("probity: %s line %d, field rule.sample_size: states 60, but the inputs give %d\n", edited, line, n)
	rec := filepath.Join(fx.dir, "rec")
	for _, args := range [][]string{
		{"record", "--plan", edited, "--draw", draw, "--labels", labels, "--out", rec, "--date", "2026-12-01"},
		{"progress", "--plan", edited, "--draw", draw, "--labels", labels},
	} {
		code, stdout, stderr := runProbity(t, args...)
		if code != exitBadInput || !strings.HasPrefix(stderr, want) || stdout != "" {
			t.Errorf("%s: exit %d, stdout %q, stderr %q; want %q", args[0], code, stdout, stderr, want)
		}
	}
	if _, err := os.Stat(rec); !os.IsNotExist(err) {
		t.Errorf("a refused record left %s", rec)
	}
	// verify of a genuine record, given the edited plan
	good := filepath.Join(fx.dir, "good")
	if code, _, stderr := runProbity(t, "record", "--plan", fx.planPath, "--draw", fx.draw, "--labels", fx.labels(t, "labels.csv", nil),
		"--out", good, "--date", "2026-12-01"); code == exitBadInput || code == exitInternal {
		t.Fatal(stderr)
	}
	code, _, stderr := runProbity(t, "verify", good, "--plan", edited, "--draw", fx.draw, "--labels", filepath.Join(fx.dir, "labels.csv"))
	if code != exitBadInput || !strings.Contains(stderr, want) {
		t.Errorf("verify: exit %d, %q; want %q", code, stderr, want)
	}
}
