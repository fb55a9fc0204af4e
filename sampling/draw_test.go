package sampling

import (
	"bytes"
	"compress/gzip"
	"crypto/sha256"
	"encoding/csv"
	"encoding/hex"
	"fmt"
	"os/exec"
	"sort"
	"strconv"
	"strings"
	"testing"

	"gonum.org/v1/gonum/stat/distuv"

	"probity/plan/testkit/needs"
	"probity/sampling/drawfolder"
	"probity/sampling/loggen"
)

// independentSelection recomputes, without the package's selection code,
// the ids a draw must pick: every row's key is hashed here, each stratum's
// keys sorted, and the n_h smallest taken, then the next spare_h.
func independentSelection(t *testing.T, logCSV []byte, seed string, strataCols []string, alloc map[string][2]int) (sample, spares map[string][]string) {
	t.Helper()
	r := csv.NewReader(bytes.NewReader(logCSV))
	recs, err := r.ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	col := map[string]int{}
	for i, h := range recs[0] {
		col[h] = i
	}
	type kid struct{ key, id string }
	by := map[string][]kid{}
	for _, rec := range recs[1:] {
		parts := make([]string, len(strataCols))
		for i, c := range strataCols {
			parts[i] = rec[col[c]]
		}
		label := strings.Join(parts, "|")
		if len(strataCols) == 0 {
			label = "all"
		}
		s := sha256.Sum256([]byte(seed + ":" + rec[col["record_id"]]))
		by[label] = append(by[label], kid{hex.EncodeToString(s[:]), rec[col["record_id"]]})
	}
	sample, spares = map[string][]string{}, map[string][]string{}
	for label, list := range by {
		sort.Slice(list, func(i, j int) bool { return list[i].key < list[j].key })
		a := alloc[label]
		for i := 0; i < a[0]+a[1]; i++ {
			if i < a[0] {
				sample[label] = append(sample[label], list[i].id)
			} else {
				spares[label] = append(spares[label], list[i].id)
			}
		}
	}
	return sample, spares
}

func TestSelectionMatchesIndependentRecomputation(t *testing.T) {
	log := genLog(t, loggen.Config{Rows: 20000, Seed: 11})
	p := testPlan("0f3c9a6e1b2d4c5a8e7f6a5b4c3d2e1f", 300)
	f, err := Draw(DrawInput{Plan: p, LogPath: "log.csv", Log: bytes.NewReader(log),
		StrataColumns: []string{"region", "channel"}, Alloc: AllocOptions{Spare: 3}, ChunkSize: 4096})
	if err != nil {
		t.Fatal(err)
	}
	alloc := map[string][2]int{}
	total := 0
	for _, s := range f.Manifest.Strata {
		alloc[s.Label] = [2]int{s.Sample, s.Spare}
		total += s.Sample
	}
	if total != 300 || len(alloc) != 12 {
		t.Fatalf("allocation %v sums to %d over %d strata", alloc, total, len(alloc))
	}
	wantS, wantP := independentSelection(t, log, p.Seed, []string{"region", "channel"}, alloc)
	gotS, gotP := map[string][]string{}, map[string][]string{}
	prevKey := ""
	for i, r := range f.Ledger {
		if r.Spare {
			gotP[r.Stratum] = append(gotP[r.Stratum], r.RecordID)
		} else {
			gotS[r.Stratum] = append(gotS[r.Stratum], r.RecordID)
			if r.Key <= prevKey {
				t.Fatalf("ledger row %d: sample not in ascending key order", i+1)
			}
			prevKey = r.Key
		}
		if r.Item != i+1 || f.Worksheet[i].RecordID != r.RecordID {
			t.Fatalf("item %d: worksheet and ledger disagree", i+1)
		}
	}
	for label := range alloc {
		if fmt.Sprint(gotS[label]) != fmt.Sprint(wantS[label]) || fmt.Sprint(gotP[label]) != fmt.Sprint(wantP[label]) {
			t.Errorf("stratum %s:\n got %v spares %v\nwant %v spares %v", label, gotS[label], gotP[label], wantS[label], wantP[label])
		}
	}
}

