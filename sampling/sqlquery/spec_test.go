package sqlquery

import (
	"strings"
	"testing"

	"probity/plan"
)

// TestDetailRoundTrip checks that the draw row's description decodes to
// the Spec it was made from, lists the value columns each once, and that
// an unknown key is refused.
func TestDetailRoundTrip(t *testing.T) {
	th := 0.5
	s := &Spec{Format: QueryFormat, ToolVersion: "v", Dialect: DuckDB, PlanFingerprint: "fp", Seed: `a"b\c`, SelectionSeed: `a"b\c`,
		Table: "t", IDColumn: "id", Strata: []string{"r"}, Show: []string{"text", "score2"},
		Candidates: []plan.Candidate{{Name: "a", Column: "m"}, {Name: "b", ScoreColumn: "score", Threshold: &th, Positive: "p", Negative: "n"}, {Name: "c", Column: "m"}},
		SampleSize: 9, Allocation: "equal", Spare: 1}
	data, err := s.MarshalDetail()
	if err != nil {
		t.Fatal(err)
	}
	if strings.Contains(string(data), "\n") {
		t.Error("the description spans lines")
	}
	d, err := parseDetail(string(data))
	if err != nil {
		t.Fatal(err)
	}
	if d.Seed != s.Seed || d.Dialect != DuckDB || d.Allocation != "equal" || strings.Join(d.Values, ",") != "m,score,text,score2" {
		t.Errorf("decoded %+v", d)
	}
	if d.Bands == nil || d.Where == nil {
		t.Error("empty lists must be written as [], not null")
	}
	if _, err := parseDetail(strings.Replace(string(data), `"format"`, `"formats"`, 1)); err == nil {
		t.Error("an unknown key was accepted")
	}
}

func TestParseDialect(t *testing.T) {
	for _, d := range []string{"postgres", "duckdb"} {
		if got, err := ParseDialect(d); err != nil || string(got) != d {
			t.Errorf("ParseDialect(%q) = %q, %v", d, got, err)
		}
	}
	for _, d := range []string{"", "Postgres", "postgresql", "sqlite"} {
		if _, err := ParseDialect(d); err == nil {
			t.Errorf("ParseDialect(%q) accepted", d)
		}
	}
}
