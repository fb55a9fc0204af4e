package sqlquery

import (
	"path/filepath"
	"testing"

	"probity/internal/golden"
	"probity/plan"
)

// TestQueryGolden pins the query text for each dialect. The import
// rebuilds the query from a result's first row and records its SHA-256,
// so any change to the text must come with a new QueryFormat (and then an
// update of these files with -update).
func TestQueryGolden(t *testing.T) {
	th := 0.7
	for _, d := range Dialects {
		s := &Spec{Format: QueryFormat, ToolVersion: "0.1.0", Dialect: d,
			PlanFingerprint: "5d0c6f0a7b1e2d3c4b5a69788796a5b4c3d2e1f00112233445566778899aabbc",
			Seed:            `it's a \ seed`, SelectionSeed: `it's a \ seed`,
			Table: `analytics."pred.log"`, IDColumn: "record_id", Strata: []string{"region", "select"},
			Bands: []string{"score=0.5,0.9"}, Where: []string{"channel=web,app"}, Show: []string{"text"},
			Candidates: []plan.Candidate{{Name: "model-a", Column: "model_a"}, {Name: "score-0.7", ScoreColumn: "score", Threshold: &th, Positive: "fraud", Negative: "ok"}},
			SampleSize: 581, Allocation: "proportional", MinPerStratum: 3, Spare: 2, Double: 20}
		q, err := Query(s)
		if err != nil {
			t.Fatal(err)
		}
		path := filepath.Join("..", "..", "testdata", "sql", "query-"+string(d)+".sql")
		if !golden.CompareString(t, path, q) {
			t.Errorf("the %s query changed: bump QueryFormat if the change is intended", d)
		}
	}
}
