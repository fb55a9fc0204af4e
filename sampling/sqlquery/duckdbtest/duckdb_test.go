package duckdbtest

import (
	"bytes"
	"database/sql"
	"encoding/csv"
	"fmt"
	"os"
	"path/filepath"
	"slices"
	"strings"
	"testing"

	_ "github.com/duckdb/duckdb-go/v2"

	"probity/plan"
	"probity/sampling"
	"probity/sampling/drawfolder"
	"probity/sampling/loggen"
	"probity/sampling/sqlquery"
)

// testPlan has a label candidate and a threshold candidate, and a seed
// that needs escaping.
func testPlan(n int) *plan.File {
	th := 0.7
	return &plan.File{
		Format: plan.FileFormat, Seed: `duck 'seed' \ ok`,
		Inputs:  plan.Inputs{Ceiling: 0.05, Confidence: 0.95, CandidateCount: 2},
		Rule:    plan.Rule{SampleSize: n, AcceptanceNumber: 2},
		Classes: []string{"fraud", "ok"},
		Candidates: []plan.Candidate{
			{Name: "model a", Column: "model a"},
			{Name: "cut 0.7", ScoreColumn: "score", Threshold: &th, Positive: "fraud", Negative: "ok"},
		},
	}
}

// queryCSV runs a query and writes its result as CSV with a header, NULL
// as an empty field (as the DuckDB shell's -csv mode does).
func queryCSV(t *testing.T, db *sql.DB, q, path string) {
	t.Helper()
	rows, err := db.Query(q)
	if err != nil {
		t.Fatalf("query: %v", err)
	}
	defer rows.Close()
	cols, _ := rows.Columns()
	var buf bytes.Buffer
	w := csv.NewWriter(&buf)
	w.Write(cols)
	vals := make([]sql.NullString, len(cols))
	ptrs := make([]any, len(cols))
	for i := range vals {
		ptrs[i] = &vals[i]
	}
	for rows.Next() {
		if err := rows.Scan(ptrs...); err != nil {
			t.Fatal(err)
		}
		rec := make([]string, len(cols))
		for i, v := range vals {
			rec[i] = v.String
		}
		w.Write(rec)
	}
	if err := rows.Err(); err != nil {
		t.Fatal(err)
	}
	w.Flush()
	if err := os.WriteFile(path, buf.Bytes(), 0o644); err != nil {
		t.Fatal(err)
	}
}

func mustExec(t *testing.T, db *sql.DB, q string) {
	t.Helper()
	if _, err := db.Exec(q); err != nil {
		t.Fatalf("%s: %v", q, err)
	}
}

// TestDuckDBQueryMatchesFileDraw loads a generated log into DuckDB, runs
// the printed query, imports its result, and compares the folder with the
// draw from an export of the same table: worksheets and ledger must be
// byte-identical. The session's default collation is case-insensitive,
// which the query must not follow (strata "North" and "north" stay
// apart).
func TestDuckDBQueryMatchesFileDraw(t *testing.T) {
	rows := 300_000
	if testing.Short() {
		rows = 30_000
	}
	dir := t.TempDir()
	logPath := filepath.Join(dir, "log.csv")
	var log bytes.Buffer
	if err := loggen.Write(&log, loggen.Config{Rows: rows, Seed: 8}); err != nil {
		t.Fatal(err)
	}
	if err := os.WriteFile(logPath, log.Bytes(), 0o644); err != nil {
		t.Fatal(err)
	}
	db, err := sql.Open("duckdb", "")
	if err != nil {
		t.Fatal(err)
	}
	defer db.Close()
	db.SetMaxOpenConns(1) // one connection: SET applies to the session
	mustExec(t, db, `CREATE SCHEMA "my schema"`)
	mustExec(t, db, fmt.Sprintf(`CREATE TABLE "my schema"."pred log" AS SELECT * FROM read_csv('%s', header = true,
		columns = {'record_id': 'VARCHAR', 'region': 'VARCHAR', 'select': 'VARCHAR', 'score': 'DOUBLE', 'model a': 'VARCHAR', 'model_b': 'VARCHAR', 'text col': 'VARCHAR'})`, logPath))
	mustExec(t, db, `UPDATE "my schema"."pred log" SET region = NULL WHERE record_id LIKE '%007'`)
	mustExec(t, db, `UPDATE "my schema"."pred log" SET region = 'North' WHERE record_id LIKE '%3' AND region = 'north'`)
	mustExec(t, db, `UPDATE "my schema"."pred log" SET "text col" = NULL WHERE record_id LIKE '%13'`)
	export := filepath.Join(dir, "export.csv")
	mustExec(t, db, fmt.Sprintf(`COPY "my schema"."pred log" TO '%s' (HEADER, NULLSTR '%s')`, export, sqlquery.NullText))
	mustExec(t, db, "SET default_collation = 'nocase'")

	p := testPlan(500)
	cases := []struct {
		name string
		spec sqlquery.Spec
	}{
		{"strata, band, minimum, spares, double", sqlquery.Spec{Strata: []string{"region", "select"}, Bands: []string{"score=0.5,0.9"},
			Show: []string{"text col"}, Allocation: "proportional", MinPerStratum: 4, Spare: 2, Double: 25}},
		{"where, equal, period", sqlquery.Spec{Strata: []string{"select"}, Where: []string{"region=north,(null),east"},
			Show: []string{"text col", "model_b"}, Allocation: "equal", Spare: 1, Period: "2026-11"}},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			s := c.spec
			s.Format, s.ToolVersion, s.Dialect, s.Table, s.IDColumn = sqlquery.QueryFormat, "test", sqlquery.DuckDB, `my schema.pred log`, "record_id"
			s.PlanFingerprint, s.Seed, s.SelectionSeed, s.SampleSize, s.Candidates = "f00d", p.Seed, p.Seed, p.Rule.SampleSize, p.Candidates
			if s.Period != "" {
				s.SelectionSeed = sampling.PeriodSeed(p.Seed, s.Period)
			}
			q, err := sqlquery.Query(&s)
			if err != nil {
				t.Fatal(err)
			}
			result := filepath.Join(dir, "result.csv")
			queryCSV(t, db, q, result)
			res, err := sqlquery.Import(result, nil, p, "f00d")
			if err != nil {
				t.Fatal(err)
			}
			fromSQL, err := res.Folder("test")
			if err != nil {
				t.Fatal(err)
			}
			fromFile := fileDraw(t, p, &s, export)
			compare(t, fromSQL, fromFile)
			if slices.Contains(s.Strata, "region") {
				keepsNorth(t, fromSQL)
			}
			if res.Spec.Dialect != sqlquery.DuckDB || fromSQL.Manifest.Engine.QuerySHA256 != drawfolder.SHA256Hex([]byte(q)) {
				t.Errorf("manifest engine %+v", fromSQL.Manifest.Engine)
			}
		})
	}
}