func TestSelectionMatchesPythonHashlib(t *testing.T) {
	py := needs.PythonModules(t)
	log := genLog(t, loggen.Config{Rows: 3000, Seed: 5})
	p := testPlan("py-seed", 40)
	f, err := Draw(DrawInput{Plan: p, LogPath: "log.csv", Log: bytes.NewReader(log), StrataColumns: []string{"region"}})
	if err != nil {
		t.Fatal(err)
	}
	// Python's hashlib and csv modules, with the n_h of the manifest.
	script := `
import csv, hashlib, sys
n = {a.split("=")[0]: int(a.split("=")[1]) for a in sys.argv[2:]}
rows = {}
for r in csv.DictReader(sys.stdin):
    k = hashlib.sha256((sys.argv[1] + ":" + r["record_id"]).encode()).hexdigest()
    rows.setdefault(r["region"], []).append((k, r["record_id"]))
out = []
for s, lst in rows.items():
    out += sorted(lst)[: n[s]]
for k, i in sorted(out):
    print(i)
`
	args := []string{"-c", script, p.Seed}
	for _, s := range f.Manifest.Strata {
		args = append(args, fmt.Sprintf("%s=%d", s.Label, s.Sample))
	}
	cmd := exec.Command(py, args...)
	cmd.Stdin = bytes.NewReader(log)
	out, err := cmd.Output()
	if err != nil {
		t.Fatal(err)
	}
	var got []string
	for _, r := range f.Ledger {
		got = append(got, r.RecordID)
	}
	if strings.Join(got, "\n")+"\n" != string(out) {
		t.Fatalf("python hashlib selection differs:\n got %v\nwant %s", got, out)
	}
}

// TestInclusionFrequencies checks that over many seeds each row is drawn
// with probability n_h/N_h. Log: 60 rows in two strata (40 and 20); n = 15
// gives n_h = 10 and 5, so π = 1/4 in both. Over R = 3000 seeds each row's
// inclusion count O_i ~ Binomial(R, π); X = Σ (O_i − Rπ)² / (Rπ(1−π)) is
// approximately χ² with N − H = 58 degrees of freedom (one lost per stratum
// because Σ O_i = R·n_h there). Threshold: the 0.999 quantile of χ²(58)
// (≈ 97.04, gonum distuv.ChiSquared), so a correct sampler fails 1 run in
// 1000 — and the seeds are fixed, so the test is deterministic.
func TestInclusionFrequencies(t *testing.T) {
	var b strings.Builder
	b.WriteString("record_id,group,model_a,score\n")
	for i := 0; i < 60; i++ {
		g := "a"
		if i >= 40 {
			g = "b"
		}
		fmt.Fprintf(&b, "id%d,%s,ok,0.1\n", i, g)
	}
	log := []byte(b.String())
	const R = 3000
	counts := map[string]int{}
	for s := 0; s < R; s++ {
		p := testPlan(fmt.Sprintf("chi-%d", s), 15)
		f, err := Draw(DrawInput{Plan: p, LogPath: "log.csv", Log: bytes.NewReader(log), StrataColumns: []string{"group"}, Workers: 1})
		if err != nil {
			t.Fatal(err)
		}
		if f.Manifest.Strata[0].Sample != 10 || f.Manifest.Strata[1].Sample != 5 {
			t.Fatalf("allocation %+v, want 10 and 5", f.Manifest.Strata)
		}
		for _, r := range f.Ledger {
			counts[r.RecordID]++
		}
	}
	pi := 0.25
	x := 0.0
	for i := 0; i < 60; i++ {
		o := float64(counts[fmt.Sprintf("id%d", i)])
		x += (o - R*pi) * (o - R*pi) / (R * pi * (1 - pi))
	}
	threshold := distuv.ChiSquared{K: 58}.Quantile(0.999)
	t.Logf("chi-square %.2f, threshold %.2f (df 58, 0.999)", x, threshold)
	if x > threshold {
		t.Fatalf("inclusion frequencies deviate from n_h/N_h: chi-square %.2f > %.2f", x, threshold)
	}
}

