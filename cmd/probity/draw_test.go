package main

import (
	"bytes"
	"compress/gzip"
	"crypto/sha256"
	"encoding/hex"
	"os"
	"path/filepath"
	"strings"
	"testing"
	"time"

	"probity/plan"
	"probity/plan/planfile"
	"probity/plan/sequential"
	"probity/sampling"
	"probity/sampling/drawfolder"
	"probity/sampling/loggen"
)

const drawPlan = "../../testdata/draw/plan.yaml"

func runDrawCmd(t *testing.T, stdin []byte, args ...string) (int, string, string) {
	t.Helper()
	return runTest(t, append([]string{"draw"}, args...), withStdin(bytes.NewReader(stdin)), withVersion("test"),
		atTime(time.Date(2026, 12, 1, 7, 15, 0, 0, time.UTC)))
}

func writeGenLog(t *testing.T, dir, name string, c loggen.Config) string {
	t.Helper()
	var b bytes.Buffer
	if err := loggen.Write(&b, c); err != nil {
		t.Fatal(err)
	}
	p := filepath.Join(dir, name)
	if err := os.WriteFile(p, b.Bytes(), 0o644); err != nil {
		t.Fatal(err)
	}
	return p
}

func TestDrawThenCheck(t *testing.T) {
	t.Parallel()
	dir := t.TempDir()
	log := writeGenLog(t, dir, "log.csv", loggen.Config{Rows: 6000, Seed: 4})
	out := filepath.Join(dir, "audit")
	code, stdout, stderr := runDrawCmd(t, nil, "--plan", drawPlan, "--log", log, "--out", out,
		"--strata", "region,channel", "--show", "text", "--spare", "2", "--double", "30")
	if code != exitOK {
		t.Fatalf("exit %d: %s", code, stderr)
	}
	// 12 strata, shares rounded up: 6 items beyond the plan's 581.
	for _, want := range []string{"drew 587 items and 24 spares from 6000 rows in scope (6000 read) in 12 strata", "doubled: items 1–30 also in worksheet-second.csv", "east|app",
		"allocation note: proportional shares rounded up: 587 items where the plan asks for 581", "verdict: the stratified count rule"} {
		if !strings.Contains(stdout, want) {
			t.Errorf("stdout lacks %q:\n%s", want, stdout)
		}
	}
	if stderr != "" {
		t.Errorf("stderr not empty (no progress bar when stderr is not a terminal): %q", stderr)
	}
	for _, f := range []string{"worksheet.csv", "worksheet-second.csv", "ledger.csv", "manifest.json"} {
		if _, err := os.Stat(filepath.Join(out, f)); err != nil {
			t.Fatal(err)
		}
	}
	code, stdout, stderr = runDrawCmd(t, nil, "--check", out, "--plan", drawPlan, "--log", log)
	if code != exitOK || !strings.HasPrefix(stdout, "same: ") {
		t.Fatalf("check exit %d\n%s%s", code, stdout, stderr)
	}
	// Labels written into the worksheet are not differences.
	ws := filepath.Join(out, "worksheet.csv")
	data, _ := os.ReadFile(ws)
	lines := strings.Split(string(data), "\n")
	lines[1] = strings.TrimSuffix(lines[1], ",,,") + ",fraud,looked twice,ana"
	os.WriteFile(ws, []byte(strings.Join(lines, "\n")), 0o644)
	if code, stdout, _ = runDrawCmd(t, nil, "--check", out, "--plan", drawPlan, "--log", log); code != exitOK {
		t.Fatalf("a labeled worksheet fails the check:\n%s", stdout)
	}
	// A swapped ledger row is found.
	lp := filepath.Join(out, "ledger.csv")
	ledger, _ := os.ReadFile(lp)
	os.WriteFile(lp, bytes.Replace(ledger, []byte("\n5,rec"), []byte("\n5,xrec"), 1), 0o644)
	code, stdout, _ = runDrawCmd(t, nil, "--check", out, "--plan", drawPlan, "--log", log)
	if code != exitRejected || !strings.Contains(stdout, "was not picked by chance") || !strings.Contains(stdout, "ledger.csv was changed after the draw") {
		t.Fatalf("tampered ledger: exit %d\n%s", code, stdout)
	}
	// A different log is reported.
	os.WriteFile(lp, ledger, 0o644)
	other := writeGenLog(t, dir, "other.csv", loggen.Config{Rows: 6000, Seed: 5})
	code, stdout, _ = runDrawCmd(t, nil, "--check", out, "--plan", drawPlan, "--log", other)
	if code != exitRejected || !strings.Contains(stdout, "this is not the log the draw was made from: its content's SHA-256 is") {
		t.Fatalf("other log: exit %d\n%s", code, stdout)
	}
	// Refuses the non-empty folder, leaves it as it was; --force redraws.
	before, _ := os.ReadFile(filepath.Join(out, "manifest.json"))
	code, _, stderr = runDrawCmd(t, nil, "--plan", drawPlan, "--log", log, "--out", out)
	if code != exitBadInput || !strings.Contains(stderr, "output folder is not empty") || !strings.Contains(stderr, "hint: choose a new folder, or add --force") {
		t.Fatalf("non-empty folder: exit %d %s", code, stderr)
	}
	after, _ := os.ReadFile(filepath.Join(out, "manifest.json"))
	if !bytes.Equal(before, after) {
		t.Fatal("a refused draw changed the folder")
	}
	if code, _, stderr = runDrawCmd(t, nil, "--plan", drawPlan, "--log", log, "--out", out, "--force"); code != exitOK {
		t.Fatalf("--force: %s", stderr)
	}
	if _, err := os.Stat(filepath.Join(out, "worksheet-second.csv")); !os.IsNotExist(err) {
		t.Fatal("--force without --double left the old worksheet-second.csv")
	}
}

