package sqlquery

import (
	"bytes"
	"fmt"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"probity/plan"
	"probity/sampling"
	"probity/sampling/drawfolder"
	"probity/sampling/loggen"
)

// e2eColumns are the table's columns for a generated log (loggen.Columns,
// in order), renamed to names that need quoting.
var e2eColumns = []string{`Record "ID"`, "region", "select", "score", "model a", "model_b", "text col"}

// e2ePlan is a plan with a label candidate and a threshold candidate, and
// a seed with a quote and a backslash.
func e2ePlan(n int) *plan.File {
	th := 0.7
	return &plan.File{
		Format: plan.FileFormat, Seed: `e2e 'seed' \ ok`,
		Inputs:  plan.Inputs{Ceiling: 0.05, Confidence: 0.95, CandidateCount: 2},
		Rule:    plan.Rule{SampleSize: n, AcceptanceNumber: 2},
		Classes: []string{"fraud", "ok"},
		Candidates: []plan.Candidate{
			{Name: "model a", Column: "model a"},
			{Name: "cut 0.7", ScoreColumn: "score", Threshold: &th, Positive: "fraud", Negative: "ok"},
		},
	}
}

// loadGenerated creates the table name in schema from a generated log of
// rows rows (loaded with COPY), with some NULL regions and texts, and
// returns its name as --table takes it.
func loadGenerated(t *testing.T, pg *pgServer, schema, name string, rows int) string {
	t.Helper()
	var log bytes.Buffer
	if err := loggen.Write(&log, loggen.Config{Rows: rows, Seed: 6}); err != nil {
		t.Fatal(err)
	}
	table := quotePart(schema) + "." + quotePart(name)
	qt, err := Postgres.QuoteTable(table)
	if err != nil {
		t.Fatal(err)
	}
	types := []string{"text", "text", "text", "double precision", "text", "text", "text"}
	cols := make([]string, len(e2eColumns))
	for i, c := range e2eColumns {
		q, _ := Postgres.QuoteIdent(c)
		cols[i] = q + " " + types[i]
	}
	pg.mustRun(t, "CREATE TABLE "+qt+" ("+strings.Join(cols, ", ")+")")
	if _, err := pg.run("COPY "+qt+" FROM STDIN (FORMAT csv, HEADER)", &log); err != nil {
		t.Fatal(err)
	}
	// NULLs: a region of its own, and texts shown to labelers.
	pg.mustRun(t, "UPDATE "+qt+` SET region = NULL WHERE right("Record ""ID""", 3) = '007';`+
		"UPDATE "+qt+` SET "text col" = NULL WHERE right("Record ""ID""", 2) = '13'; ANALYZE `+qt)
	return table
}

// runQuery prints the query for s, runs it and saves the CSV result.
func runQuery(t *testing.T, pg *pgServer, s *Spec, path string) string {
	t.Helper()
	q, err := Query(s)
	if err != nil {
		t.Fatal(err)
	}
	out, err := pg.run(q, nil, "--csv")
	if err != nil {
		t.Fatal(err)
	}
	if err := os.WriteFile(path, out, 0o644); err != nil {
		t.Fatal(err)
	}
	return q
}

// exportTable writes the table as a CSV log, NULL as NullText.
func exportTable(t *testing.T, pg *pgServer, table, path string) {
	t.Helper()
	qt, _ := Postgres.QuoteTable(table)
	out, err := pg.run("COPY "+qt+" TO STDOUT (FORMAT csv, HEADER, NULL '"+NullText+"')", nil)
	if err != nil {
		t.Fatal(err)
	}
	if err := os.WriteFile(path, out, 0o644); err != nil {
		t.Fatal(err)
	}
}

