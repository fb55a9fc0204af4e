package main

import (
	"bytes"
	"crypto/rand"
	"encoding/hex"
	"encoding/json"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"testing"
	"time"

	"probity/plan/testkit/pgtest"
	"probity/sampling/drawfolder"
	"probity/sampling/loggen"
)

const (
	sqlPlan      = "../../testdata/sql/plan.yaml"            // seed "it's a \ seed; --"
	sqlOtherPlan = "../../testdata/sql/plan-other-seed.yaml" // same but another seed
)

// testPG runs psql against the test server of probity/plan/testkit/pgtest (a
// throw-away cluster, or the server PROBITY_TEST_PGHOST names); tests skip
// without PostgreSQL, and fail when CI is set.
type testPG struct{ *pgtest.Server }

func needTestPG(t *testing.T) *testPG {
	t.Helper()
	return &testPG{pgtest.Need(t)}
}

// psql runs one statement (-c) or, with script true, a script on stdin;
// stdin feeds COPY … FROM STDIN.
func (pg *testPG) psql(t *testing.T, sql string, stdin []byte, script bool, args ...string) []byte {
	t.Helper()
	argv := append(append(pg.Args("postgres"), "-X", "-q", "-v", "ON_ERROR_STOP=1"), args...)
	if script {
		argv = append(argv, "-f", "-")
		stdin = []byte(sql)
	} else {
		argv = append(argv, "-c", sql)
	}
	cmd := exec.Command(pg.Psql, argv...)
	cmd.Stdin = bytes.NewReader(stdin)
	var out, errb bytes.Buffer
	cmd.Stdout, cmd.Stderr = &out, &errb
	if err := cmd.Run(); err != nil {
		t.Fatalf("psql: %v: %s", err, errb.String())
	}
	return out.Bytes()
}

// loadLogTable loads a generated log into a fresh schema (dropped at the
// end) as table predictions, with a few NULL regions, and returns the
// table name as --table takes it.
func (pg *testPG) loadLogTable(t *testing.T, rows int) string {
	t.Helper()
	var b [5]byte
	rand.Read(b[:])
	schema := "probity cli " + hex.EncodeToString(b[:])
	qs := `"` + schema + `"`
	pg.psql(t, "CREATE SCHEMA "+qs, nil, false)
	t.Cleanup(func() { pg.psql(t, "DROP SCHEMA "+qs+" CASCADE", nil, false) })
	pg.psql(t, "CREATE TABLE "+qs+".predictions (record_id text, region text, channel text, score double precision, model_a text, model_b text, text text)", nil, false)
	var log bytes.Buffer
	if err := loggen.Write(&log, loggen.Config{Rows: rows, Seed: 61}); err != nil {
		t.Fatal(err)
	}
	pg.psql(t, "COPY "+qs+".predictions FROM STDIN (FORMAT csv, HEADER)", log.Bytes(), false)
	pg.psql(t, "UPDATE "+qs+".predictions SET region = NULL WHERE record_id LIKE '%37'", nil, false)
	return qs + ".predictions"
}