func TestDrawStdinGzipPeriod(t *testing.T) {
	t.Parallel()
	dir := t.TempDir()
	var b bytes.Buffer
	loggen.Write(&b, loggen.Config{Rows: 3000, Seed: 6, Gzip: true})
	out := filepath.Join(dir, "nov")
	code, stdout, stderr := runDrawCmd(t, b.Bytes(), "--plan", drawPlan, "--log", "-", "--out", out, "--period", "2026-11")
	if code != exitOK {
		t.Fatalf("exit %d: %s", code, stderr)
	}
	m, _, err := drawfolder.ReadManifest(filepath.Join(out, "manifest.json"))
	if err != nil {
		t.Fatal(err)
	}
	// Recomputed here from the plan's seed.
	s := sha256.Sum256([]byte("7d1f0c9a2b3e4f5061728394a5b6c7d8:period:2026-11"))
	if m.PeriodSeed != hex.EncodeToString(s[:]) || m.SelectionSeed != m.PeriodSeed || m.Log.Compression != "gzip" || m.Log.Path != "-" {
		t.Fatalf("manifest %+v", m)
	}
	if !strings.Contains(stdout, "period 2026-11: selection seed "+m.PeriodSeed) {
		t.Errorf("stdout:\n%s", stdout)
	}
	code, stdout, _ = runDrawCmd(t, b.Bytes(), "--check", out, "--plan", drawPlan, "--log", "-")
	if code != exitOK {
		t.Fatalf("check from stdin: %d %s", code, stdout)
	}
}