// drawFiles draws with the given input changes and returns the worksheet
// and ledger bytes.
func drawFiles(t *testing.T, log []byte, name string, mod func(*DrawInput)) map[string][]byte {
	t.Helper()
	in := DrawInput{Plan: testPlan("inv-seed", 120), LogPath: name, Log: bytes.NewReader(log),
		StrataColumns: []string{"channel"}, Bands: []Band{{Column: "score", Edges: []float64{0.5, 0.9}}},
		Show: []string{"text"}, Alloc: AllocOptions{Spare: 2}, Double: 10}
	if mod != nil {
		mod(&in)
	}
	f, err := Draw(in)
	if err != nil {
		t.Fatal(err)
	}
	return renderMap(t, f)
}

func TestOutputsDoNotDependOnOrderCompressionFormatOrSplit(t *testing.T) {
	base := loggen.Config{Rows: 8000, Seed: 21}
	plain := genLog(t, base)
	want := drawFiles(t, plain, "log.csv", nil)
	shuffled := base
	shuffled.Shuffle = true
	gz := base
	gz.Gzip = true
	tsv := base
	tsv.Format = "tsv"
	jsonl := base
	jsonl.Format = "jsonl"
	// loggen's JSON text column differs in wording, so compare only the ledger there.
	variants := []struct {
		name    string
		log     []byte
		file    string
		mod     func(*DrawInput)
		ledgerO bool
	}{
		{"shuffled", genLog(t, shuffled), "log.csv", nil, false},
		{"gzip", genLog(t, gz), "log.csv.gz", nil, false},
		{"gzip no extension", genLog(t, gz), "-", nil, false},
		{"tiny chunks one worker", plain, "log.csv", func(in *DrawInput) { in.ChunkSize = 100; in.Workers = 1 }, false},
		{"tiny chunks four workers", plain, "log.csv", func(in *DrawInput) { in.ChunkSize = 257; in.Workers = 4 }, false},
		{"tsv", genLog(t, tsv), "log.tsv", nil, false},
		{"jsonl", genLog(t, jsonl), "log.jsonl", nil, true},
	}
	for _, v := range variants {
		got := drawFiles(t, v.log, v.file, v.mod)
		names := []string{drawfolder.LedgerFile, drawfolder.WorksheetFile, drawfolder.WorksheetSecondFile}
		if v.ledgerO {
			names = []string{drawfolder.LedgerFile}
		}
		for _, n := range names {
			if !bytes.Equal(got[n], want[n]) {
				t.Errorf("%s: %s differs from the plain CSV draw", v.name, n)
			}
		}
	}
	// The gzip and plain manifests differ only where they describe the file.
	gzf := drawFiles(t, genLog(t, gz), "log.csv", nil)
	m1, _ := drawfolder.ParseManifest(want[drawfolder.ManifestFile], "a")
	m2, _ := drawfolder.ParseManifest(gzf[drawfolder.ManifestFile], "b")
	m1.Log, m2.Log = drawfolder.LogInfo{}, drawfolder.LogInfo{}
	b1, _ := drawfolder.MarshalManifest(m1)
	b2, _ := drawfolder.MarshalManifest(m2)
	if !bytes.Equal(b1, b2) {
		t.Errorf("gzip and plain manifests differ beyond the log description:\n%s\n%s", b1, b2)
	}
}

func TestGzipDetectedByMagicAndHashed(t *testing.T) {
	log := genLog(t, loggen.Config{Rows: 500, Seed: 2, Gzip: true})
	f, err := Draw(DrawInput{Plan: testPlan("g", 10), LogPath: "x.dat", Log: bytes.NewReader(log)})
	if err != nil {
		t.Fatal(err)
	}
	sum := sha256.Sum256(log)
	if f.Manifest.Log.Compression != CompressionGzip || f.Manifest.Log.SHA256 != hex.EncodeToString(sum[:]) || f.Manifest.Log.Bytes != int64(len(log)) || f.Manifest.Log.Rows != 500 {
		t.Fatalf("log info %+v", f.Manifest.Log)
	}
}