// TestDrawSQLMatchesDrawFromExport runs the whole workflow as a user
// would: print the query, run it with psql, import the result; then draw
// from an export of the same table and check the folder against it.
func TestDrawSQLMatchesDrawFromExport(t *testing.T) {
	t.Parallel()
	pg := needTestPG(t)
	table := pg.loadLogTable(t, 30000)
	dir := t.TempDir()
	flags := []string{"--strata", "region,channel", "--show", "text", "--spare", "1", "--double", "12", "--min-per-stratum", "3"}

	code, query, stderr := runDrawCmd(t, nil, append([]string{"--plan", sqlPlan, "--sql", "postgres", "--table", table}, flags...)...)
	if code != exitOK {
		t.Fatalf("--sql: exit %d: %s", code, stderr)
	}
	querySHA := drawfolder.SHA256Hex([]byte(query))
	if !strings.Contains(stderr, "sha256 "+querySHA) || !strings.Contains(stderr, "--selected RESULT.csv") {
		t.Errorf("stderr should give the query's SHA-256 and the next step:\n%s", stderr)
	}
	if !strings.Contains(query, `'it''s a \\ seed; --:'`) || !strings.Contains(query, `E'`) {
		t.Errorf("the seed is not a safe escape-string literal in the query")
	}
	result := filepath.Join(dir, "result.csv")
	if err := os.WriteFile(result, pg.psql(t, query, nil, true, "--csv"), 0o644); err != nil {
		t.Fatal(err)
	}

	sqlDir := filepath.Join(dir, "from-sql")
	code, stdout, stderr := runDrawCmd(t, nil, "--plan", sqlPlan, "--selected", result, "--out", sqlDir)
	if code != exitOK {
		t.Fatalf("--selected: exit %d: %s", code, stderr)
	}
	// 400 planned; proportional shares rounded up over the 15 strata add 10.
	for _, want := range []string{"drew 410 items", "(null)|web", "drawn inside postgres from table " + table + " (the log above is the query's result); query sha256 " + querySHA} {
		if !strings.Contains(stdout, want) {
			t.Errorf("--selected output lacks %q:\n%s", want, stdout)
		}
	}

	export := filepath.Join(dir, "export.csv")
	if err := os.WriteFile(export, pg.psql(t, "COPY "+table+" TO STDOUT (FORMAT csv, HEADER, NULL '(null)')", nil, false), 0o644); err != nil {
		t.Fatal(err)
	}
	logDir := filepath.Join(dir, "from-log")
	code, _, stderr = runDrawCmd(t, nil, append([]string{"--plan", sqlPlan, "--log", export, "--out", logDir}, flags...)...)
	if code != exitOK {
		t.Fatalf("--log: exit %d: %s", code, stderr)
	}
	for _, f := range []string{drawfolder.WorksheetFile, drawfolder.WorksheetSecondFile, drawfolder.LedgerFile} {
		a, _ := os.ReadFile(filepath.Join(sqlDir, f))
		b, _ := os.ReadFile(filepath.Join(logDir, f))
		if len(a) == 0 || !bytes.Equal(a, b) {
			t.Errorf("%s differs between the draw in the engine and the draw from the export", f)
		}
	}
	var m drawfolder.Manifest
	data, _ := os.ReadFile(filepath.Join(sqlDir, drawfolder.ManifestFile))
	if err := json.Unmarshal(data, &m); err != nil {
		t.Fatal(err)
	}
	if m.Engine == nil || m.Engine.Dialect != "postgres" || m.Engine.Table != table || m.Engine.QuerySHA256 != querySHA {
		t.Errorf("manifest engine = %+v", m.Engine)
	}
	if m.Log.Rows != 30000 || m.LotSize != 30000 {
		t.Errorf("manifest rows %d, lot %d; want 30000", m.Log.Rows, m.LotSize)
	}

	// The export verifies the draw made in the engine.
	code, stdout, stderr = runDrawCmd(t, nil, "--check", sqlDir, "--plan", sqlPlan, "--log", export)
	if code != exitOK || !strings.HasPrefix(stdout, "same:") {
		t.Errorf("--check of the engine's draw against the export: exit %d\n%s%s", code, stdout, stderr)
	}

	// An export that lost a drawn row does not verify it.
	var ledgerFirst string
	if l, err := drawfolder.ReadLedger(filepath.Join(sqlDir, drawfolder.LedgerFile), []string{"model-a", "score-0.7"}); err == nil && len(l) > 0 {
		ledgerFirst = l[0].RecordID
	}
	exportData, _ := os.ReadFile(export)
	var kept []string
	for _, line := range strings.Split(string(exportData), "\n") {
		if ledgerFirst == "" || !strings.HasPrefix(line, ledgerFirst+",") {
			kept = append(kept, line)
		}
	}
	short := filepath.Join(dir, "export-short.csv")
	os.WriteFile(short, []byte(strings.Join(kept, "\n")), 0o644)
	code, stdout, _ = runDrawCmd(t, nil, "--check", sqlDir, "--plan", sqlPlan, "--log", short)
	if code != exitRejected || !strings.Contains(stdout, ledgerFirst) {
		t.Errorf("--check against an export without %s: exit %d\n%s", ledgerFirst, code, stdout)
	}

	t.Run("bad results", func(t *testing.T) {
		good, _ := os.ReadFile(result)
		lines := strings.Split(string(good), "\n")
		itemLine := 0
		for i, l := range lines {
			if strings.HasPrefix(l, "item,") {
				itemLine = i
				break
			}
		}
		tamper := func(f func([]string) []string) string {
			c := f(append([]string{}, lines...))
			p := filepath.Join(t.TempDir(), "result.csv")
			os.WriteFile(p, []byte(strings.Join(c, "\n")), 0o644)
			return p
		}
		cases := []struct {
			name   string
			args   []string
			want   string
			hint   string
			result string
		}{
			{"another plan", []string{"--plan", sqlOtherPlan}, "field detail: the result was made for another plan", "import it with the plan the query was printed from", result},
			{"key does not match its id", nil, "field key: the key of record", "the result was edited",
				tamper(func(l []string) []string {
					f := strings.Split(l[itemLine], ",")
					f[1] = f[1] + "x"
					l[itemLine] = strings.Join(f, ",")
					return l
				})},
			{"a row left out", nil, "rows in the result, but its", "save the whole result",
				tamper(func(l []string) []string {
					last := len(l) - 1
					for l[last] == "" {
						last--
					}
					return append(l[:last], l[last+1:]...)
				})},
			{"allocation edited", nil, "field stratum_sample: stratum", "",
				tamper(func(l []string) []string {
					for i, s := range l {
						if strings.HasPrefix(s, "stratum,") {
							f := strings.Split(s, ",")
							f[4] = "99"
							l[i] = strings.Join(f, ",")
							break
						}
					}
					return l
				})},
			{"not a result", nil, "line 1: the header is not that of a probity draw query", "save the result of the drawing query probity printed", export},
			{"a flag that differs", []string{"--strata", "region"}, `--strata "region" differs from the draw the result was made for ("region,channel")`, "the result carries the draw's settings", result},
		}
		for _, c := range cases {
			t.Run(c.name, func(t *testing.T) {
				out := filepath.Join(t.TempDir(), "audit")
				args := append([]string{"--plan", sqlPlan, "--selected", c.result, "--out", out}, c.args...)
				code, _, stderr := runDrawCmd(t, nil, args...)
				if code != exitBadInput || !strings.Contains(stderr, c.want) || (c.hint != "" && !strings.Contains(stderr, "hint: "+c.hint)) {
					t.Errorf("exit %d, stderr:\n%s\nwant exit 2 with %q and hint %q", code, stderr, c.want, c.hint)
				}
				if _, err := os.Stat(out); !os.IsNotExist(err) {
					t.Errorf("a failed import left %s behind", out)
				}
			})
		}
	})
}

