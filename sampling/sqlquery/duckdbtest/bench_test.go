package duckdbtest

import (
	"database/sql"
	"fmt"
	"os"
	"testing"

	"probity/plan"
	"probity/sampling"
	"probity/sampling/sqlquery"
)

// BenchmarkDuckDBDraw times the drawing query on the generated log named
// by PROBITY_BENCH_LOG (e.g. probity-genlog -rows 10000000), loaded once
// into an in-memory DuckDB, stratified by region and channel (12 strata),
// beside BenchmarkFileDraw on the same file: compare their ratio, measured
// in the same sitting.
//
//	PROBITY_BENCH_LOG=/tmp/log10m.csv go test -run XXX -bench . -benchtime 3x
func BenchmarkDuckDBDraw(b *testing.B) {
	path := os.Getenv("PROBITY_BENCH_LOG")
	if path == "" {
		b.Skip("set PROBITY_BENCH_LOG to a generated log")
	}
	db, err := sql.Open("duckdb", "")
	if err != nil {
		b.Fatal(err)
	}
	defer db.Close()
	if _, err := db.Exec(fmt.Sprintf(`CREATE TABLE predictions AS SELECT * FROM read_csv('%s', header = true,
		columns = {'record_id': 'VARCHAR', 'region': 'VARCHAR', 'channel': 'VARCHAR', 'score': 'DOUBLE', 'model_a': 'VARCHAR', 'model_b': 'VARCHAR', 'text': 'VARCHAR'})`, path)); err != nil {
		b.Fatal(err)
	}
	p, s := benchSpec()
	s.Dialect, s.Table = sqlquery.DuckDB, "predictions"
	q, err := sqlquery.Query(s)
	if err != nil {
		b.Fatal(err)
	}
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		rows, err := db.Query(q)
		if err != nil {
			b.Fatal(err)
		}
		n := 0
		for rows.Next() {
			n++
		}
		rows.Close()
		if n < p.Rule.SampleSize {
			b.Fatalf("%d result rows", n)
		}
	}
}

// BenchmarkFileDraw is the draw from the same file, for the ratio.
func BenchmarkFileDraw(b *testing.B) {
	path := os.Getenv("PROBITY_BENCH_LOG")
	if path == "" {
		b.Skip("set PROBITY_BENCH_LOG to a generated log")
	}
	p, s := benchSpec()
	for i := 0; i < b.N; i++ {
		f, err := os.Open(path)
		if err != nil {
			b.Fatal(err)
		}
		_, err = sampling.Draw(sampling.DrawInput{Plan: p, PlanFingerprint: "bench", LogPath: path, Log: f,
			IDColumn: "record_id", StrataColumns: s.Strata, Show: s.Show, ToolVersion: "bench",
			Alloc: sampling.AllocOptions{Rule: s.Allocation, Spare: s.Spare}})
		f.Close()
		if err != nil {
			b.Fatal(err)
		}
	}
}

// benchSpec is a plan of 581 with two candidates and a draw by region and
// channel with 2 spares.
func benchSpec() (*plan.File, *sqlquery.Spec) {
	th := 0.7
	p := &plan.File{Format: plan.FileFormat, Seed: "7d1f0c9a2b3e4f5061728394a5b6c7d8", Rule: plan.Rule{SampleSize: 581},
		Candidates: []plan.Candidate{{Name: "model-a", Column: "model_a"}, {Name: "score-0.7", ScoreColumn: "score", Threshold: &th, Positive: "fraud", Negative: "ok"}}}
	s := &sqlquery.Spec{Format: sqlquery.QueryFormat, ToolVersion: "bench", PlanFingerprint: "bench", Seed: p.Seed, SelectionSeed: p.Seed,
		IDColumn: "record_id", Strata: []string{"region", "channel"}, Show: []string{"text"}, Candidates: p.Candidates,
		SampleSize: 581, Allocation: "proportional", Spare: 2}
	return p, s
}