func TestPeriodSeedSelects(t *testing.T) {
	log := genLog(t, loggen.Config{Rows: 2000, Seed: 8})
	p := testPlan("plan-seed-1", 25)
	f, err := Draw(DrawInput{Plan: p, LogPath: "log.csv", Log: bytes.NewReader(log), Period: "2026-11"})
	if err != nil {
		t.Fatal(err)
	}
	// Recomputed here: sha256("plan-seed-1:period:2026-11").
	s := sha256.Sum256([]byte("plan-seed-1:period:2026-11"))
	ps := hex.EncodeToString(s[:])
	if f.Manifest.PeriodSeed != ps || f.Manifest.SelectionSeed != ps || f.Manifest.Seed != "plan-seed-1" || f.Manifest.Period != "2026-11" {
		t.Fatalf("manifest seeds %q %q %q", f.Manifest.Seed, f.Manifest.PeriodSeed, f.Manifest.SelectionSeed)
	}
	wantS, _ := independentSelection(t, log, ps, nil, map[string][2]int{"all": {25, 0}})
	var got []string
	for _, r := range f.Ledger {
		got = append(got, r.RecordID)
	}
	sort.Strings(got)
	sort.Strings(wantS["all"])
	if fmt.Sprint(got) != fmt.Sprint(wantS["all"]) {
		t.Fatalf("period draw did not use the period seed")
	}
}

func TestQuotedCSVAcrossChunks(t *testing.T) {
	var b strings.Builder
	b.WriteString("record_id,model_a,score,text\r\n")
	for i := 0; i < 300; i++ {
		fmt.Fprintf(&b, "\"q%d\",ok,0.3,\"line one, \"\"quoted\"\"\nline two %d\"\r\n", i, i)
	}
	log := []byte(b.String())
	var first map[string][]byte
	for _, cs := range []int{7, 64, 1 << 20} {
		f, err := Draw(DrawInput{Plan: testPlan("q", 20), LogPath: "log.csv", Log: bytes.NewReader(log), Show: []string{"text"}, ChunkSize: cs})
		if err != nil {
			t.Fatalf("chunk %d: %v", cs, err)
		}
		if f.Manifest.Log.Rows != 300 {
			t.Fatalf("chunk %d: %d rows", cs, f.Manifest.Log.Rows)
		}
		if !strings.HasPrefix(f.Worksheet[0].Show[0], "line one, \"quoted\"\nline two ") {
			t.Fatalf("text field %q", f.Worksheet[0].Show[0])
		}
		m := renderMap(t, f)
		if first == nil {
			first = m
		} else if !bytes.Equal(first[drawfolder.LedgerFile], m[drawfolder.LedgerFile]) || !bytes.Equal(first[drawfolder.WorksheetFile], m[drawfolder.WorksheetFile]) {
			t.Fatalf("chunk size %d changes the outputs", cs)
		}
	}
}

func TestDedupe(t *testing.T) {
	log := []byte("record_id,model_a,score,g\na,ok,0.1,x\nb,ok,0.1,x\na,fraud,0.9,y\nc,ok,0.1,x\nb,ok,0.1,x\nd,ok,0.2,x\n")
	_, err := Draw(DrawInput{Plan: testPlan("d", 2), LogPath: "log.csv", Log: bytes.NewReader(log), StrataColumns: []string{"g"}})
	want := `log.csv line 4, field record_id: record id "a" appears again (first on line 2); 2 repeats among the rows that could be drawn: "a" (lines 2 and 4), "b" (lines 3 and 6)`
	if err == nil || err.Error() != want {
		t.Fatalf("error %v\nwant %s", err, want)
	}
	f, err := Draw(DrawInput{Plan: testPlan("d", 2), LogPath: "log.csv", Log: bytes.NewReader(log), StrataColumns: []string{"g"}, Dedupe: true})
	if err != nil {
		t.Fatal(err)
	}
	if f.Manifest.LotSize != 4 || f.Manifest.DuplicatesDropped != 2 || len(f.Manifest.Strata) != 1 || f.Manifest.Strata[0].Population != 4 {
		t.Fatalf("dedupe manifest: lot %d dropped %d strata %+v", f.Manifest.LotSize, f.Manifest.DuplicatesDropped, f.Manifest.Strata)
	}
}