// TestDrawSQLFlags checks the flag combinations refused before anything is
// read or printed.
func TestDrawSQLFlags(t *testing.T) {
	t.Parallel()
	cases := []struct {
		args []string
		want string
	}{
		{[]string{"--plan", sqlPlan, "--sql", "postgres"}, "probity: --sql needs --table\nhint: name the table or view"},
		{[]string{"--plan", sqlPlan, "--sql", "oracle", "--table", "t"}, `--sql: unknown SQL dialect "oracle" (supported: postgres, duckdb, clickhouse)`},
		{[]string{"--plan", sqlPlan, "--sql", "postgres", "--table", "t", "--log", "x.csv"}, "--log cannot be used with --sql\nhint: the query reads the table, not a log"},
		{[]string{"--plan", sqlPlan, "--sql", "postgres", "--table", "t", "--out", "d"}, "--out cannot be used with --sql"},
		{[]string{"--plan", sqlPlan, "--sql", "postgres", "--table", "t", "--allocation", "neyman"}, "--allocation neyman cannot run inside the engine"},
		{[]string{"--plan", sqlPlan, "--sql", "postgres", "--table", "t", "--dedupe", "first"}, "--dedupe cannot be used with --sql"},
		{[]string{"--plan", sqlPlan, "--sql", "postgres", "--table", `a..b`}, `--table a..b: invalid SQL name: table name "a..b" has an empty part`},
		{[]string{"--plan", sqlPlan, "--sql", "postgres", "--table", "t", "--id", strings.Repeat("x", 64)}, "is 64 bytes long; postgres keeps only the first 63"},
		{[]string{"--plan", sqlPlan, "--sql", "postgres", "--table", "t", "--show", "score"}, "--show score: the column holds candidate score-0.7's prediction or score"},
		{[]string{"--plan", "../../testdata/draw/plan-sizing-only.yaml", "--sql", "postgres", "--table", "t"}, "is a sizing-only plan"},
		{[]string{"--plan", sqlPlan, "--selected", "r.csv"}, "--out is required"},
		{[]string{"--plan", sqlPlan, "--sql", "postgres", "--table", "t", "--period", " 2026-11"}, `--period " 2026-11" has leading or trailing spaces`},
		{[]string{"--plan", sqlPlan, "--sql", "postgres", "--table", "t", "--spare", "-1"}, "--spare -1 is negative"},
		{[]string{"--plan", sqlPlan, "--sql", "postgres", "--table", "t", "--allocation", "best"}, `unknown allocation rule "best"`},
		{[]string{"--plan", sqlPlan, "--selected", "r.csv", "--sql", "postgres"}, "--sql and --selected cannot be used together"},
		{[]string{"--plan", sqlPlan, "--log", "x.csv", "--out", "d", "--table", "t"}, "--table is only used with --sql"},
		{[]string{"--plan", sqlPlan, "--log", "x.csv", "--out", "d", "--counts", "c.csv"}, "--counts is only used with --sql clickhouse or --selected"},
		{[]string{"--plan", sqlPlan, "--sql", "postgres", "--table", "t", "--counts", "c.csv"}, "--counts cannot be used with --sql postgres"},
		{[]string{"--plan", sqlPlan, "--sql", "clickhouse"}, "probity: --sql needs --table"},
		{[]string{"--plan", sqlPlan, "--sql", "clickhouse", "--table", "a.b.c"}, `has 3 parts; ClickHouse names a table database.table`},
		{[]string{"--plan", sqlPlan, "--sql", "clickhouse", "--table", "t", "--allocation", "neyman"}, "--allocation neyman cannot run inside the engine"},
		{[]string{"--plan", sqlPlan, "--counts", "-", "--selected", "-", "--out", "d"}, "--counts and --selected cannot both read stdin"},
	}
	for _, c := range cases {
		code, stdout, stderr := runDrawCmd(t, nil, c.args...)
		if code != exitBadInput || !strings.Contains(stderr, c.want) || stdout != "" {
			t.Errorf("%v: exit %d, stdout %q, stderr:\n%s\nwant exit 2 and %q", c.args, code, stdout, stderr, c.want)
		}
	}
}