// TestQueryMatchesFileDraw is the end-to-end check of issue 6: a million
// generated rows loaded into PostgreSQL with COPY; the printed query run
// through psql; its result imported; and the draw from a file run on an
// export of the same table. The worksheets and the ledger must be
// byte-identical, and the manifests must agree on every stratum.
func TestQueryMatchesFileDraw(t *testing.T) {
	pg := needPostgres(t)
	big := 1_000_000
	if testing.Short() {
		big = 50_000
	}
	schema := pg.schema(t)
	dir := t.TempDir()
	type table struct{ name, export string }
	load := func(name string, rows int) table {
		tb := table{loadGenerated(t, pg, schema, name, rows), filepath.Join(dir, name+".csv")}
		exportTable(t, pg, tb.name, tb.export)
		return tb
	}
	large, small := load("prediction log", big), load("small log", 40_000)

	cases := []struct {
		name  string
		table table
		spec  Spec
	}{
		{"strata, band, minimum, spares, double", large, Spec{Strata: []string{"region", "select"}, Bands: []string{"score=0.5,0.9"},
			Show: []string{"text col"}, Allocation: "proportional", MinPerStratum: 4, Spare: 2, Double: 25}},
		{"where, equal, period", small, Spec{Strata: []string{"select"}, Where: []string{"region=north,(null),east"},
			Show: []string{"text col", "model_b"}, Allocation: "equal", Spare: 1, Period: "2026-11"}},
		{"unstratified", small, Spec{Allocation: "proportional"}},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			p := e2ePlan(500)
			s := c.spec
			s.Format, s.ToolVersion, s.Dialect, s.Table, s.IDColumn = QueryFormat, "test", Postgres, c.table.name, e2eColumns[0]
			s.PlanFingerprint, s.Seed, s.SampleSize, s.Candidates = "f00d", p.Seed, p.Rule.SampleSize, p.Candidates
			s.SelectionSeed = p.Seed
			if s.Period != "" {
				s.SelectionSeed = sampling.PeriodSeed(p.Seed, s.Period)
			}
			resultPath := filepath.Join(dir, "result.csv")
			query := runQuery(t, pg, &s, resultPath)
			res, err := Import(resultPath, nil, p, "f00d")
			if err != nil {
				t.Fatal(err)
			}
			if res.Query != query {
				t.Fatal("the imported result rebuilt a different query")
			}
			fromSQL, err := res.Folder("test")
			if err != nil {
				t.Fatal(err)
			}
			fromFile := fileDraw(t, p, &s, c.table.export)
			compareFolders(t, fromSQL, fromFile)
			if fromSQL.Manifest.Engine == nil || fromSQL.Manifest.Engine.QuerySHA256 != drawfolder.SHA256Hex([]byte(query)) {
				t.Errorf("manifest engine = %+v, want the query's SHA-256", fromSQL.Manifest.Engine)
			}
		})
	}
}

// fileDraw runs the draw from a file with the settings of s.
func fileDraw(t *testing.T, p *plan.File, s *Spec, path string) *drawfolder.Content {
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

// compareFolders requires byte-identical worksheets and ledgers and the
// same strata, lot and sample in the manifests.
func compareFolders(t *testing.T, sql, file *drawfolder.Content) {
	t.Helper()
	a, err := sql.Render()
	if err != nil {
		t.Fatal(err)
	}
	b, err := file.Render()
	if err != nil {
		t.Fatal(err)
	}
	files := func(nf []drawfolder.NamedFile) map[string][]byte {
		m := map[string][]byte{}
		for _, f := range nf {
			m[f.Name] = f.Data
		}
		return m
	}
	fa, fb := files(a), files(b)
	for _, name := range []string{drawfolder.WorksheetFile, drawfolder.WorksheetSecondFile, drawfolder.LedgerFile} {
		if !bytes.Equal(fa[name], fb[name]) {
			t.Errorf("%s differs between the query's result and the file draw:\n%s", name, firstDiff(fa[name], fb[name]))
		}
	}
	ma, mb := sql.Manifest, file.Manifest
	if fmt.Sprint(ma.Strata) != fmt.Sprint(mb.Strata) || ma.LotSize != mb.LotSize || ma.SampleSize != mb.SampleSize || ma.Spares != mb.Spares {
		t.Errorf("manifests differ:\nsql:  %v lot %d n %d spares %d\nfile: %v lot %d n %d spares %d",
			ma.Strata, ma.LotSize, ma.SampleSize, ma.Spares, mb.Strata, mb.LotSize, mb.SampleSize, mb.Spares)
	}
	if len(sql.Ledger) == 0 {
		t.Error("the draw selected nothing")
	}
}

// firstDiff shows the first differing line of two files.
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
			return fmt.Sprintf("line %d:\n  sql:  %s\n  file: %s", i+1, x, y)
		}
	}
	return "(same lines)"
}
