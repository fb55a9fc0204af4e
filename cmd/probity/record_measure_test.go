package main

import (
	"bytes"
	"os"
	"path/filepath"
	"strings"
	"testing"
	"time"
)

// TestRecordRefusesMeasures: until the PDF shows the measures, record and
// verify refuse a plan with measures with exit 2, one line naming the
// plan and a hint, and record leaves no output folder behind.
func TestRecordRefusesMeasures(t *testing.T) {
	dir := t.TempDir()
	planPath := filepath.Join(dir, "plan.yaml")
	runCmd := func(args ...string) (int, string, string) {
		var out, errb bytes.Buffer
		d := deps{stdin: strings.NewReader(""), stdout: &out, stderr: &errb, now: func() time.Time { return time.Date(2026, 12, 1, 7, 15, 0, 0, time.UTC) },
			random: strings.NewReader(strings.Repeat("x", 64)), version: "test"}
		return run(args, d), out.String(), errb.String()
	}
	if code, _, stderr := runCmd("plan", "--confidence", "0.95", "--thresholds", "score:0.5", "--positive", "pos", "--negative", "neg",
		"--measure", "fnr:0.3", "--anticipated", "fnr:0.1", "--anticipated", "fpr:0.05", "--prevalence", "0.03", "--decisions", "100000",
		"--out", planPath); code != exitOK {
		t.Fatalf("plan: exit %d: %s", code, stderr)
	}
	out := filepath.Join(dir, "rec")
	for _, args := range [][]string{
		{"record", "--plan", planPath, "--draw", filepath.Join(dir, "draw"), "--labels", filepath.Join(dir, "labels.csv"), "--out", out},
		{"verify", "--plan", planPath, "--draw", filepath.Join(dir, "draw"), "--labels", filepath.Join(dir, "labels.csv"), out},
	} {
		code, stdout, stderr := runCmd(args...)
		if code != exitBadInput {
			t.Errorf("%s: exit %d, want %d (stderr %q)", args[0], code, exitBadInput, stderr)
		}
		if !strings.Contains(stderr, "plan.yaml: the plan declares error measures (measures:); the record of measures is not yet available") || !strings.Contains(stderr, "hint: ") {
			t.Errorf("%s: stderr %q", args[0], stderr)
		}
		if stdout != "" {
			t.Errorf("%s: stdout %q", args[0], stdout)
		}
	}
	if _, err := os.Stat(out); !os.IsNotExist(err) {
		t.Errorf("record left %s behind (%v)", out, err)
	}
}