func TestDrawBadInput(t *testing.T) {
	t.Parallel()
	var gz bytes.Buffer
	loggen.Write(&gz, loggen.Config{Rows: 5000, Seed: 1, Gzip: true})
	truncated := gz.Bytes()[:gz.Len()*2/3]
	okLog := func() []byte {
		var b bytes.Buffer
		loggen.Write(&b, loggen.Config{Rows: 800, Seed: 2})
		return b.Bytes()
	}()
	sizing, _ := filepath.Abs("../../testdata/draw/plan-sizing-only.yaml")
	h := "record_id,region,score,model_a\n"
	cases := []struct {
		name    string
		log     []byte
		logName string
		args    []string
		want    []string
	}{
		{"missing id column", []byte("id,region,score,model_a\n1,n,0.1,ok\n"), "log.csv", nil,
			[]string{`probity: LOG line 1, field record_id: the id column "record_id" is not in the log; its columns are: id, region, score, model_a`, "hint: name the id column with --id COLUMN"}},
		{"missing strata column", okLog, "log.csv", []string{"--strata", "zone"},
			[]string{`LOG line 1, field zone: the strata column "zone" is not in the log; its columns are: record_id, region, channel, score, model_a, model_b, text`}},
		{"missing candidate column", []byte("record_id,score\na,0.1\n"), "log.csv", nil,
			[]string{`LOG line 1, field model_a: the candidate model-a column "model_a" is not in the log; its columns are: record_id, score`}},
		{"missing show column", okLog, "log.csv", []string{"--show", "comment"},
			[]string{`LOG line 1, field comment: the shown column "comment" is not in the log`}},
		{"ragged row", []byte(h + "a,n,0.1,ok\nb,n,0.2\n"), "log.csv", nil,
			[]string{"LOG line 3: 3 fields, but the header has 4 (record_id, region, score, model_a)"}},
		{"empty id", []byte(h + "a,n,0.1,ok\n,n,0.2,ok\n"), "log.csv", nil,
			[]string{"LOG line 3, field record_id: the record id is empty"}},
		{"duplicate ids", []byte(h + "a,n,0.1,ok\nb,n,0.2,ok\na,n,0.3,ok\n"), "log.csv", nil,
			[]string{`LOG line 4, field record_id: record id "a" appears again (first on line 2)`, "hint: each record id must appear once; --dedupe first keeps the first row of each id"}},
		{"band not numeric", []byte(h + "a,n,0.1,ok\nb,n,n/a,ok\n"), "log.csv", []string{"--band", "score=0.5"},
			[]string{`LOG line 3, field score: the band value "n/a" is not a number`}},
		{"truncated gzip", truncated, "log.csv.gz", nil,
			[]string{"LOG: the compressed data ends early after line", "hint: the file was cut short"}},
		{"empty log", nil, "log.csv", nil, []string{"LOG: the log is empty"}},
		{"header only", []byte(h), "log.csv", nil, []string{"LOG: the log has a header but no rows"}},
		{"sample larger than log", []byte(h + "a,n,0.1,ok\nb,n,0.2,ok\n"), "log.csv", nil,
			[]string{"LOG: the plan needs a sample of 581 but only 2 rows are in scope"}},
		{"filter leaves nothing", okLog, "log.csv", []string{"--where", "region=nowhere"},
			[]string{"LOG: no row of the 800 in the log matches the filter region=nowhere"}},
		{"show a prediction", okLog, "log.csv", []string{"--show", "model_a"},
			[]string{"--show model_a: this column holds candidate model-a's prediction or score; labelers must not see the model's answer"}},
		{"show the stratum", okLog, "log.csv", []string{"--strata", "region", "--show", "region"},
			[]string{"--show region: this is a strata column"}},
		{"sizing-only plan", okLog, "log.csv", []string{"--plan", sizing},
			[]string{"is a sizing-only plan: it declares no candidates, so it cannot be drawn", "hint: declare the models or thresholds to judge: probity plan … --candidate NAME=COLUMN, or --thresholds COLUMN:t1,t2 --positive LABEL --negative LABEL"}},
		{"neyman without errors", okLog, "log.csv", []string{"--allocation", "neyman"},
			[]string{"--allocation neyman needs the anticipated error of each stratum"}},
		{"bad band", okLog, "log.csv", []string{"--band", "score=0.9,0.5"},
			[]string{"--band: band \"score=0.9,0.5\": edges must increase"}},
		{"double too large", okLog, "log.csv", []string{"--double", "600"},
			[]string{"--double 600: must be between 0 and the sample size 581"}},
		{"minimum too large", okLog, "log.csv", []string{"--strata", "region,channel", "--min-per-stratum", "60"},
			[]string{"a minimum of 60 per stratum over 12 strata needs more than the sample's 581 items"}},
		{"missing log", nil, "", []string{"--log", "/nonexistent/log.csv"}, []string{"cannot open the log"}},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			dir := t.TempDir()
			logPath := ""
			if c.logName != "" {
				logPath = filepath.Join(dir, c.logName)
				os.WriteFile(logPath, c.log, 0o644)
			}
			out := filepath.Join(dir, "out")
			args := []string{"--plan", drawPlan, "--out", out}
			if logPath != "" {
				args = append(args, "--log", logPath)
			}
			args = append(args, c.args...)
			code, stdout, stderr := runDrawCmd(t, nil, args...)
			if code != exitBadInput {
				t.Fatalf("exit %d, want 2\n%s%s", code, stdout, stderr)
			}
			if logPath != "" {
				stderr = strings.ReplaceAll(stderr, logPath, "LOG")
			}
			for _, w := range c.want {
				if !strings.Contains(stderr, w) {
					t.Errorf("stderr\n%s\nlacks\n%s", stderr, w)
				}
			}
			if strings.Count(stderr, "\n") > 2 {
				t.Errorf("error is more than a message and a hint:\n%s", stderr)
			}
			if _, err := os.Stat(out); !os.IsNotExist(err) {
				t.Errorf("a failed draw left %s behind", out)
			}
			if stdout != "" {
				t.Errorf("stdout not empty: %q", stdout)
			}
		})
	}
}

