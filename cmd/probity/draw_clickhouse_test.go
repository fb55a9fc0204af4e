package main

import (
	"bytes"
	"encoding/csv"
	"encoding/json"
	"fmt"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"testing"

	"probity/sampling/drawfolder"
	"probity/sampling/loggen"
	"probity/sampling/sqlquery"
	"probity/sampling/sqlquery/chcluster"
)

// loadCHLog loads a generated log into the Distributed table
// default.predictions of a two-shard cluster, with the regions of ids
// ending in 37 NULL: every field quoted, single quotes read as plain
// characters, a synchronous insert.
func loadCHLog(t *testing.T, c *chcluster.Cluster, rows int) {
	t.Helper()
	c.CreateDistributed(t, "default.predictions", "default.predictions_local", "default", "predictions_local",
		"record_id String, region Nullable(String), channel String, score Float64, model_a String, model_b String, text Nullable(String)")
	var log bytes.Buffer
	if err := loggen.Write(&log, loggen.Config{Rows: rows, Seed: 61}); err != nil {
		t.Fatal(err)
	}
	recs, err := csv.NewReader(&log).ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	var load bytes.Buffer
	for _, r := range recs[1:] {
		for i, f := range r {
			if i > 0 {
				load.WriteByte(',')
			}
			if i == 1 && strings.HasSuffix(r[0], "37") {
				load.WriteString(`\N`)
				continue
			}
			load.WriteString(`"` + strings.ReplaceAll(f, `"`, `""`) + `"`)
		}
		load.WriteByte('\n')
	}
	c.MustQuery(t, "INSERT INTO default.predictions FORMAT CSV", &load, "--format_csv_allow_single_quotes=0", "--insert_distributed_sync=1")
}

