package main

import (
	"bytes"
	"encoding/json"
	"os"
	"path/filepath"
	"reflect"
	"strings"
	"testing"
	"time"

	"probity/sampling/drawfolder"
	"probity/sampling/sqlquery/chcluster"
)

// measuresPlans writes the two plans with measures the SQL draws are
// checked on, for the generated log's columns (score uniform on [0, 1),
// model_a and model_b "fraud" or "ok"): a threshold plan (one band on
// score at the thresholds) and a label-column plan (model_a and model_b as
// strata). Each is sized for a few hundred labels so the draws stay small.
func measuresPlans(t *testing.T) map[string]string {
	t.Helper()
	dir := t.TempDir()
	common := []string{"--confidence", "0.9", "--positive", "fraud", "--prevalence", "0.2", "--decisions", "30000"}
	plans := map[string][]string{
		"threshold": {"--thresholds", "score:0.5,0.7", "--negative", "ok", "--measure", "fnr:0.3", "--measure", "fdr:0.3",
			"--anticipated", "fnr:0.1", "--anticipated", "fdr:0.1"},
		"label-column": {"--candidate", "a=model_a", "--candidate", "b=model_b", "--classes", "fraud,ok", "--measure", "fnr:0.3",
			"--measure", "error:0.3", "--anticipated", "fnr:0.1", "--anticipated", "error:0.1"},
	}
	out := map[string]string{}
	for name, args := range plans {
		p := filepath.Join(dir, name+".yaml")
		code, _, stderr := runTest(t, append(append(append([]string{"plan"}, common...), args...), "--out", p), withVersion("test"),
			atTime(time.Date(2026, 12, 1, 7, 0, 0, 0, time.UTC)))
		if code != exitOK {
			t.Fatalf("plan %s: exit %d: %s", name, code, stderr)
		}
		out[name] = p
	}
	return out
}

// measuresDrawCases are the draws compared: each plan with and without the
// user's strata.
var measuresDrawCases = []struct {
	plan  string
	flags []string
}{
	{"threshold", []string{"--spare", "1"}},
	{"threshold", []string{"--strata", "region", "--spare", "1", "--show", "text", "--double", "20"}},
	{"label-column", []string{"--spare", "2"}},
	{"label-column", []string{"--strata", "region,channel", "--spare", "1"}},
}

// drawSQLMeasures runs a two-step draw of a plan with measures as a user
// would: print the counts query, run it, print the selection query from
// its result, run it, import both into out. run runs a query and returns
// its CSV result.
func drawSQLMeasures(t *testing.T, dialect, table, planPath, out string, flags []string, run func(query string) []byte) {
	t.Helper()
	dir := t.TempDir()
	code, countsQuery, stderr := runDrawCmd(t, nil, append([]string{"--plan", planPath, "--sql", dialect, "--table", table}, flags...)...)
	if code != exitOK {
		t.Fatalf("--sql %s: exit %d: %s", dialect, code, stderr)
	}
	if !strings.Contains(stderr, "counts query (step 1 of 2) for "+dialect) || !strings.Contains(stderr, "--sql "+dialect+" --counts COUNTS.csv") {
		t.Errorf("stderr should name the counts query and the next step:\n%s", stderr)
	}
	counts := filepath.Join(dir, "counts.csv")
	if err := os.WriteFile(counts, run(countsQuery), 0o644); err != nil {
		t.Fatal(err)
	}
	code, selectionQuery, stderr := runDrawCmd(t, nil, append([]string{"--plan", planPath, "--sql", dialect, "--counts", counts}, flags...)...)
	if code != exitOK {
		t.Fatalf("--sql %s --counts: exit %d: %s", dialect, code, stderr)
	}
	selected := filepath.Join(dir, "selected.csv")
	if err := os.WriteFile(selected, run(selectionQuery), 0o644); err != nil {
		t.Fatal(err)
	}
	code, stdout, stderr := runDrawCmd(t, nil, append([]string{"--plan", planPath, "--counts", counts, "--selected", selected, "--out", out}, flags...)...)
	if code != exitOK {
		t.Fatalf("--counts --selected: exit %d: %s", code, stderr)
	}
	if want := "drawn inside " + dialect + " from table " + table; !strings.Contains(stdout, want) {
		t.Errorf("import output lacks %q:\n%s", want, stdout)
	}
	// The selection alone is not a draw: it is checked against its counts.
	if code, _, stderr := runDrawCmd(t, nil, "--plan", planPath, "--selected", selected, "--out", filepath.Join(dir, "alone")); code != exitBadInput ||
		!strings.Contains(stderr, "is checked against the counts it was made from") {
		t.Errorf("selection imported without its counts: exit %d: %s", code, stderr)
	}
}

