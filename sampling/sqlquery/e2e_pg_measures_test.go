package sqlquery

import (
	"bytes"
	"encoding/csv"
	"errors"
	"os"
	"path/filepath"
	"reflect"
	"strconv"
	"strings"
	"testing"

	"probity/plan/inputerr"
	"probity/plan/planfile"
	"probity/sampling"
)

// TestMeasuresTwoStepPostgres runs the two queries of a draw for a plan
// with measures (testdata/sql/plan-measures-threshold.yaml: a band on
// score at the thresholds, crossed with region) in PostgreSQL, checks the
// import against the file draw of an export, and checks that the import
// refuses a selection that does not follow from its counts: a table that
// changed between the queries, a counts file edited before the selection
// query was printed, an allocation edited in the selection's result.
func TestMeasuresTwoStepPostgres(t *testing.T) {
	pg := needPostgres(t)
	table := loadGenerated(t, pg, pg.schema(t), "pred log", 20000)
	p, fp, err := planfile.Load(filepath.Join("..", "..", "testdata", "sql", "plan-measures-threshold.yaml"))
	if err != nil {
		t.Fatal(err)
	}
	in := sampling.DrawInput{Plan: p, StrataColumns: []string{"region"}}
	if err := sampling.AddPredictionStrata(&in); err != nil {
		t.Fatal(err)
	}
	s := &Spec{Format: QueryFormat, ToolVersion: "test", Dialect: Postgres, Table: table, IDColumn: `Record "ID"`,
		PlanFingerprint: fp, Seed: p.Seed, SelectionSeed: p.Seed, SampleSize: SampleSize(p), Candidates: p.Candidates,
		Strata: in.StrataColumns, Allocation: in.Alloc.Rule, Spare: 1, Double: 5}
	for _, b := range in.Bands {
		s.Bands = append(s.Bands, b.String())
	}
	dir := t.TempDir()
	run := func(q, name string) string {
		t.Helper()
		out, err := pg.run(q, nil, "--csv")
		if err != nil {
			t.Fatal(err)
		}
		path := filepath.Join(dir, name)
		if err := os.WriteFile(path, out, 0o644); err != nil {
			t.Fatal(err)
		}
		return path
	}
	countsQuery, err := CountsQuery(s)
	if err != nil {
		t.Fatal(err)
	}
	countsPath := run(countsQuery, "counts.csv")
	counts, err := ReadCounts(countsPath, nil, p, fp)
	if err != nil {
		t.Fatal(err)
	}
	if counts.Measures == nil || counts.QuerySHA256 == "" {
		t.Fatalf("counts without a design or query digest: %+v", counts)
	}
	selectionQuery, err := SelectionQuery(counts)
	if err != nil {
		t.Fatal(err)
	}
	selected := run(selectionQuery, "selected.csv")
	res, err := ImportSelection(selected, nil, p, fp, counts)
	if err != nil {
		t.Fatal(err)
	}
	fromSQL, err := res.Folder("test")
	if err != nil {
		t.Fatal(err)
	}
	export := filepath.Join(dir, "export.csv")
	exportTable(t, pg, table, export)
	fromFile := fileDraw(t, p, s, export)
	compareFolders(t, fromSQL, fromFile)
	if !reflect.DeepEqual(fromSQL.Manifest.Measures, fromFile.Manifest.Measures) || fromSQL.Manifest.Measures == nil {
		t.Errorf("measures differ:\nsql:  %+v\nfile: %+v", fromSQL.Manifest.Measures, fromFile.Manifest.Measures)
	}
	if e := fromSQL.Manifest.Engine; e.CountsSHA256 != counts.SHA256 || e.CountsQuerySHA256 != counts.QuerySHA256 || e.QuerySHA256 != res.QuerySHA256 {
		t.Errorf("manifest engine %+v", e)
	}
	if _, err := Import(selected, nil, p, fp); err == nil || !strings.Contains(err.Error(), "the selection of a plan with measures is checked against the counts it was made from") {
		t.Errorf("the selection imported without its counts: %v", err)
	}

	refused := func(what, path string, counts *Counts, want string) {
		t.Helper()
		_, err := ImportSelection(path, nil, p, fp, counts)
		var ie *inputerr.Error
		if err == nil || !errors.As(err, &ie) || !strings.Contains(err.Error(), want) {
			t.Errorf("%s: %v, want an input error with %q", what, err, want)
		}
	}
	// An allocation edited in the result: a stratum row claims another n_h.
	edited := editRow(t, selected, filepath.Join(dir, "edited.csv"), func(f []string) bool {
		if f[colKind] != KindStratum || f[colStratumSample] == "0" {
			return false
		}
		f[colStratumSample] = "0"
		return true
	})
	refused("an edited allocation", edited, counts, "the result allocates 0 items")

	// A counts file edited before the selection query was printed: the
	// selection counts the strata again and differs.
	// One row moved from the first stratum to the second keeps the total.
	moved := 0
	editedCounts := editRow(t, countsPath, filepath.Join(dir, "edited-counts.csv"), func(f []string) bool {
		if f[colKind] != KindStratum {
			return false
		}
		n, err := strconv.Atoi(f[colStratumSize])
		if err != nil {
			t.Fatal(err)
		}
		f[colStratumSize] = strconv.Itoa(n + 2*moved - 1)
		moved++
		return moved == 2
	})
	c2, err := ReadCounts(editedCounts, nil, p, fp)
	if err != nil {
		t.Fatal(err)
	}
	q, err := SelectionQuery(c2)
	if err != nil {
		t.Fatal(err)
	}
	refused("an edited counts file", run(q, "selected-2.csv"), c2, "rows in the selection query, but")

	// The table changes between the two queries.
	qt, _ := Postgres.QuoteTable(table)
	pg.mustRun(t, "INSERT INTO "+qt+` ("Record ""ID""", region, score) VALUES ('late row', 'north', 0.99)`)
	refused("a table that changed", run(selectionQuery, "selected-3.csv"), counts, "the selection query read")
}

// editRow writes to out the CSV result at path with the first row that
// edit changes (edit returns true), and returns out.
func editRow(t *testing.T, path, out string, edit func([]string) bool) string {
	t.Helper()
	f, err := os.Open(path)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	recs, err := csv.NewReader(f).ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	for _, r := range recs[1:] {
		if edit(r) {
			break
		}
	}
	var b bytes.Buffer
	w := csv.NewWriter(&b)
	w.WriteAll(recs)
	if err := os.WriteFile(out, b.Bytes(), 0o644); err != nil {
		t.Fatal(err)
	}
	return out
}