func TestDrawPopulationPlan(t *testing.T) {
	t.Parallel()
	dir := t.TempDir()
	p, _, err := planfile.Load(drawPlan)
	if err != nil {
		t.Fatal(err)
	}
	// a lot plan for the same inputs, sized as probity plan --population would
	p.Inputs.Population = 5000
	if p.Rule, p.Comparison, err = plan.Size(p.Inputs); err != nil {
		t.Fatal(err)
	}
	b, _ := p.Marshal()
	pp := filepath.Join(dir, "lot.yaml")
	os.WriteFile(pp, b, 0o644)
	log := writeGenLog(t, dir, "log.csv", loggen.Config{Rows: 4000, Seed: 9})
	out := filepath.Join(dir, "out")
	code, _, stderr := runDrawCmd(t, nil, "--plan", pp, "--log", log, "--out", out)
	if code != exitBadInput || !strings.Contains(stderr, "4000 rows are in scope but the plan is for a lot of 5000 (inputs.population)") ||
		!strings.Contains(stderr, "hint: a finite-lot plan judges exactly one lot") {
		t.Fatalf("exit %d: %s", code, stderr)
	}
	if _, err := os.Stat(out); !os.IsNotExist(err) {
		t.Fatal("output left behind")
	}
	// With --period the month's rows are the lot: recorded, not refused.
	code, _, stderr = runDrawCmd(t, nil, "--plan", pp, "--log", log, "--out", out, "--period", "2026-10")
	if code != exitOK {
		t.Fatalf("period: %s", stderr)
	}
	m, _, _ := drawfolder.ReadManifest(filepath.Join(out, "manifest.json"))
	if m.LotSize != 4000 {
		t.Fatalf("lot size %d", m.LotSize)
	}
}

func TestDrawProgressBarOnlyOnTerminal(t *testing.T) {
	t.Parallel()
	dir := t.TempDir()
	var gzb bytes.Buffer
	zw := gzip.NewWriter(&gzb)
	loggen.Write(zw, loggen.Config{Rows: 2000, Seed: 3})
	zw.Close()
	tick := time.Date(2026, 12, 1, 7, 0, 0, 0, time.UTC)
	d, _, errb := newTestDeps(withStdin(bytes.NewReader(gzb.Bytes())), withVersion("test"), onTerminal(),
		withClock(func() time.Time { tick = tick.Add(time.Second); return tick }))
	// stdin has no known size: the bar appears once 64 MB are read, so
	// not here; this checks the terminal path runs and leaves stderr clean.
	code := run([]string{"draw", "--plan", drawPlan, "--log", "-", "--out", filepath.Join(dir, "o")}, d)
	if code != exitOK || errb.String() != "" {
		t.Fatalf("exit %d stderr %q", code, errb.String())
	}
	var bar bytes.Buffer
	pb := &drawProgressBar{w: &bar, now: d.now, total: 1000, start: tick, min: 0}
	pb.update(sampling.Progress{Bytes: 500, Lines: 10})
	pb.finish()
	if !strings.Contains(bar.String(), "]  50%  0 MB of 0 MB") || !strings.HasSuffix(bar.String(), "\r\033[K") {
		t.Fatalf("bar %q", bar.String())
	}
}

func TestDrawNeymanAnticipated(t *testing.T) {
	t.Parallel()
	dir := t.TempDir()
	log := writeGenLog(t, dir, "log.csv", loggen.Config{Rows: 4000, Seed: 12})
	ant := filepath.Join(dir, "anticipated.yaml")
	os.WriteFile(ant, []byte("north: 0.01\nsouth: 0.02\neast: 0.05\nwest: 0.1\n"), 0o644)
	out := filepath.Join(dir, "out")
	code, stdout, stderr := runDrawCmd(t, nil, "--plan", drawPlan, "--log", log, "--out", out, "--strata", "region", "--allocation", "neyman", "--anticipated", ant)
	if code != exitOK || !strings.Contains(stdout, "allocation: neyman") {
		t.Fatalf("exit %d\n%s%s", code, stdout, stderr)
	}
	m, _, _ := drawfolder.ReadManifest(filepath.Join(out, "manifest.json"))
	// n_h ∝ N_h·√(p_h(1−p_h)): west (p = 0.1) gets the most, north the least.
	by := map[string]drawfolder.StratumInfo{}
	for _, s := range m.Strata {
		by[s.Label] = s
	}
	if !(by["west"].Sample > by["east"].Sample && by["east"].Sample > by["south"].Sample && by["south"].Sample > by["north"].Sample) || by["west"].Anticipated != 0.1 {
		t.Fatalf("neyman strata %+v", m.Strata)
	}
	if code, stdout, _ = runDrawCmd(t, nil, "--check", out, "--plan", drawPlan, "--log", log); code != exitOK {
		t.Fatalf("check of a neyman draw: %s", stdout)
	}
	os.WriteFile(ant, []byte("north: 0.01\n"), 0o644)
	out2 := filepath.Join(dir, "out2")
	code, _, stderr = runDrawCmd(t, nil, "--plan", drawPlan, "--log", log, "--out", out2, "--strata", "region", "--allocation", "neyman", "--anticipated", ant)
	if code != exitBadInput || !strings.Contains(stderr, `anticipated.yaml: no anticipated error for stratum "east"`) {
		t.Fatalf("missing stratum: exit %d %s", code, stderr)
	}
	if _, err := os.Stat(out2); !os.IsNotExist(err) {
		t.Fatal("output left behind")
	}
}