func TestScanErrors(t *testing.T) {
	var gzBuf bytes.Buffer
	zw := gzip.NewWriter(&gzBuf)
	zw.Write(genLog(t, loggen.Config{Rows: 3000, Seed: 1}))
	zw.Close()
	truncated := gzBuf.Bytes()[:gzBuf.Len()/2]
	h := "record_id,model_a,score,region\n"
	cases := []struct {
		name string
		log  string
		mod  func(*DrawInput)
		want string
	}{
		{"empty", "", nil, "log.csv: the log is empty"},
		{"header only", h, nil, "log.csv: the log has a header but no rows"},
		{"missing id column", "id,model_a,score\n1,ok,0.1\n", nil, `log.csv line 1, field record_id: the id column "record_id" is not in the log; its columns are: id, model_a, score`},
		{"missing strata column", h + "a,ok,0.1,n\n", func(in *DrawInput) { in.StrataColumns = []string{"zone"} }, `log.csv line 1, field zone: the strata column "zone" is not in the log; its columns are: record_id, model_a, score, region`},
		{"missing candidate column", "record_id,score\na,0.1\n", nil, `log.csv line 1, field model_a: the candidate model-a column "model_a" is not in the log; its columns are: record_id, score`},
		{"missing show column", h + "a,ok,0.1,n\n", func(in *DrawInput) { in.Show = []string{"text"} }, `log.csv line 1, field text: the shown column "text" is not in the log`},
		{"ragged", h + "a,ok,0.1,n\nb,ok,0.1\n", nil, "log.csv line 3: 3 fields, but the header has 4 (record_id, model_a, score, region)"},
		{"empty id", h + "a,ok,0.1,n\n,ok,0.1,n\n", nil, "log.csv line 3, field record_id: the record id is empty"},
		{"band not numeric", h + "a,ok,0.1,n\nb,ok,high,n\n", func(in *DrawInput) { in.Bands = []Band{{Column: "score", Edges: []float64{0.5}}} }, `log.csv line 3, field score: the band value "high" is not a number`},
		{"band out of range", h + "a,ok,1.5,n\n", func(in *DrawInput) { in.Bands = []Band{{Column: "score", Edges: []float64{0.5}}} }, `log.csv line 2, field score: the band value "1.5" is outside [0, 1]`},
		{"bare quote", h + "a,o\"k,0.1,n\n", nil, `log.csv line 2, field model_a: a " appears inside a field that is not quoted`},
		{"sample larger than log", h + "a,ok,0.1,n\nb,ok,0.1,n\n", func(in *DrawInput) { in.Plan = testPlan("s", 5) }, "log.csv: the plan needs a sample of 5 but only 2 rows are in scope"},
		{"filter leaves nothing", h + "a,ok,0.1,n\n", func(in *DrawInput) { in.Where = []Filter{{Column: "region", Values: []string{"s"}}} }, "log.csv: no row of the 1 in the log matches the filter region=s"},
		{"truncated gzip", string(truncated), func(in *DrawInput) { in.LogPath = "log.csv.gz"; in.StrataColumns = nil }, "log.csv.gz: the compressed data ends early after line"},
		{"bad score on a drawn row", h + "a,ok,x,n\n", nil, `log.csv line 2, field score: candidate score-0.7: score "x" in column score is not a finite number`},
		{"jsonl not object", "{\"record_id\":\"a\",\"model_a\":\"ok\",\"score\":0.1}\n[1,2]\n", func(in *DrawInput) { in.LogPath = "log.jsonl" }, "log.jsonl line 2: the line is not a JSON object"},
		{"jsonl missing key", "{\"record_id\":\"a\",\"model_a\":\"ok\",\"score\":0.1}\n{\"record_id\":\"b\",\"score\":0.1}\n", func(in *DrawInput) { in.LogPath = "log.jsonl" }, `log.jsonl line 2, field model_a: key "model_a" is missing`},
		{"show candidate", h + "a,ok,0.1,n\n", func(in *DrawInput) { in.Show = []string{"model_a"} }, "show_columns model_a: this column holds candidate model-a's prediction or score; labelers must not see the model's answer"},
		{"population mismatch", h + "a,ok,0.1,n\nb,ok,0.1,n\n", func(in *DrawInput) { in.Plan.Inputs.Population = 3 }, "log.csv: 2 rows are in scope but the plan is for a lot of 3 (inputs.population)"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			in := DrawInput{Plan: testPlan("e", 1), LogPath: "log.csv", Log: strings.NewReader(c.log), StrataColumns: []string{"region"}}
			if strings.HasPrefix(c.name, "missing id") || strings.HasPrefix(c.name, "missing candidate") || strings.HasPrefix(c.name, "jsonl") {
				in.StrataColumns = nil
			}
			if c.mod != nil {
				c.mod(&in)
			}
			_, err := Draw(in)
			if err == nil {
				t.Fatal("no error")
			}
			if !strings.Contains(err.Error(), c.want) {
				t.Fatalf("error\n %v\nwant it to contain\n %s", err, c.want)
			}
		})
	}
}

