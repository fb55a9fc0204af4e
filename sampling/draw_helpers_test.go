package sampling

import (
	"bytes"
	"testing"

	"probity/plan"
	"probity/sampling/drawfolder"
	"probity/sampling/loggen"
)

// testPlan is a plan with two candidates: a label column and a threshold
// on the score.
func testPlan(seed string, n int) *plan.File {
	thr := 0.5
	return &plan.File{
		Format: plan.FileFormat, Seed: seed,
		Inputs:  plan.Inputs{Ceiling: 0.05, Confidence: 0.95, CandidateCount: 2, Method: plan.MethodExact, Multiplicity: plan.Bonferroni, Design: plan.DesignFixed, Require: plan.RequireAll},
		Rule:    plan.Rule{Model: plan.ModelBinomial, SampleSize: n, AcceptanceNumber: 1},
		Classes: []string{"fraud", "ok"},
		Candidates: []plan.Candidate{
			{Name: "model-a", Column: "model_a"},
			{Name: "score-0.7", ScoreColumn: "score", Threshold: &thr, Positive: "fraud", Negative: "ok"},
		},
	}
}

func genLog(t testing.TB, c loggen.Config) []byte {
	t.Helper()
	var b bytes.Buffer
	if err := loggen.Write(&b, c); err != nil {
		t.Fatal(err)
	}
	return b.Bytes()
}

func renderMap(t testing.TB, f *drawfolder.Content) map[string][]byte {
	t.Helper()
	files, err := f.Render()
	if err != nil {
		t.Fatal(err)
	}
	m := map[string][]byte{}
	for _, nf := range files {
		m[nf.Name] = nf.Data
	}
	return m
}