// TestDrawClickHouse runs the two-step workflow as a user would, on a
// two-shard cluster: print the counts query, run it with clickhouse-client,
// print the selection query from its result, run it, import both; then
// draw from an export of the table, compare, and check the folder with
// draw --check against the export.
func TestDrawClickHouse(t *testing.T) {
	// Not in parallel with the other tests: each ClickHouse test starts a
	// two-shard cluster, and two at once would compete for ports and memory.
	c := chcluster.Start(t)
	loadCHLog(t, c, 30000)
	dir := t.TempDir()
	flags := []string{"--strata", "region,channel", "--show", "text", "--spare", "1", "--double", "12", "--min-per-stratum", "3"}

	code, countsQuery, stderr := runDrawCmd(t, nil, append([]string{"--plan", sqlPlan, "--sql", "clickhouse", "--table", "default.predictions"}, flags...)...)
	if code != exitOK {
		t.Fatalf("--sql clickhouse: exit %d: %s", code, stderr)
	}
	if !strings.Contains(stderr, "counts query (step 1 of 2) for clickhouse on default.predictions, sha256 "+drawfolder.SHA256Hex([]byte(countsQuery))) ||
		!strings.Contains(stderr, "--sql clickhouse --counts COUNTS.csv") {
		t.Errorf("stderr should give the counts query's SHA-256 and the next step:\n%s", stderr)
	}
	counts := filepath.Join(dir, "counts.csv")
	if err := os.WriteFile(counts, c.MustQuery(t, countsQuery, nil), 0o644); err != nil {
		t.Fatal(err)
	}

	code, selectionQuery, stderr := runDrawCmd(t, nil, "--plan", sqlPlan, "--sql", "clickhouse", "--counts", counts)
	if code != exitOK {
		t.Fatalf("--sql clickhouse --counts: exit %d: %s", code, stderr)
	}
	if !strings.Contains(stderr, "selection query (step 2 of 2)") || !strings.Contains(stderr, "--counts "+counts+" --selected RESULT.csv") {
		t.Errorf("stderr should describe the selection query and the next step:\n%s", stderr)
	}
	if !strings.Contains(selectionQuery, `SHA256(concat('it\'s a \\ seed; --:', `) {
		t.Errorf("the seed is not a backslash-escaped literal in the selection query")
	}
	// The same, with the draw's flags repeated, prints the same query.
	if code, again, errOut := runDrawCmd(t, nil, append([]string{"--plan", sqlPlan, "--sql", "clickhouse", "--table", "default.predictions", "--counts", counts, "-q"}, flags...)...); code != exitOK || again != selectionQuery {
		again += errOut
		t.Errorf("with the flags repeated: exit %d, same query %v: %s", code, again == selectionQuery, again)
	}
	selected := filepath.Join(dir, "selected.csv")
	if err := os.WriteFile(selected, c.MustQuery(t, selectionQuery, nil), 0o644); err != nil {
		t.Fatal(err)
	}

	chDir := filepath.Join(dir, "from-clickhouse")
	code, stdout, stderr := runDrawCmd(t, nil, "--plan", sqlPlan, "--counts", counts, "--selected", selected, "--out", chDir)
	if code != exitOK {
		t.Fatalf("--counts --selected: exit %d: %s", code, stderr)
	}
	countsData, _ := os.ReadFile(counts)
	for _, want := range []string{"drew 410 items", "(null)|web", "drawn inside clickhouse from table default.predictions (the log above is the query's result); query sha256 " + drawfolder.SHA256Hex([]byte(selectionQuery)),
		"allocated from the counts in " + counts + " (sha256 " + drawfolder.SHA256Hex(countsData) + ")"} {
		if !strings.Contains(stdout, want) {
			t.Errorf("--selected output lacks %q:\n%s", want, stdout)
		}
	}
	var m drawfolder.Manifest
	data, _ := os.ReadFile(filepath.Join(chDir, drawfolder.ManifestFile))
	if err := json.Unmarshal(data, &m); err != nil {
		t.Fatal(err)
	}
	if m.Engine == nil || m.Engine.Dialect != "clickhouse" || m.Engine.CountsSHA256 != drawfolder.SHA256Hex(countsData) ||
		m.Engine.CountsQuerySHA256 != drawfolder.SHA256Hex([]byte(countsQuery)) || m.LotSize != 30000 {
		t.Errorf("manifest engine %+v, lot %d", m.Engine, m.LotSize)
	}

	export := filepath.Join(dir, "export.csv")
	exportQuery := "SELECT record_id, ifNull(region, '(null)') AS region, channel, score, model_a, model_b, ifNull(text, '(null)') AS text FROM default.predictions FORMAT CSVWithNames"
	if err := os.WriteFile(export, c.MustQuery(t, exportQuery, nil), 0o644); err != nil {
		t.Fatal(err)
	}
	logDir := filepath.Join(dir, "from-log")
	if code, _, stderr := runDrawCmd(t, nil, append([]string{"--plan", sqlPlan, "--log", export, "--out", logDir}, flags...)...); code != exitOK {
		t.Fatalf("--log: exit %d: %s", code, stderr)
	}
	for _, f := range []string{drawfolder.WorksheetFile, drawfolder.WorksheetSecondFile, drawfolder.LedgerFile} {
		a, _ := os.ReadFile(filepath.Join(chDir, f))
		b, _ := os.ReadFile(filepath.Join(logDir, f))
		if len(a) == 0 || !bytes.Equal(a, b) {
			t.Errorf("%s differs between the draw in ClickHouse and the draw from the export", f)
		}
	}
	code, stdout, stderr = runDrawCmd(t, nil, "--check", chDir, "--plan", sqlPlan, "--log", export)
	if code != exitOK || !strings.HasPrefix(stdout, "same: "+chDir+", drawn inside clickhouse from table default.predictions") {
		t.Errorf("--check of the ClickHouse draw against the export: exit %d\n%s%s", code, stdout, stderr)
	}

	t.Run("refused", func(t *testing.T) {
		cases := []struct {
			name string
			args []string
			want string
			hint string
		}{
			{"selection without its counts", []string{"--selected", selected}, "a clickhouse selection is checked against the counts it was made from", "import it together with the counts file its selection query was printed from"},
			{"counts given as the selection", []string{"--counts", counts, "--selected", counts}, "this is the result of the counts query (step 1 of 2)", "print the selection query from this counts file"},
			{"selection given as the counts", []string{"--counts", selected, "--selected", selected}, "this is the result of a selection query, not of the counts query", ""},
			{"a flag that differs", []string{"--counts", counts, "--selected", selected, "--spare", "2"}, `--spare "2" differs from the draw the result was made for ("1")`, "the result carries the draw's settings"},
		}
		for _, tc := range cases {
			t.Run(tc.name, func(t *testing.T) {
				out := filepath.Join(t.TempDir(), "audit")
				code, _, stderr := runDrawCmd(t, nil, append([]string{"--plan", sqlPlan, "--out", out}, tc.args...)...)
				if code != exitBadInput || !strings.Contains(stderr, tc.want) || (tc.hint != "" && !strings.Contains(stderr, "hint: "+tc.hint)) {
					t.Errorf("exit %d, stderr:\n%s\nwant exit 2 with %q and hint %q", code, stderr, tc.want, tc.hint)
				}
				if _, err := os.Stat(out); !os.IsNotExist(err) {
					t.Errorf("a failed import left %s behind", out)
				}
			})
		}
		code, stdout, stderr := runDrawCmd(t, nil, "--plan", sqlPlan, "--sql", "clickhouse", "--counts", counts, "--strata", "region")
		if code != exitBadInput || stdout != "" || !strings.Contains(stderr, `--strata "region" differs from the draw the result was made for ("region,channel")`) {
			t.Errorf("selection query with a differing flag: exit %d, stdout %d bytes, stderr:\n%s", code, len(stdout), stderr)
		}
	})
}

