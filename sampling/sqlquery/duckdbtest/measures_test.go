package duckdbtest

import (
	"bytes"
	"database/sql"
	"fmt"
	"os"
	"path/filepath"
	"reflect"
	"testing"

	"probity/plan/planfile"
	"probity/sampling"
	"probity/sampling/loggen"
	"probity/sampling/sqlquery"
)

// TestDuckDBMeasuresMatchesFileDraw: for a plan with measures (a
// threshold plan and a label-column plan, testdata/sql/plan-measures-*.yaml),
// with and without the user's strata, the two-step draw inside DuckDB
// (counts query, the design sized by probity on the counted strata,
// selection query) gives the worksheets, ledger, strata and measures block
// of the draw from an export of the same table. The session's default
// collation is case-insensitive, which the queries must not follow.
//
// The plans were made by probity plan with --confidence 0.9 --positive
// fraud --prevalence 0.2 --decisions 30000 --date 2026-11-30T08:00:00Z
// --seed measures-sql-fixture and, for the threshold plan, --thresholds
// score:0.5,0.7 --negative ok --measure fnr:0.3 --measure fdr:0.3
// --anticipated fnr:0.1 --anticipated fdr:0.1; for the label-column plan,
// --candidate a=model_a --candidate b=model_b --classes fraud,ok --measure
// fnr:0.3 --measure error:0.3 --anticipated fnr:0.1 --anticipated error:0.1.
// Make them again so when the design search changes.
func TestDuckDBMeasuresMatchesFileDraw(t *testing.T) {
	dir := t.TempDir()
	logPath := filepath.Join(dir, "log.csv")
	var log bytes.Buffer
	if err := loggen.Write(&log, loggen.Config{Rows: 30_000, Seed: 8}); err != nil {
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
	mustExec(t, db, fmt.Sprintf(`CREATE TABLE pred AS SELECT * FROM read_csv('%s', header = true,
		columns = {'record_id': 'VARCHAR', 'region': 'VARCHAR', 'channel': 'VARCHAR', 'score': 'DOUBLE', 'model_a': 'VARCHAR', 'model_b': 'VARCHAR', 'text': 'VARCHAR'})`, logPath))
	mustExec(t, db, `UPDATE pred SET region = NULL WHERE record_id LIKE '%007'`)
	mustExec(t, db, `UPDATE pred SET region = 'North' WHERE record_id LIKE '%3' AND region = 'north'`)
	export := filepath.Join(dir, "export.csv")
	mustExec(t, db, fmt.Sprintf(`COPY pred TO '%s' (HEADER, NULLSTR '%s')`, export, sqlquery.NullText))
	mustExec(t, db, "SET default_collation = 'nocase'")

	for _, name := range []string{"threshold", "label"} {
		p, fp, err := planfile.Load(filepath.Join("..", "..", "..", "testdata", "sql", "plan-measures-"+name+".yaml"))
		if err != nil {
			t.Fatal(err)
		}
		for _, strata := range [][]string{nil, {"region"}} {
			t.Run(fmt.Sprintf("%s %v", name, strata), func(t *testing.T) {
				in := sampling.DrawInput{Plan: p, StrataColumns: append([]string(nil), strata...)}
				if err := sampling.AddPredictionStrata(&in); err != nil {
					t.Fatal(err)
				}
				s := sqlquery.Spec{Format: sqlquery.QueryFormat, ToolVersion: "test", Dialect: sqlquery.DuckDB, Table: "pred", IDColumn: "record_id",
					PlanFingerprint: fp, Seed: p.Seed, SelectionSeed: p.Seed, SampleSize: sqlquery.SampleSize(p), Candidates: p.Candidates,
					Strata: in.StrataColumns, Allocation: in.Alloc.Rule, Spare: 1, Show: []string{"text"}}
				for _, b := range in.Bands {
					s.Bands = append(s.Bands, b.String())
				}
				q, err := sqlquery.CountsQuery(&s)
				if err != nil {
					t.Fatal(err)
				}
				countsPath := filepath.Join(t.TempDir(), "counts.csv")
				queryCSV(t, db, q, countsPath)
				counts, err := sqlquery.ReadCounts(countsPath, nil, p, fp)
				if err != nil {
					t.Fatal(err)
				}
				q, err = sqlquery.SelectionQuery(counts)
				if err != nil {
					t.Fatal(err)
				}
				selected := filepath.Join(t.TempDir(), "selected.csv")
				queryCSV(t, db, q, selected)
				res, err := sqlquery.ImportSelection(selected, nil, p, fp, counts)
				if err != nil {
					t.Fatal(err)
				}
				fromSQL, err := res.Folder("test")
				if err != nil {
					t.Fatal(err)
				}
				fromFile := fileDraw(t, p, &s, export)
				compare(t, fromSQL, fromFile)
				if len(strata) > 0 {
					keepsNorth(t, fromSQL)
				}
				if fromSQL.Manifest.Measures == nil || !reflect.DeepEqual(fromSQL.Manifest.Measures, fromFile.Manifest.Measures) {
					t.Errorf("measures differ:\nduckdb: %+v\nfile:   %+v", fromSQL.Manifest.Measures, fromFile.Manifest.Measures)
				}
				if !reflect.DeepEqual(fromSQL.Manifest.Allocation, fromFile.Manifest.Allocation) {
					t.Errorf("allocation differs:\nduckdb: %+v\nfile:   %+v", fromSQL.Manifest.Allocation, fromFile.Manifest.Allocation)
				}
			})
		}
	}
}