// TestRepeatsNameTheFirstLine: an id on three lines read by different
// workers is reported as repeats of its first line every time (before,
// a worker that saw only the later copies reported the earlier of those).
func TestRepeatsNameTheFirstLine(t *testing.T) {
	data := []byte("record_id,g\nr,x\nq,x\nr,x\np,x\nr,x\n")
	want := `"r" (lines 2 and 4), "r" (lines 2 and 6)`
	for i := 0; i < 200; i++ {
		spec := ScanSpec{Name: "log.csv", Seed: "s", StrataColumns: []string{"g"}, Capacity: 5, ChunkSize: 4, Workers: 2, Dedupe: true}
		res, err := Scan(bytes.NewReader(data), spec)
		if err != nil {
			t.Fatal(err)
		}
		var got []string
		for _, d := range res.Duplicates {
			got = append(got, fmt.Sprintf("%q (lines %d and %d)", d.ID, d.FirstLine, d.Line))
		}
		if strings.Join(got, ", ") != want {
			t.Fatalf("run %d: repeats %s, want %s", i, strings.Join(got, ", "), want)
		}
		if res.InScope != 3 {
			t.Fatalf("run %d: %d rows in scope, want 3", i, res.InScope)
		}
	}
}

// TestBandValuesRepeated: band strata of many rows whose scores repeat
// (so most are found in the value cache) count the same as classifying
// each written value by hand: [0, 0.5), [0.5, 0.9), [0.9, 1].
func TestBandValuesRepeated(t *testing.T) {
	values := []string{"0", "0.5", "0.49", "0.4999999", "0.9", "0.90", "1", "0.8999", ".5", "5e-1", " 0.5", "0.50001", "1.0"}
	want := map[string]int64{}
	var b strings.Builder
	b.WriteString("record_id,score\n")
	for i := 0; i < 6000; i++ {
		v := values[(i*7+i/13)%len(values)]
		fmt.Fprintf(&b, "r%d,%s\n", i, v)
		f, err := strconv.ParseFloat(strings.TrimSpace(v), 64)
		if err != nil {
			t.Fatal(err)
		}
		switch {
		case f < 0.5:
			want["[0,0.5)"]++
		case f < 0.9:
			want["[0.5,0.9)"]++
		default:
			want["[0.9,1]"]++
		}
	}
	band, err := ParseBand("score=0.5,0.9")
	if err != nil {
		t.Fatal(err)
	}
	res, err := Scan(strings.NewReader(b.String()), ScanSpec{Name: "log.csv", Seed: "s", Bands: []Band{band}, Capacity: 10, ChunkSize: 1000, Workers: 2})
	if err != nil {
		t.Fatal(err)
	}
	got := map[string]int64{}
	for _, st := range res.Strata {
		got[st.Label] = st.Count
	}
	if fmt.Sprint(got) != fmt.Sprint(want) {
		t.Fatalf("band counts %v, want %v", got, want)
	}
}