// TestDrawClickHouseLongQuery checks that a selection query longer than
// ClickHouse parses by default comes with the client flag to run it.
func TestDrawClickHouseLongQuery(t *testing.T) {
	t.Parallel()
	p, fp, err := loadDrawPlan(sqlPlan)
	if err != nil {
		t.Fatal(err)
	}
	s := &sqlquery.Spec{Format: sqlquery.QueryFormat, ToolVersion: "test", Dialect: sqlquery.ClickHouse, PlanFingerprint: fp, Seed: p.Seed,
		SelectionSeed: p.Seed, Table: "t", IDColumn: "record_id", Strata: []string{"region"}, Candidates: p.Candidates,
		SampleSize: p.Rule.SampleSize, Allocation: "equal"}
	detail, err := s.MarshalDetail()
	if err != nil {
		t.Fatal(err)
	}
	var b bytes.Buffer
	w := csv.NewWriter(&b)
	w.Write(sqlquery.ResultHeader(2))
	const strata = 3000
	total := strconv.Itoa(strata * 10)
	w.Write([]string{sqlquery.KindCounts, "", "", total, "", "", "", "", string(detail), "", ""})
	w.Write([]string{sqlquery.KindInScope, "", "", total, "", "", "", "", "", "", ""})
	w.Write([]string{sqlquery.KindEmptyIDs, "", "", "0", "", "", "", "", "", "", ""})
	w.Write([]string{sqlquery.KindRepeatedRows, "", "", "0", "", "", "", "", "", "", ""})
	for i := range strata {
		w.Write([]string{sqlquery.KindStratum, "", fmt.Sprintf("a region with a long name, number %05d", i), "10", "", "", "", "", "", "", ""})
	}
	w.Flush()
	counts := filepath.Join(t.TempDir(), "counts.csv")
	if err := os.WriteFile(counts, b.Bytes(), 0o644); err != nil {
		t.Fatal(err)
	}
	code, stdout, stderr := runDrawCmd(t, nil, "--plan", sqlPlan, "--sql", "clickhouse", "--counts", counts, "-q")
	want := fmt.Sprintf("probity: the query is %d bytes, more than ClickHouse parses by default (max_query_size %d)\nhint: run it with clickhouse-client --max_query_size=%d\n",
		len(stdout), sqlquery.ClickHouseMaxQuerySize, len(stdout)+1)
	if code != exitOK || len(stdout) <= sqlquery.ClickHouseMaxQuerySize || stderr != want {
		t.Errorf("exit %d, %d bytes, stderr:\n%s\nwant:\n%s", code, len(stdout), stderr, want)
	}
}
