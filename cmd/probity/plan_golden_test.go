package main

import (
	"path/filepath"
	"testing"

	"probity/plan/testkit/golden"
)

// The reports for a few fixed inputs, compared byte for byte with
// testdata/plan (go test ./cmd/probity -run PlanGolden -update
// rewrites them after a deliberate change).
func TestPlanGolden(t *testing.T) {
	t.Parallel()
	for _, tc := range []struct {
		name string
		args []string
	}{
		{"issue-example.txt", []string{"--ceiling", "0.02", "--confidence", "0.95", "--anticipated", "0.01"}},
		{"issue-example.json", []string{"--ceiling", "0.02", "--confidence", "0.95", "--anticipated", "0.01", "--json"}},
		{"zero-failure.txt", []string{"--ceiling", "0.02", "--confidence", "0.95"}},
		{"batch-thresholds.txt", []string{"--ceiling", "0.02", "--confidence", "0.95", "--anticipated", "0.01", "--population", "20000",
			"--thresholds", "score:0.50,0.70", "--positive", "fraud", "--negative", "ok", "--multiplicity", "holm", "--require", "any"}},
		{"budget.txt", []string{"--budget", "300", "--confidence", "0.9", "--ceiling", "0.02"}},
	} {
		code, out, errOut := runPlanCmd(t, tc.args...)
		if code != exitOK || errOut != "" {
			t.Fatalf("%s: exit %d, stderr %q", tc.name, code, errOut)
		}
		golden.CompareString(t, filepath.Join("..", "..", "testdata", "plan", tc.name), out)
	}
}
