package sqlquery

import (
	"bytes"
	"encoding/json"
	"fmt"
	"math/rand/v2"
	"os"
	"os/exec"
	"path/filepath"
	"slices"
	"strconv"
	"strings"
	"testing"
	"time"

	"probity/plan"
	"probity/plan/testkit/needs"
	"probity/sampling"
	"probity/sampling/sqlquery/chcluster"
)

// chColumns are the invented log's columns (names that need quoting), and
// chTypes their ClickHouse types.
var (
	chColumns = []string{`Record "ID"`, "region", "select", "score", "model a", "text col", "score text"}
	chTypes   = []string{"String", "Nullable(String)", "String", "Float64", "String", "Nullable(String)", "String"}
)

// chTrickyIDs are ids that a CSV load with ClickHouse's default settings
// would change (spaces trimmed, a leading ' read as a quote), or that a
// careless export would write differently: quotes, backslashes and escape
// look-alikes, commas, tabs, non-ASCII, case-only differences, NULL
// look-alikes. Common practice, no source.
var chTrickyIDs = []string{` lead`, `trail `, `  both  `, `'quoted'`, `'lead`, `it's`, `"dq"`, `a""b`, `back\slash`, `\N`, `\\N`, `\'`,
	`NULL`, `null`, `(null)`, `a,b`, "tab\there", `é✓ 日本`, `Case`, `case`, `CASE`, `007`, `7`, `-0`, `|pipe|`, `#hash`, `--dash`, `/*c*/`}

// chScoreTexts are band values near the edges 0.5 and 0.9, written in the
// forms strconv.ParseFloat reads and ClickHouse's float parser may round
// differently: exact midpoints between neighbouring doubles (a tie rounds
// to the even one), a digit either side of them, exponents, signs, spaces.
var chScoreTexts = []string{"0.5", "0.50", " 0.5", "0.5 ", "5e-1", ".5", "+0.5", "0.9", "0.90", "9E-1",
	"0.90000000000000002220446049250313080847263336181640625",  // the double 0.9 written out
	"0.899999999999999966693309261245303787291049957275390625", // midpoint below 0.9 (a tie: rounds to the even double below)
	"0.8999999999999999666933092612453037872910499572753906251",
	"0.8999999999999999666933092612453037872910499572753906249",
	"0.4999999999999999722444243843710864894092082977294921875", // midpoint below 0.5 (a tie: rounds up to 0.5, which is even)
	"0.49999999999999997224442438437108648940920829772949218749",
	"1", "1.0", "1e0", "1.00000000000000011102230246251565404236316680908203125", // midpoint above 1: rounds to 1
	"0", "-0", "-0.0", "0e5", "1e-400", "-1e-400", "\u00a00.3", "0.3\t", "00.7", "0.12248244750"}

// chInventedLog returns rows of the invented log (nil is NULL): ids
// "r0000001"… with every 97th one replaced by a tricky id (and a very long
// one now and then), four regions and NULL, three channels, scores with
// four decimals, two labels, texts with commas, quotes and line breaks or
// NULL, and band values of every tricky form among ordinary ones.
func chInventedLog(rows int) [][]*string {
	rng := rand.New(rand.NewPCG(18, 6))
	regions := []string{"north", "south", "east", "west"}
	channels := []string{"web", "app", "phone"}
	texts := []string{"plain", `said "hi", left`, "two\nlines", "it's fine", `back\slash`, "tab\tand, comma"}
	s := func(v string) *string { return &v }
	out := make([][]*string, rows)
	for i := range out {
		id := fmt.Sprintf("r%07d", i+1)
		switch {
		case i%1009 == 5:
			id = strings.Repeat("long-", 1000) + strconv.Itoa(i)
		case i%97 == 3:
			id = chTrickyIDs[(i/97)%len(chTrickyIDs)] + strconv.Itoa(i)
		case i < len(chTrickyIDs):
			id = chTrickyIDs[i]
		}
		var region *string
		if rng.IntN(20) > 0 {
			region = s(regions[rng.IntN(len(regions))])
		}
		var text *string
		if rng.IntN(30) > 0 {
			text = s(texts[rng.IntN(len(texts))])
		}
		model := "ok"
		if rng.IntN(10) == 0 {
			model = "fraud"
		}
		band := strconv.FormatFloat(rng.Float64(), 'f', 6, 64)
		if rng.IntN(20) == 0 {
			band = chScoreTexts[rng.IntN(len(chScoreTexts))]
		}
		out[i] = []*string{s(id), region, s(channels[rng.IntN(len(channels))]), s(strconv.FormatFloat(float64(rng.IntN(10001))/10000, 'f', 4, 64)),
			s(model), text, s(band)}
	}
	return out
}