// fileDraw runs the draw from a file with the settings of s.
func fileDraw(t *testing.T, p *plan.File, s *sqlquery.Spec, path string) *drawfolder.Content {
	t.Helper()
	f, err := os.Open(path)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	in := sampling.DrawInput{Plan: p, PlanFingerprint: s.PlanFingerprint, LogPath: path, Log: f, Period: s.Period,
		IDColumn: s.IDColumn, StrataColumns: s.Strata, Show: s.Show, Double: s.Double, ToolVersion: "test",
		Alloc: sampling.AllocOptions{Rule: s.Allocation, MinPerStratum: s.MinPerStratum, Spare: s.Spare}}
	for _, b := range s.Bands {
		band, err := sampling.ParseBand(b)
		if err != nil {
			t.Fatal(err)
		}
		in.Bands = append(in.Bands, band)
	}
	for _, w := range s.Where {
		fl, err := sampling.ParseFilter(w)
		if err != nil {
			t.Fatal(err)
		}
		in.Where = append(in.Where, fl)
	}
	folder, err := sampling.Draw(in)
	if err != nil {
		t.Fatal(err)
	}
	return folder
}

// compare requires byte-identical worksheets and ledgers and the same
// strata in both manifests.
func compare(t *testing.T, a, b *drawfolder.Content) {
	t.Helper()
	ra, err := a.Render()
	if err != nil {
		t.Fatal(err)
	}
	rb, err := b.Render()
	if err != nil {
		t.Fatal(err)
	}
	for i := range ra {
		if ra[i].Name == drawfolder.ManifestFile {
			continue
		}
		if i >= len(rb) || rb[i].Name != ra[i].Name || !bytes.Equal(ra[i].Data, rb[i].Data) {
			t.Errorf("%s differs between DuckDB and the file draw:\n%s", ra[i].Name, firstDiff(ra[i].Data, rb[min(i, len(rb)-1)].Data))
		}
	}
	if fmt.Sprint(a.Manifest.Strata) != fmt.Sprint(b.Manifest.Strata) {
		t.Errorf("strata differ:\nduckdb: %v\nfile:   %v", a.Manifest.Strata, b.Manifest.Strata)
	}
}

// keepsNorth checks that a draw stratified by region kept the stratum
// North apart from north under a case-insensitive default collation.
func keepsNorth(t *testing.T, c *drawfolder.Content) {
	t.Helper()
	if !strings.Contains(fmt.Sprint(c.Manifest.Strata), "North") {
		t.Error("the stratum North is missing: a case-insensitive collation merged it")
	}
}

func firstDiff(a, b []byte) string {
	la, lb := strings.Split(string(a), "\n"), strings.Split(string(b), "\n")
	for i := 0; i < len(la) || i < len(lb); i++ {
		var x, y string
		if i < len(la) {
			x = la[i]
		}
		if i < len(lb) {
			y = lb[i]
		}
		if x != y {
			return fmt.Sprintf("line %d:\n  duckdb: %s\n  file:   %s", i+1, x, y)
		}
	}
	return "(same lines)"
}
