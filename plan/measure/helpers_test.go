package measure

import (
	"bytes"
	"encoding/json"
	"os/exec"
	"testing"

	"probity/plan/testkit/needs"
)

// runPython runs a Python program file with Debian's interpreter (which
// has scipy) on the JSON of in and decodes its JSON output into out.
// Without scipy the test fails in CI (CI set) and is skipped elsewhere
// (needs.PythonModules).
func runPython(t *testing.T, file string, in, out any) {
	t.Helper()
	python := needs.PythonModules(t, "numpy", "scipy")
	data, err := json.Marshal(in)
	if err != nil {
		t.Fatal(err)
	}
	cmd := exec.Command(python, file)
	cmd.Stdin = bytes.NewReader(data)
	var stdout, stderr bytes.Buffer
	cmd.Stdout, cmd.Stderr = &stdout, &stderr
	if err := cmd.Run(); err != nil {
		t.Fatalf("python reference %s failed: %v\n%s", file, err, stderr.String())
	}
	if err := json.Unmarshal(stdout.Bytes(), out); err != nil {
		t.Fatalf("decoding python output: %v\n%s", err, stdout.String())
	}
}

// binary is a population of one label-column candidate: its predicted
// positives and predicted negatives.
func binary(Np, Nn int64) Population {
	return Population{
		Strata:     []Stratum{{Label: "predicted positive", Population: Np}, {Label: "predicted negative", Population: Nn}},
		Candidates: []Candidate{{Name: "model", Positive: []bool{true, false}}},
	}
}

// banded is a population of score bands (lowest scores first) and
// threshold candidates: the candidate at index t predicts positive from
// band t on.
func banded(N []int64, thresholds ...int) Population {
	p := Population{}
	for h, n := range N {
		p.Strata = append(p.Strata, Stratum{Label: "band " + string(rune('A'+h)), Population: n})
	}
	for _, t := range thresholds {
		c := Candidate{Name: "from band " + string(rune('A'+t)), Positive: make([]bool, len(N))}
		for h := t; h < len(N); h++ {
			c.Positive[h] = true
		}
		p.Candidates = append(p.Candidates, c)
	}
	return p
}
