package sqlquery

import (
	"path/filepath"
	"strings"
	"testing"

	"probity/plan"
	"probity/plan/testkit/golden"
	"probity/sampling"
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
		queries := map[string]func() (string, error){"": func() (string, error) { return Query(s) }}
		if d.TwoStep() {
			// The selection query for invented counts of three strata, one
			// of them too small for its share.
			counts := &Counts{SHA256: "9f86d081884c7d659a2feaa0c55ad015a3bf4f1b2b0b822cd15d6c15b0f00a08", Spec: s, TableRows: 20500, InScope: 20000,
				Strata: []sampling.StratumAllocation{{Label: "north|web|[0,0.5)", Population: 12000, Sample: 345, Spare: 2},
					{Label: "south|app|[0.5,0.9)", Population: 7998, Sample: 230, Spare: 2}, {Label: `s'\|x|[0.9,1]`, Population: 2, Sample: 2}}}
			queries = map[string]func() (string, error){
				"-counts":    func() (string, error) { return CountsQuery(s) },
				"-selection": func() (string, error) { return SelectionQuery(counts) },
			}
		}
		for suffix, query := range queries {
			q, err := query()
			if err != nil {
				t.Fatal(err)
			}
			if strings.Count(q, "skip_unavailable_shards") != strings.Count(q, "skip_unavailable_shards = 0,") {
				t.Errorf("the %s%s query sets skip_unavailable_shards to something other than 0", d, suffix)
			}
			path := filepath.Join("..", "..", "testdata", "sql", "query-"+string(d)+suffix+".sql")
			if !golden.CompareString(t, path, q) {
				t.Errorf("the %s%s query changed: bump QueryFormat if the change is intended", d, suffix)
			}
		}
	}
}

// TestMeasuresQueryGolden pins the two queries of a draw for a plan with
// measures in PostgreSQL and DuckDB (the prediction strata last, the
// allocation given as literals in the selection query), and checks that
// the one-query draw refuses such a plan.
func TestMeasuresQueryGolden(t *testing.T) {
	for _, d := range []Dialect{Postgres, DuckDB} {
		s := &Spec{Format: QueryFormat, ToolVersion: "0.1.0", Dialect: d,
			PlanFingerprint: "5d0c6f0a7b1e2d3c4b5a69788796a5b4c3d2e1f00112233445566778899aabbc",
			Seed:            `it's a \ seed`, SelectionSeed: `it's a \ seed`,
			Table: `analytics."pred.log"`, IDColumn: "record_id", Strata: []string{"region", "model_a"},
			Where: []string{"channel=web,app"}, Show: []string{"text"},
			Candidates: []plan.Candidate{{Name: "model-a", Column: "model_a"}},
			SampleSize: 212, Allocation: sampling.Measures, Spare: 1, Double: 20}
		if !s.TwoStep() {
			t.Fatalf("%s: a plan with measures must draw in two steps", d)
		}
		if _, err := Query(s); err == nil || !strings.Contains(err.Error(), "a plan with measures draws in two steps") {
			t.Errorf("%s: Query of a plan with measures: %v", d, err)
		}
		counts := &Counts{SHA256: "9f86d081884c7d659a2feaa0c55ad015a3bf4f1b2b0b822cd15d6c15b0f00a08", Spec: s, TableRows: 20500, InScope: 20000,
			Strata: []sampling.StratumAllocation{{Label: "north|fraud", Population: 2000, Sample: 120, Spare: 1},
				{Label: "north|ok", Population: 17998, Sample: 90, Spare: 1}, {Label: `s'\|fraud`, Population: 2, Sample: 2}}}
		queries := map[string]func() (string, error){
			"-counts":    func() (string, error) { return CountsQuery(s) },
			"-selection": func() (string, error) { return SelectionQuery(counts) },
		}
		for suffix, query := range queries {
			q, err := query()
			if err != nil {
				t.Fatal(err)
			}
			path := filepath.Join("..", "..", "testdata", "sql", "query-"+string(d)+"-measures"+suffix+".sql")
			if !golden.CompareString(t, path, q) {
				t.Errorf("the %s measures%s query changed: bump QueryFormat if the change is intended", d, suffix)
			}
		}
	}
}