// csvQuote writes a field as RFC 4180 quoted text.
func csvQuote(v string) string { return `"` + strings.ReplaceAll(v, `"`, `""`) + `"` }

// chWriteLog writes the log as a probity draw reads it (a header, every
// field quoted, NULL as NullText) and as ClickHouse loads it exactly
// (every string quoted, NULL as an unquoted \N).
func chWriteLog(rows [][]*string) (logCSV, load []byte) {
	var a, b bytes.Buffer
	for i, c := range chColumns {
		if i > 0 {
			a.WriteByte(',')
		}
		a.WriteString(csvQuote(c))
	}
	a.WriteByte('\n')
	for _, r := range rows {
		for i, v := range r {
			if i > 0 {
				a.WriteByte(',')
				b.WriteByte(',')
			}
			if v == nil {
				a.WriteString(csvQuote(NullText))
				b.WriteString(`\N`)
				continue
			}
			a.WriteString(csvQuote(*v))
			b.WriteString(csvQuote(*v))
		}
		a.WriteByte('\n')
		b.WriteByte('\n')
	}
	return a.Bytes(), b.Bytes()
}

// chLoad creates the Distributed table default.name over a MergeTree table
// on each shard and loads rows through it: quoted CSV with single quotes
// read as plain characters, and a synchronous insert, so that every row is
// on its shard when the statement returns.
func chLoad(t *testing.T, c *chcluster.Cluster, name string, load []byte) string {
	t.Helper()
	cols := make([]string, len(chColumns))
	for i, col := range chColumns {
		q, _ := ClickHouse.QuoteIdent(col)
		cols[i] = q + " " + chTypes[i]
	}
	local := name + " local"
	ql, _ := ClickHouse.QuoteIdent(local)
	qn, _ := ClickHouse.QuoteIdent(name)
	c.CreateDistributed(t, "default."+qn, "default."+ql, "default", ql, strings.Join(cols, ", "))
	c.MustQuery(t, "INSERT INTO default."+qn+" FORMAT CSV", bytes.NewReader(load), "--format_csv_allow_single_quotes=0", "--insert_distributed_sync=1")
	return "default." + quotePart(name)
}

// chExport writes the table as a log for the draw from a file: CSV with
// names, NULL as NullText.
func chExport(t *testing.T, c *chcluster.Cluster, table string) []byte {
	t.Helper()
	qt, _ := ClickHouse.QuoteTable(table)
	cols := make([]string, len(chColumns))
	for i, col := range chColumns {
		q, _ := ClickHouse.QuoteIdent(col)
		cols[i] = q
		if strings.HasPrefix(chTypes[i], "Nullable") {
			cols[i] = "ifNull(" + q + ", '" + NullText + "') AS " + q
		}
	}
	return c.MustQuery(t, "SELECT "+strings.Join(cols, ", ")+" FROM "+qt+" FORMAT CSVWithNames", nil)
}

// chDraw runs both queries of the draw s on the cluster and imports the
// result; it returns the result and the two queries' run times.
func chDraw(t *testing.T, c *chcluster.Cluster, p *plan.File, s *Spec, dir string) (*Result, time.Duration, time.Duration) {
	t.Helper()
	cq, err := CountsQuery(s)
	if err != nil {
		t.Fatal(err)
	}
	start := time.Now()
	out, err := c.Query(cq, nil)
	if err != nil {
		t.Fatal(err)
	}
	countsTime := time.Since(start)
	countsPath := filepath.Join(dir, "counts.csv")
	if err := os.WriteFile(countsPath, out, 0o644); err != nil {
		t.Fatal(err)
	}
	counts, err := ReadCounts(countsPath, nil, p, s.PlanFingerprint)
	if err != nil {
		t.Fatal(err)
	}
	if counts.Query != cq {
		t.Fatal("the counts file rebuilt a different counts query")
	}
	sq, err := SelectionQuery(counts)
	if err != nil {
		t.Fatal(err)
	}
	for _, q := range []string{cq, sq} {
		if strings.Count(q, "skip_unavailable_shards") == 0 || strings.Count(q, "skip_unavailable_shards") != strings.Count(q, "skip_unavailable_shards = 0,") {
			t.Fatal("a query does not pin skip_unavailable_shards to 0 wherever it names it")
		}
	}
	start = time.Now()
	out, err = c.Query(sq, nil)
	if err != nil {
		t.Fatal(err)
	}
	selectionTime := time.Since(start)
	resultPath := filepath.Join(dir, "selected.csv")
	if err := os.WriteFile(resultPath, out, 0o644); err != nil {
		t.Fatal(err)
	}
	res, err := ImportSelection(resultPath, nil, p, s.PlanFingerprint, counts)
	if err != nil {
		t.Fatal(err)
	}
	if res.Query != sq {
		t.Fatal("the imported result rebuilt a different selection query")
	}
	return res, countsTime, selectionTime
}

