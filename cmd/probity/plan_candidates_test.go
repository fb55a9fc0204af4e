package main

import (
	"path/filepath"
	"strings"
	"testing"

	"probity/plan/planfile"
)

// TestMixedCandidates (issue 16, item 18): label-column and threshold
// candidates are declared in one plan (before, "use either --candidate or
// --thresholds, not both"); the thresholds' labels must be classes.
func TestMixedCandidates(t *testing.T) {
	t.Parallel()
	out := filepath.Join(t.TempDir(), "plan.yaml")
	code, stdout, stderr := runProbity(t, "plan", "--ceiling", "0.05", "--confidence", "0.9",
		"--candidate", "model-a=model_a", "--thresholds", "score:0.5,0.7", "--positive", "fraud", "--negative", "ok",
		"--classes", "ok,fraud", "--multiplicity", "fixed-sequence", "--out", out)
	if code != exitOK {
		t.Fatalf("exit %d\n%s%s", code, stdout, stderr)
	}
	f, _, err := planfile.Load(out)
	if err != nil {
		t.Fatal(err)
	}
	var got []string
	for _, c := range f.Candidates {
		got = append(got, c.Name)
	}
	if strings.Join(got, " ") != "model-a score>=0.5 score>=0.7" || f.Inputs.CandidateCount != 3 || strings.Join(f.Classes, ",") != "ok,fraud" {
		t.Fatalf("candidates %v, M %d, classes %v", got, f.Inputs.CandidateCount, f.Classes)
	}
	code, stdout, stderr = runProbity(t, "plan", "--ceiling", "0.05", "--confidence", "0.9",
		"--candidate", "model-a=model_a", "--thresholds", "score:0.5", "--positive", "fraud", "--negative", "fine", "--classes", "ok,fraud")
	want := "probity: --classes \"ok,fraud\" does not list \"fine\", a label the thresholds predict\nhint: list every label a labeler may give, the --positive and --negative ones included\n"
	if code != exitBadInput || stderr != want || stdout != "" {
		t.Fatalf("a threshold label outside the classes: exit %d\n%s%s", code, stdout, stderr)
	}
}
