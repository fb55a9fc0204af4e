package sqlquery

import (
	"fmt"
	"testing"

	"probity/plan"
)

func TestScratchQuery(t *testing.T) {
	th := 0.5
	s := &Spec{Format: 1, ToolVersion: "dev", Dialect: Postgres, PlanFingerprint: "abc", Seed: "s'1", SelectionSeed: "s'1",
		Table: "public.t", IDColumn: "id", Strata: []string{"region"}, Show: []string{"text"},
		Candidates: []plan.Candidate{{Name: "m", ScoreColumn: "score", Threshold: &th, Positive: "p", Negative: "n"}},
		SampleSize: 5, Allocation: "proportional", Spare: 1}
	q, err := Query(s)
	if err != nil {
		t.Fatal(err)
	}
	fmt.Println(q)
}