// TestClickHouseMatchesFileDraw is the end-to-end check of the two-step
// draw on a two-shard cluster: an invented log with ids and band values
// chosen to trip ClickHouse's CSV input and float parsing, loaded through
// a Distributed table; both queries run through clickhouse-client; the
// result imported. Its worksheets and ledger must be byte-identical to the
// draw from a file of the same log and of an export of the table, and its
// keys and ranks must match an independent recomputation with Python's
// hashlib.
func TestClickHouseMatchesFileDraw(t *testing.T) {
	c := chcluster.Start(t)
	rows := 300_000
	if testing.Short() {
		rows = 30_000
	}
	dir := t.TempDir()
	logCSV, load := chWriteLog(chInventedLog(rows))
	logPath := filepath.Join(dir, "log.csv")
	if err := os.WriteFile(logPath, logCSV, 0o644); err != nil {
		t.Fatal(err)
	}
	table := chLoad(t, c, "prediction log", load)
	export := filepath.Join(dir, "export.csv")
	if err := os.WriteFile(export, chExport(t, c, table), 0o644); err != nil {
		t.Fatal(err)
	}

	cases := []struct {
		name string
		spec Spec
	}{
		{"strata, band, minimum, spares, double", Spec{Strata: []string{"region", "select"}, Bands: []string{"score text=0.5,0.9"},
			Show: []string{"text col"}, Allocation: "proportional", MinPerStratum: 4, Spare: 2, Double: 25}},
		{"where, equal, period", Spec{Strata: []string{"select"}, Where: []string{"region=north,(null),east"},
			Show: []string{"text col", "score text"}, Allocation: "equal", Spare: 1, Period: "2026-11"}},
		{"unstratified", Spec{Allocation: "proportional"}},
	}
	for i, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			p := e2ePlan(500)
			s := tc.spec
			s.Format, s.ToolVersion, s.Dialect, s.Table, s.IDColumn = QueryFormat, "test", ClickHouse, table, chColumns[0]
			s.PlanFingerprint, s.Seed, s.SampleSize, s.Candidates = "f00d", p.Seed, p.Rule.SampleSize, p.Candidates
			s.SelectionSeed = p.Seed
			if s.Period != "" {
				s.SelectionSeed = sampling.PeriodSeed(p.Seed, s.Period)
			}
			caseDir := filepath.Join(dir, strconv.Itoa(i))
			if err := os.MkdirAll(caseDir, 0o755); err != nil {
				t.Fatal(err)
			}
			res, countsTime, selectionTime := chDraw(t, c, p, &s, caseDir)
			fromCH, err := res.Folder("test")
			if err != nil {
				t.Fatal(err)
			}
			start := time.Now()
			fromLog := fileDraw(t, p, &s, logPath)
			t.Logf("%d rows: counts query %v, selection query %v; draw from the log file %v (timings on a shared machine, for information)",
				rows, countsTime.Round(time.Millisecond), selectionTime.Round(time.Millisecond), time.Since(start).Round(time.Millisecond))
			compareFolders(t, fromCH, fromLog)
			compareFolders(t, fromCH, fileDraw(t, p, &s, export))
			m := fromCH.Manifest
			if m.Engine == nil || m.Engine.Dialect != "clickhouse" || m.Engine.QuerySHA256 != res.QuerySHA256 ||
				m.Engine.CountsSHA256 != res.Counts.SHA256 || m.Engine.CountsQuerySHA256 != res.Counts.QuerySHA256 {
				t.Errorf("manifest engine = %+v", m.Engine)
			}
			pythonRecompute(t, logPath, &s, res)
		})
	}
}