// sameMeasuresDraw checks that the draw made in an engine holds what the
// draw from the export holds: the worksheet and ledger byte for byte (the
// same selected ids, strata and weights), and the manifest's strata,
// allocation and measures block (the design sized on the log's strata).
func sameMeasuresDraw(t *testing.T, engineDir, logDir string) {
	t.Helper()
	for _, f := range []string{drawfolder.WorksheetFile, drawfolder.LedgerFile} {
		a, _ := os.ReadFile(filepath.Join(engineDir, f))
		b, _ := os.ReadFile(filepath.Join(logDir, f))
		if len(a) == 0 || !bytes.Equal(a, b) {
			t.Errorf("%s differs between the draw in the engine and the draw from the export", f)
		}
	}
	read := func(dir string) drawfolder.Manifest {
		var m drawfolder.Manifest
		data, err := os.ReadFile(filepath.Join(dir, drawfolder.ManifestFile))
		if err != nil {
			t.Fatal(err)
		}
		if err := json.Unmarshal(data, &m); err != nil {
			t.Fatal(err)
		}
		return m
	}
	e, l := read(engineDir), read(logDir)
	if e.Measures == nil || len(e.Measures.Claims) == 0 {
		t.Fatalf("the engine's manifest has no measures block")
	}
	for _, f := range []struct {
		name      string
		got, want any
	}{
		{"strata", e.Strata, l.Strata},
		{"strata_columns", e.StrataColumns, l.StrataColumns},
		{"bands", e.Bands, l.Bands},
		{"allocation", e.Allocation, l.Allocation},
		{"measures", e.Measures, l.Measures},
		{"sample_size", e.SampleSize, l.SampleSize},
		{"spares", e.Spares, l.Spares},
		{"lot_size", e.LotSize, l.LotSize},
	} {
		if !reflect.DeepEqual(f.got, f.want) {
			t.Errorf("manifest %s: engine %+v, file %+v", f.name, f.got, f.want)
		}
	}
}

// TestDrawSQLMeasuresPostgres: for a threshold plan and a label-column
// plan with measures, with and without the user's strata, the two-step
// draw inside PostgreSQL gives the strata, design and selected ids of the
// draw from an export of the same table, and draw --check of the engine's
// folder against the export finds it the same.
func TestDrawSQLMeasuresPostgres(t *testing.T) {
	t.Parallel()
	pg := needTestPG(t)
	table := pg.loadLogTable(t, 30000)
	plans := measuresPlans(t)
	dir := t.TempDir()
	export := filepath.Join(dir, "export.csv")
	if err := os.WriteFile(export, pg.psql(t, "COPY "+table+" TO STDOUT (FORMAT csv, HEADER, NULL '(null)')", nil, false), 0o644); err != nil {
		t.Fatal(err)
	}
	for i, tc := range measuresDrawCases {
		t.Run(tc.plan+" "+strings.Join(tc.flags, " "), func(t *testing.T) {
			sqlDir := filepath.Join(dir, "pg", string(rune('a'+i)))
			drawSQLMeasures(t, "postgres", table, plans[tc.plan], sqlDir, tc.flags, func(q string) []byte { return pg.psql(t, q, nil, true, "--csv") })
			logDir := filepath.Join(dir, "log", string(rune('a'+i)))
			if code, _, stderr := runDrawCmd(t, nil, append([]string{"--plan", plans[tc.plan], "--log", export, "--out", logDir}, tc.flags...)...); code != exitOK {
				t.Fatalf("--log: exit %d: %s", code, stderr)
			}
			sameMeasuresDraw(t, sqlDir, logDir)
			if code, stdout, stderr := runDrawCmd(t, nil, "--check", sqlDir, "--plan", plans[tc.plan], "--log", export); code != exitOK || !strings.HasPrefix(stdout, "same:") {
				t.Errorf("--check of the engine's draw against the export: exit %d\n%s%s", code, stdout, stderr)
			}
		})
	}
}