// TestDrawSQLQueryNotFitted: on a console 100 columns wide (deps.width),
// the printed query passes unchanged, as --json output does: the fitting
// of people's output must not break a query's literals at their spaces
// (the seed, the draw description, a band's pattern), which would make it
// another query than the one the import rebuilds.
func TestDrawSQLQueryNotFitted(t *testing.T) {
	t.Parallel()
	args := []string{"draw", "--plan", sqlPlan, "--sql", "postgres", "--table", "t", "--band", "score=0.5", "-q"}
	code, narrow, stderr := runTest(t, args, withVersion("test"), atTime(time.Date(2026, 12, 1, 7, 15, 0, 0, time.UTC)))
	if code != exitOK {
		t.Fatalf("exit %d: %s", code, stderr)
	}
	code, wide, stderr := runTest(t, args, withVersion("test"), atTime(time.Date(2026, 12, 1, 7, 15, 0, 0, time.UTC)), withWidth(consoleWidth))
	if code != exitOK {
		t.Fatalf("exit %d: %s", code, stderr)
	}
	if wide != narrow {
		t.Errorf("the query printed on a 100-column console differs from the query itself")
	}
	long := false
	for _, l := range strings.Split(wide, "\n") {
		long = long || len(l) > consoleWidth
	}
	if !long {
		t.Errorf("the query has no line over %d columns; the test no longer tests the fitting", consoleWidth)
	}
	planArgs := []string{"plan", "--ceiling", "0.05", "--confidence", "0.95", "--anticipated", "0.01", "--thresholds", "score:0.35,0.5", "--positive", "fraud", "--negative", "ok", "--json"}
	_, jsonNarrow, _ := runTest(t, planArgs, withVersion("test"), atTime(time.Date(2026, 12, 1, 7, 15, 0, 0, time.UTC)), withRandom(bytes.Repeat([]byte{7}, 64)))
	_, jsonWide, _ := runTest(t, planArgs, withVersion("test"), atTime(time.Date(2026, 12, 1, 7, 15, 0, 0, time.UTC)), withRandom(bytes.Repeat([]byte{7}, 64)), withWidth(consoleWidth))
	if jsonNarrow == "" || jsonWide != jsonNarrow {
		t.Errorf("plan --json on a 100-column console differs from its output elsewhere")
	}
}