// Issue 13: before any label, draw says which rule will judge the sample,
// warns of strata left without an item (they count as unknown), and
// refuses to draw a sequential plan with strata.
func TestDrawStatesTheRuleBeforeLabeling(t *testing.T) {
	dir := t.TempDir()
	log := writeGenLog(t, dir, "log.csv", loggen.Config{Rows: 6000, Seed: 4})
	// largest remainder, no minimum, and score bands thin enough to get no item
	out := filepath.Join(dir, "gaps")
	code, stdout, stderr := runDrawCmd(t, nil, "--plan", drawPlan, "--log", log, "--out", out, "--strata", "region,channel",
		"--band", "score=0.001,0.002,0.003", "--rounding", "largest-remainder", "--min-per-stratum", "0")
	if code != exitOK {
		t.Fatalf("exit %d: %s", code, stderr)
	}
	for _, want := range []string{"got no item", "counts all of", "verdict: the stratified count rule", "consumer's risk: at most", "producer's risk:"} {
		if !strings.Contains(stdout, want) {
			t.Errorf("stdout lacks %q:\n%s", want, stdout)
		}
	}
	m, _, err := drawfolder.ReadManifest(filepath.Join(out, drawfolder.ManifestFile))
	if err != nil {
		t.Fatal(err)
	}
	if m.Allocation.Rounding != sampling.RoundLargestRemainder || m.Allocation.MinPerStratum != 0 || !strings.Contains(m.Allocation.Note, "with no item") {
		t.Errorf("manifest allocation %+v", m.Allocation)
	}
	// the default: every stratum gets an item
	out = filepath.Join(dir, "default")
	code, stdout, stderr = runDrawCmd(t, nil, "--plan", drawPlan, "--log", log, "--out", out, "--strata", "region,channel", "--band", "score=0.001,0.002,0.003")
	if code != exitOK || strings.Contains(stdout, "got no item") || !strings.Contains(stdout, "proportional shares rounded up") {
		t.Errorf("default draw: exit %d\n%s%s", code, stdout, stderr)
	}

	// a sequential plan with strata is refused, before the log is read
	p, _, err := planfile.Load(drawPlan)
	if err != nil {
		t.Fatal(err)
	}
	in := p.Inputs
	in.Design = plan.DesignSequential
	seq, err := plan.Build(in, plan.Meta{ToolVersion: p.ToolVersion, Created: p.Created, CreatedFrom: p.CreatedFrom, Seed: p.Seed,
		Classes: p.Classes, Candidates: p.Candidates})
	if err != nil {
		t.Fatal(err)
	}
	if _, err := sequential.Apply(seq, 0); err != nil {
		t.Fatal(err)
	}
	data, err := seq.Marshal()
	if err != nil {
		t.Fatal(err)
	}
	seqPlan := filepath.Join(dir, "seq.yaml")
	if err := os.WriteFile(seqPlan, data, 0o644); err != nil {
		t.Fatal(err)
	}
	out = filepath.Join(dir, "seq")
	code, _, stderr = runDrawCmd(t, nil, "--plan", seqPlan, "--log", log, "--out", out, "--strata", "region")
	if code != exitBadInput || !strings.Contains(stderr, "a sequential plan cannot be drawn with --strata or --band") || !strings.Contains(stderr, "hint:") {
		t.Errorf("sequential with strata: exit %d: %s", code, stderr)
	}
	if _, err := os.Stat(out); !os.IsNotExist(err) {
		t.Errorf("a refused draw left %s behind", out)
	}
}