// pythonRecompute recomputes each stratum's selected rows with Debian's
// /usr/bin/python3 (hashlib.sha256, float, the csv module): for each row
// in scope, its label and key, and per stratum the n_h + spares smallest
// keys, which must be the rows of the result in the same order.
func pythonRecompute(t *testing.T, logPath string, s *Spec, res *Result) {
	t.Helper()
	py := needs.PythonModules(t)
	type band struct {
		Column string    `json:"column"`
		Edges  []float64 `json:"edges"`
		Labels []string  `json:"labels"`
	}
	cfg := struct {
		Log    string              `json:"log"`
		Seed   string              `json:"seed"`
		ID     string              `json:"id"`
		Strata []string            `json:"strata"`
		Bands  []band              `json:"bands"`
		Where  map[string][]string `json:"where"`
		Takes  map[string]int      `json:"takes"`
	}{Log: logPath, Seed: s.SelectionSeed, ID: s.IDColumn, Strata: s.Strata, Where: map[string][]string{}, Takes: map[string]int{}}
	for _, b := range s.Bands {
		pb, err := sampling.ParseBand(b)
		if err != nil {
			t.Fatal(err)
		}
		cfg.Bands = append(cfg.Bands, band{pb.Column, pb.Edges, pb.Labels()})
	}
	for _, w := range s.Where {
		f, err := sampling.ParseFilter(w)
		if err != nil {
			t.Fatal(err)
		}
		cfg.Where[f.Column] = f.Values
	}
	for _, a := range res.Strata {
		cfg.Takes[a.Label] = a.Sample + a.Spare
	}
	arg, err := json.Marshal(cfg)
	if err != nil {
		t.Fatal(err)
	}
	script := `
import csv, hashlib, heapq, json, sys
cfg = json.loads(sys.argv[1])
rows = {}
with open(cfg["log"], newline="", encoding="utf-8") as f:
    r = csv.reader(f)
    head = next(r)
    col = {name: i for i, name in enumerate(head)}
    for rec in r:
        if any(rec[col[c]] not in vals for c, vals in cfg["where"].items()):
            continue
        parts = [rec[col[c]] for c in cfg["strata"] or []]
        for b in cfg["bands"] or []:
            v = float(rec[col[b["column"]]].strip())
            assert 0 <= v <= 1, v
            parts.append(b["labels"][sum(1 for e in b["edges"] if e <= v)])
        label = "|".join(parts) if parts else "all"
        rid = rec[col[cfg["id"]]]
        key = hashlib.sha256((cfg["seed"] + ":" + rid).encode("utf-8")).hexdigest()
        rows.setdefault(label, []).append((key, rid))
out = {label: heapq.nsmallest(cfg["takes"].get(label, 0), rs) for label, rs in rows.items()}
json.dump({"counts": {l: len(rs) for l, rs in rows.items()}, "selected": out}, sys.stdout)
`
	cmd := exec.Command(py, "-c", script, string(arg))
	var errb bytes.Buffer
	cmd.Stderr = &errb
	data, err := cmd.Output()
	if err != nil {
		t.Fatalf("python: %v\n%s", err, errb.String())
	}
	var got struct {
		Counts   map[string]int64       `json:"counts"`
		Selected map[string][][2]string `json:"selected"`
	}
	if err := json.Unmarshal(data, &got); err != nil {
		t.Fatal(err)
	}
	if len(got.Counts) != len(res.Strata) {
		t.Errorf("python finds %d strata, the draw %d", len(got.Counts), len(res.Strata))
	}
	for _, a := range res.Strata {
		if got.Counts[a.Label] != a.Population {
			t.Errorf("stratum %q: python counts %d rows, the draw %d", a.Label, got.Counts[a.Label], a.Population)
		}
		var want [][2]string
		for _, it := range res.Items[a.Label] {
			want = append(want, [2]string{it.Key, it.RecordID})
		}
		if sel := got.Selected[a.Label]; !slices.Equal(sel, want) {
			t.Errorf("stratum %q: python selects %d rows that differ from the draw's %d", a.Label, len(sel), len(want))
		}
	}
}