// TestDrawSQLMeasuresClickHouse is TestDrawSQLMeasuresPostgres on a
// two-shard ClickHouse cluster.
func TestDrawSQLMeasuresClickHouse(t *testing.T) {
	// Not in parallel: each ClickHouse test starts a two-shard cluster.
	c := chcluster.Start(t)
	loadCHLog(t, c, 30000)
	plans := measuresPlans(t)
	dir := t.TempDir()
	export := filepath.Join(dir, "export.csv")
	exportQuery := "SELECT record_id, ifNull(region, '(null)') AS region, channel, score, model_a, model_b, ifNull(text, '(null)') AS text FROM default.predictions FORMAT CSVWithNames"
	if err := os.WriteFile(export, c.MustQuery(t, exportQuery, nil), 0o644); err != nil {
		t.Fatal(err)
	}
	for i, tc := range measuresDrawCases {
		t.Run(tc.plan+" "+strings.Join(tc.flags, " "), func(t *testing.T) {
			chDir := filepath.Join(dir, "ch", string(rune('a'+i)))
			drawSQLMeasures(t, "clickhouse", "default.predictions", plans[tc.plan], chDir, tc.flags, func(q string) []byte { return c.MustQuery(t, q, nil) })
			logDir := filepath.Join(dir, "log", string(rune('a'+i)))
			if code, _, stderr := runDrawCmd(t, nil, append([]string{"--plan", plans[tc.plan], "--log", export, "--out", logDir}, tc.flags...)...); code != exitOK {
				t.Fatalf("--log: exit %d: %s", code, stderr)
			}
			sameMeasuresDraw(t, chDir, logDir)
			if code, stdout, stderr := runDrawCmd(t, nil, "--check", chDir, "--plan", plans[tc.plan], "--log", export); code != exitOK || !strings.HasPrefix(stdout, "same:") {
				t.Errorf("--check of the engine's draw against the export: exit %d\n%s%s", code, stdout, stderr)
			}
		})
	}
}

// TestDrawSQLMeasuresRefused: a draw inside a database of a plan with
// measures refuses what the draw from a file refuses (an allocation flag,
// a user's stratum or band on the candidates' predictions), and the
// one-query dialects take --counts only for such a plan; nothing is
// printed.
func TestDrawSQLMeasuresRefused(t *testing.T) {
	t.Parallel()
	plans := measuresPlans(t)
	cases := []struct {
		plan string
		args []string
		want string
	}{
		{"threshold", []string{"--sql", "postgres", "--table", "t", "--allocation", "equal"}, "--allocation, --rounding and --min-per-stratum do not apply to a plan with measures"},
		{"threshold", []string{"--sql", "duckdb", "--table", "t", "--min-per-stratum", "2"}, "--allocation, --rounding and --min-per-stratum do not apply to a plan with measures"},
		{"threshold", []string{"--sql", "clickhouse", "--table", "t", "--band", "score=0.3"}, "--band score is the candidates' score, which the plan's measures band at the thresholds already"},
		{"label-column", []string{"--sql", "postgres", "--table", "t", "--strata", "region,model_b"}, "--strata model_b holds a candidate's prediction, which the plan's measures stratify by already"},
		{"", []string{"--sql", "postgres", "--table", "t", "--counts", "c.csv"}, "--counts cannot be used with --sql postgres"},
	}
	for _, tc := range cases {
		planPath := sqlPlan
		if tc.plan != "" {
			planPath = plans[tc.plan]
		}
		code, stdout, stderr := runDrawCmd(t, nil, append([]string{"--plan", planPath}, tc.args...)...)
		if code != exitBadInput || stdout != "" || !strings.Contains(stderr, tc.want) {
			t.Errorf("%v: exit %d, stdout %d bytes, stderr:\n%s\nwant exit 2 with %q", tc.args, code, len(stdout), stderr, tc.want)
		}
	}
}
