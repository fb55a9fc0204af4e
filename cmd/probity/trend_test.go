package main

import (
	"bytes"
	"crypto/ed25519"
	"encoding/csv"
	"encoding/json"
	"fmt"
	"image/png"
	"os"
	"os/exec"
	"path/filepath"
	"slices"
	"strings"
	"testing"

	"probity/plan"
	"probity/plan/record"
	"probity/plan/record/signature"
	"probity/plan/testkit/golden"
	"probity/plan/testkit/needs"
	trendpkg "probity/plan/trend"
)

// trendMonthly is the year of records the tests read (written by
// go test ./plan/trend -run TestMonthlyFixtures -update).
const trendMonthly = "../../testdata/trend/monthly"

// trendFixtureSeal is the public key the monthly fixtures are sealed with.
const trendFixtureSeal = "../../testdata/trend/fixture-seal.pub"

// trendRun runs probity with args and returns stdout, stderr and the exit
// code, with test deps whose version is a release's (it is printed in the
// chart's PDF). A trend given no trust input trusts the key the monthly
// fixtures are sealed with.
func trendRun(t *testing.T, args ...string) (string, string, int) {
	t.Helper()
	if len(args) > 0 && args[0] == "trend" && !slices.ContainsFunc(args, func(a string) bool {
		return a == "--pub" || a == "--signers" || a == "--allow-unauthenticated"
	}) {
		args = append(args, "--pub", trendFixtureSeal)
	}
	code, stdout, stderr := runTest(t, args, withVersion("0.1.0"))
	return stdout, stderr, code
}

// trendMonth returns the path of one month's record in the fixtures.
func trendMonth(m string) string { return filepath.Join(trendMonthly, m, "record.json") }

// trendGolden compares got with testdata/trend/golden/name (or rewrites it
// with -update).
func trendGolden(t *testing.T, name, got string) {
	t.Helper()
	golden.CompareString(t, filepath.Join("../../testdata/trend/golden", name), got)
}

func TestTrendYearRejectsLatest(t *testing.T) {
	t.Parallel()
	dir := t.TempDir()
	prefix := filepath.Join(dir, "trend")
	out, errOut, code := trendRun(t, "trend", trendMonthly, "--chart", prefix)
	if code != exitRejected {
		t.Fatalf("exit %d, want %d (the 2026-12 record rejects)\n%s", code, exitRejected, errOut)
	}
	if want := "probity: latest period 2026-12 was rejected (record 943118d309a14f4973d4268a080b0444, " + trendMonth("2026-12") + ")\n"; errOut != want {
		t.Errorf("stderr = %q, want %q", errOut, want)
	}
	trendGolden(t, "year.txt", strings.ReplaceAll(out, dir, "OUT"))
	for _, want := range []string{
		"router-b   flagged: 2026-10, 2026-11, 2026-12",
		"  2026-10      613      5   0.816 %   1.998 %     2 %  ACCEPT  0.03100 ↑ higher",
		"latest period 2026-12 (record 943118d309a14f4973d4268a080b0444): REJECT",
	} {
		if !strings.Contains(out, want) {
			t.Errorf("stdout lacks %q", want)
		}
	}
	pngData, err := os.ReadFile(prefix + ".png")
	if err != nil {
		t.Fatal(err)
	}
	img, err := png.Decode(bytes.NewReader(pngData))
	if err != nil || img.Bounds().Dx() != 1500 {
		t.Fatalf("trend.png: %v, %v", err, img.Bounds())
	}
	pdfData, err := os.ReadFile(prefix + ".pdf")
	if err != nil {
		t.Fatal(err)
	}
	// The same records give the same PDF bytes (its dates are the latest
	// record's, not the clock's).
	prefix2 := filepath.Join(dir, "again")
	if _, _, code := trendRun(t, "trend", trendMonthly, "--chart", prefix2); code != exitRejected {
		t.Fatalf("second run exit %d", code)
	}
	pdf2, _ := os.ReadFile(prefix2 + ".pdf")
	if !bytes.Equal(pdfData, pdf2) {
		t.Error("two runs on the same records wrote different PDFs")
	}
	// And the bytes are the golden ones (pure-Go rasterising and a fixed
	// date make them the same on every machine).
	// The images themselves are kept, so a reviewer can look at a change.
	golden.Compare(t, "../../testdata/trend/golden/year.pdf", pdfData)
	golden.Compare(t, "../../testdata/trend/golden/year.png", pngData)
	entries, _ := os.ReadDir(dir)
	if len(entries) != 4 {
		t.Errorf("chart folder holds %d files, want the 2 PNGs and 2 PDFs (no temporary files)", len(entries))
	}
	trendPDFText(t, prefix+".pdf")
}

// trendPDFText compares the PDF's extracted text with the golden text.
func trendPDFText(t *testing.T, path string) {
	t.Helper()
	txt, err := exec.Command(needs.Program(t, "pdftotext"), "-layout", path, "-").Output()
	if err != nil {
		t.Fatalf("pdftotext: %v", err)
	}
	s := string(txt)
	for _, want := range []string{"Trend of acceptance records — ticket-router 4.2", "Latest period 2026-12: REJECT (record 943118d309a14f4973d4268a080b0444)", "0.03100 ↑", "page 1 of 1"} {
		if !strings.Contains(s, want) {
			t.Errorf("PDF text lacks %q", want)
		}
	}
	trendGolden(t, "year-pdf.txt", s)
}

func TestTrendElevenMonthsAccepts(t *testing.T) {
	t.Parallel()
	args := []string{"trend", "--json"}
	for _, m := range []string{"2026-11", "2026-03", "2026-01", "2026-02", "2026-04", "2026-05", "2026-06", "2026-07", "2026-08", "2026-09", "2026-10"} {
		args = append(args, trendMonth(m))
	}
	out, errOut, code := trendRun(t, args...)
	if code != exitOK || errOut != "" {
		t.Fatalf("exit %d, stderr %q", code, errOut)
	}
	trendGolden(t, "eleven.json", out)
	var rep struct {
		Format     int    `json:"format"`
		Baseline   string `json:"baseline"`
		Candidates []struct {
			Name    string   `json:"name"`
			Flagged []string `json:"flagged"`
			Rows    []struct {
				Period string   `json:"period"`
				PValue *float64 `json:"p_value"`
			} `json:"rows"`
		} `json:"candidates"`
		Latest struct {
			Label   string `json:"period"`
			Verdict string `json:"overall_verdict"`
		} `json:"latest"`
		Chart *struct{} `json:"chart"`
	}
	if err := json.Unmarshal([]byte(out), &rep); err != nil {
		t.Fatal(err)
	}
	if rep.Format != 1 || rep.Baseline != "2026-01" || rep.Latest.Label != "2026-11" || rep.Latest.Verdict != record.Accept || rep.Chart != nil {
		t.Errorf("report header %+v", rep)
	}
	if got := strings.Join(rep.Candidates[1].Flagged, ","); rep.Candidates[1].Name != "router-b" || got != "2026-10,2026-11" {
		t.Errorf("router-b flagged %q", got)
	}
	// Top-level keys in their stable order.
	var keys []string
	dec := json.NewDecoder(strings.NewReader(out))
	dec.Token()
	for dec.More() {
		k, _ := dec.Token()
		keys = append(keys, k.(string))
		var skip json.RawMessage
		dec.Decode(&skip)
	}
	if got := strings.Join(keys, ","); got != "format,tool_version,system,system_version,class,baseline,alpha,test,periods,candidates,latest,warnings,unauthenticated,chart,skipped" {
		t.Errorf("keys %s", got)
	}
}

func TestTrendBaselineAndAlpha(t *testing.T) {
	t.Parallel()
	out, _, code := trendRun(t, "trend", trendMonthly, "--baseline", "2026-06", "--alpha", "0.01")
	if code != exitRejected {
		t.Fatalf("exit %d", code)
	}
	for _, want := range []string{"p ≤ 0.01 per comparison", "p vs 2026-06", "  2026-06      613      3   0.489 %   1.516 %     2 %  ACCEPT  (baseline)"} {
		if !strings.Contains(out, want) {
			t.Errorf("stdout lacks %q", want)
		}
	}
	if strings.Contains(out, "flagged:") {
		t.Errorf("nothing is significant at 0.01 against 2026-06:\n%s", out)
	}
}

// trendWrite writes r as a record folder dir/NAME (name without .json):
// its id recomputed, record.json canonical and sealed (record.sig) with the
// key the monthly fixtures are sealed with, so trend authenticates it. It
// returns the path of record.json.
func trendWrite(t *testing.T, dir, name string, r *record.Record) string {
	t.Helper()
	folder := filepath.Join(dir, strings.TrimSuffix(name, ".json"))
	if err := os.MkdirAll(folder, 0o755); err != nil {
		t.Fatal(err)
	}
	_, key, _ := signature.GenerateKey(bytes.NewReader(bytes.Repeat([]byte{0x7e}, 64)))
	r.SigningKey = signature.Fingerprint(key.Public().(ed25519.PublicKey))
	var err error
	if r.RecordID, err = record.ID(r); err != nil {
		t.Fatal(err)
	}
	data, err := record.Encode(r)
	if err != nil {
		t.Fatal(err)
	}
	p := filepath.Join(folder, record.JSONFile)
	writeFile(t, p, data)
	writeFile(t, filepath.Join(folder, signature.FileName), signature.Sign(key, map[string][]byte{record.JSONFile: data}).Marshal())
	return p
}

func trendLoadMonth(t *testing.T, m string) *record.Record {
	t.Helper()
	data, err := os.ReadFile(trendMonth(m))
	if err != nil {
		t.Fatal(err)
	}
	r, err := record.Decode(data)
	if err != nil {
		t.Fatal(err)
	}
	return r
}

func TestTrendWarnsAboutPlansAndCandidates(t *testing.T) {
	t.Parallel()
	dir := t.TempDir()
	jan := trendLoadMonth(t, "2026-01")
	feb := trendLoadMonth(t, "2026-02")
	feb.Plan.Fingerprint = strings.Repeat("ab", 32)
	feb.Candidates = feb.Candidates[:2]
	a := trendWrite(t, dir, "jan.json", jan)
	b := trendWrite(t, dir, "feb.json", feb)
	_, errOut, code := trendRun(t, "trend", a, b)
	if code != exitOK {
		t.Fatalf("exit %d: %s", code, errOut)
	}
	want := "probity: warning: records come from 2 different plans: plan 7a6421df145c in 2026-01; plan abababababab in 2026-02\n" +
		"probity: warning: candidate sets differ: threshold-0.62 is not in 2026-02\n"
	if errOut != want {
		t.Errorf("stderr =\n%s\nwant\n%s", errOut, want)
	}
}

// trendBad is a run that must fail with exit 2, print the one-line error
// (and hint) and write no chart.
type trendBad struct {
	name  string
	setup func(t *testing.T, dir string) []string // returns the arguments after "trend"
	want  []string                                // substrings of stderr
}

func TestTrendBadInput(t *testing.T) {
	t.Parallel()
	cases := []trendBad{
		{"no arguments", func(t *testing.T, dir string) []string { return nil },
			[]string{"probity: trend needs at least one record.json or folder of records\nhint: "}},
		{"missing file", func(t *testing.T, dir string) []string { return []string{filepath.Join(dir, "nope.json")} },
			[]string{"nope.json: does not exist"}},
		{"not a record", func(t *testing.T, dir string) []string {
			p := filepath.Join(dir, "manifest.json")
			os.WriteFile(p, []byte("{\n  \"seed\": \"ab\"\n}\n"), 0o644)
			return []string{p}
		}, []string{"manifest.json, field format: missing", "hint: trend reads the record.json written by 'probity record'"}},
		{"broken json", func(t *testing.T, dir string) []string {
			p := filepath.Join(dir, "record.json")
			os.WriteFile(p, []byte("{\n  \"format\": 1,\n  \"period\": 2026-01\n}\n"), 0o644)
			return []string{p}
		}, []string{"record.json line 3: is not valid JSON"}},
		{"missing field", func(t *testing.T, dir string) []string {
			data, _ := os.ReadFile(trendMonth("2026-02"))
			data = bytes.Replace(data, []byte(`"upper_bound"`), []byte(`"upper"`), 1)
			p := filepath.Join(dir, "feb.json")
			os.WriteFile(p, data, 0o644)
			return []string{trendMonth("2026-01"), p}
		}, []string{"feb.json line ", ", field candidates[0].upper_bound: missing"}},
		{"repeated period", func(t *testing.T, dir string) []string {
			r := trendLoadMonth(t, "2026-03")
			r.Date = "2026-03-29"
			return []string{trendMonthly, trendWrite(t, dir, "march-again.json", r)}
		}, []string{"period 2026-03 is repeated: " + trendMonth("2026-03") + " and ", filepath.Join("march-again", "record.json") + " are both records of it",
			"hint: keep the record that was signed off"}},
		{"lot plan mixed with stream plan", func(t *testing.T, dir string) []string {
			r := trendLoadMonth(t, "2026-04")
			r.Plan.Model, r.Plan.Population = plan.ModelHypergeometric, 41250
			trendRisks(r)
			return []string{trendMonth("2026-03"), trendWrite(t, dir, "april.json", r)}
		}, []string{filepath.Join("april", "record.json") + ": plan.model is hypergeometric here but binomial in " + trendMonth("2026-03") + " (period 2026-03): records of different classes of plan cannot share a trend",
			"hint: a trend compares audits of one model, method, design, ceiling and confidence"}},
		{"sequential mixed with fixed", func(t *testing.T, dir string) []string {
			r := trendLoadMonth(t, "2026-04")
			r.Plan.Design = plan.DesignSequential
			return []string{trendMonth("2026-03"), trendWrite(t, dir, "april.json", r)}
		}, []string{"plan.design is sequential here but fixed"}},
		{"different ceilings", func(t *testing.T, dir string) []string {
			r := trendLoadMonth(t, "2026-04")
			r.Plan.Ceiling = 0.03
			trendRisks(r)
			return []string{trendMonth("2026-03"), trendWrite(t, dir, "april.json", r)}
		}, []string{"plan.ceiling is 0.03 here but 0.02"}},
		{"edited rule", func(t *testing.T, dir string) []string {
			r := trendLoadMonth(t, "2026-04")
			r.Plan.SampleSize = 60
			return []string{trendMonth("2026-03"), trendWrite(t, dir, "april.json", r)}
		}, []string{"april/record.json line 28, field plan.consumer_risk: states 0.01648, but accepting at most 5 errors in 60 gives 0.9987",
			"hint: the record's rule does not follow from its own inputs"}},
		{"period shapes", func(t *testing.T, dir string) []string {
			r := trendLoadMonth(t, "2026-04")
			r.Period = "2026-4"
			return []string{trendMonth("2026-03"), trendWrite(t, dir, "april.json", r)}
		}, []string{`period "2026-4" is written differently from "2026-03"`, "hint: write every period the same way"}},
		{"no period", func(t *testing.T, dir string) []string {
			r := trendLoadMonth(t, "2026-04")
			r.Period = ""
			return []string{trendWrite(t, dir, "april.json", r)}
		}, []string{filepath.Join("april", "record.json") + " line 9, field period: empty: a trend needs records of audits drawn for a period", "hint: draw each month's sample with 'probity draw --period LABEL'"}},
		{"unknown baseline", func(t *testing.T, dir string) []string { return []string{trendMonthly, "--baseline", "2025-12"} },
			[]string{`baseline period "2025-12" is not among the records`, "hint: the periods are 2026-01, 2026-02"}},
		{"alpha zero", func(t *testing.T, dir string) []string { return []string{trendMonthly, "--alpha", "0"} },
			[]string{"--alpha 0 is outside (0, 0.5]"}},
		{"alpha not a number", func(t *testing.T, dir string) []string { return []string{trendMonthly, "--alpha", "five"} },
			[]string{`invalid argument "five" for "--alpha"`}},
		{"chart with extension", func(t *testing.T, dir string) []string {
			return []string{trendMonthly, "--chart", filepath.Join(dir, "out", "trend.pdf")}
		}, []string{"give a prefix, not a file name"}},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			dir := t.TempDir()
			outDir := filepath.Join(dir, "out")
			os.Mkdir(outDir, 0o755)
			args := append([]string{"trend"}, c.setup(t, dir)...)
			if !strings.Contains(strings.Join(args, " "), "--chart") {
				args = append(args, "--chart", filepath.Join(outDir, "trend"))
			}
			out, errOut, code := trendRun(t, args...)
			if code != exitBadInput {
				t.Fatalf("exit %d, want %d\nstderr: %s", code, exitBadInput, errOut)
			}
			if out != "" {
				t.Errorf("a refused run printed to stdout: %q", out)
			}
			if !strings.HasPrefix(errOut, "probity: ") || strings.Count(errOut, "\n") > 2 {
				t.Errorf("stderr is not one error line (and a hint): %q", errOut)
			}
			for _, w := range c.want {
				if !strings.Contains(errOut, w) {
					t.Errorf("stderr %q lacks %q", errOut, w)
				}
			}
			if left, _ := os.ReadDir(outDir); len(left) != 0 {
				t.Errorf("a refused run left %d files in the chart folder", len(left))
			}
		})
	}
}

func TestTrendOptionsValidate(t *testing.T) {
	t.Parallel()
	dir := t.TempDir()
	good := []trendOptions{
		{alpha: 0.05, pub: []string{"k.pub"}}, {alpha: 0.5, signers: "s.yaml"}, {alpha: 1e-6, chart: filepath.Join(dir, "x"), allowUnauthenticated: true},
		{alpha: 0.05, chart: "trend", pub: []string{"k.pub"}},
	}
	for _, o := range good {
		if err := o.validate(); err != nil {
			t.Errorf("%+v: %v", o, err)
		}
	}
	bad := []trendOptions{
		{alpha: 0, pub: []string{"k.pub"}}, {alpha: 0.51, pub: []string{"k.pub"}}, {alpha: -1, pub: []string{"k.pub"}},
		{alpha: 0.05, chart: dir + string(filepath.Separator), pub: []string{"k.pub"}},
		{alpha: 0.05, chart: filepath.Join(dir, "x.PNG"), pub: []string{"k.pub"}},
		{alpha: 0.05}, // nothing to authenticate the records with
	}
	for _, o := range bad {
		if err := o.validate(); err == nil {
			t.Errorf("%+v accepted", o)
		}
	}
	// Flags parse into the options.
	d, _, _ := newTestDeps()
	cmd := newTrendCommand(d)
	if err := cmd.ParseFlags([]string{"--baseline", "2026-02", "--alpha", "0.1", "--chart", "c/t", "--json"}); err != nil {
		t.Fatal(err)
	}
	for name, want := range map[string]string{"baseline": "2026-02", "alpha": "0.1", "chart": "c/t", "json": "true"} {
		if got := cmd.Flags().Lookup(name).Value.String(); got != want {
			t.Errorf("--%s = %s, want %s", name, got, want)
		}
	}
}

func TestTrendFolderSkipsOtherJSON(t *testing.T) {
	t.Parallel()
	dir := t.TempDir()
	for _, m := range []string{"2026-01", "2026-02"} {
		os.MkdirAll(filepath.Join(dir, m, "draw"), 0o755)
		os.MkdirAll(filepath.Join(dir, m, "record"), 0o755)
		trendWrite(t, filepath.Join(dir, m, "record"), "record.json", trendLoadMonth(t, m))
		os.WriteFile(filepath.Join(dir, m, "draw", "manifest.json"), []byte(`{"format": 1}`), 0o644)
	}
	out, errOut, code := trendRun(t, "trend", dir)
	if code != exitOK {
		t.Fatalf("exit %d: %s", code, errOut)
	}
	want := "probity: note: skipped 2 JSON files that are not records (" + filepath.Join(dir, "2026-01", "draw", "manifest.json") + " and 1 more)\n"
	if errOut != want {
		t.Errorf("stderr = %q, want %q", errOut, want)
	}
	if !strings.Contains(out, "Trend of 2 records, 2026-01 to 2026-02") {
		t.Errorf("stdout:\n%s", out)
	}
}

// TestTrendOfRealRecords runs the whole monthly cycle in-process — plan,
// draw --period, label, record — for two months and reads the two
// record.json files that record wrote: router-b makes no mistakes in
// 2026-01 and one in every 40 rows in 2026-02, so 2026-02 is rejected and
// flagged, with the p-value of Fisher's test on the recorded counts.
func TestTrendOfRealRecords(t *testing.T) {
	t.Parallel()
	dir := t.TempDir()
	at := func(p ...string) string { return filepath.Join(append([]string{dir}, p...)...) }
	planPath := at("plan.yaml")
	if _, e, code := trendRun(t, "plan", "--ceiling", "0.02", "--confidence", "0.95", "--anticipated", "0.005",
		"--candidate", "router-a=pred_a", "--candidate", "router-b=pred_b", "--classes", "billing,tech,account",
		"--system", "ticket-router", "--system-version", "4.2", "--seed", "5be1a2c0f77e4c1d9a0b3e6f28d4c7aa", "--date", "2025-12-15", "--out", planPath); code != exitOK {
		t.Fatalf("plan: exit %d: %s", code, e)
	}
	classes := []string{"billing", "tech", "account"}
	key := at("operator-key")
	if _, e, code := trendRun(t, "keygen", "--out", key); code != exitOK {
		t.Fatalf("keygen: exit %d: %s", code, e)
	}
	for mi, m := range []string{"2026-01", "2026-02"} {
		// The log: 4000 rows; truth cycles through the classes; router-a is
		// always right; router-b is wrong on every 40th row in 2026-02.
		truth := map[string]string{}
		var log strings.Builder
		log.WriteString("record_id,pred_a,pred_b\n")
		for i := 0; i < 4000; i++ {
			id := fmt.Sprintf("t%s-%05d", m, i)
			tr := classes[(i*7+mi)%3]
			truth[id] = tr
			b := tr
			if mi == 1 && i%40 == 0 {
				b = classes[((i*7+mi)+1)%3]
			}
			fmt.Fprintf(&log, "%s,%s,%s\n", id, tr, b)
		}
		logPath := at("log-" + m + ".csv")
		if err := os.WriteFile(logPath, []byte(log.String()), 0o644); err != nil {
			t.Fatal(err)
		}
		drawDir := at("audits", m, "draw")
		if _, e, code := trendRun(t, "draw", "--plan", planPath, "--log", logPath, "--period", m, "--date", fmt.Sprintf("2026-%02d-01T07:00:00Z", mi+2), "--out", drawDir); code != exitOK {
			t.Fatalf("draw %s: exit %d: %s", m, code, e)
		}
		labels := trendLabel(t, filepath.Join(drawDir, "worksheet.csv"), truth)
		labelsPath := at("audits", m, "labels.csv")
		if err := os.WriteFile(labelsPath, labels, 0o644); err != nil {
			t.Fatal(err)
		}
		_, e, code := trendRun(t, "record", "--plan", planPath, "--draw", drawDir, "--labels", labelsPath,
			"--out", at("audits", m, "record"), "--date", fmt.Sprintf("2026-%02d-03", mi+2), "--sign-key", key)
		if code != exitOK && code != exitRejected {
			t.Fatalf("record %s: exit %d: %s", m, code, e)
		}
	}
	out, errOut, code := trendRun(t, "trend", at("audits"), "--json", "--pub", key+".pub")
	if code != exitRejected {
		t.Fatalf("trend: exit %d, want 1 (2026-02 rejects): %s", code, errOut)
	}
	if !strings.Contains(errOut, "probity: note: skipped 2 JSON files that are not records") ||
		!strings.Contains(errOut, "probity: latest period 2026-02 was rejected") {
		t.Errorf("stderr: %s", errOut)
	}
	var rep struct {
		Candidates []struct {
			Name    string   `json:"name"`
			Flagged []string `json:"flagged"`
			Rows    []struct {
				Labeled int      `json:"labeled"`
				Errors  int      `json:"errors"`
				Verdict string   `json:"verdict"`
				PValue  *float64 `json:"p_value"`
			} `json:"rows"`
		} `json:"candidates"`
	}
	if err := json.Unmarshal([]byte(out), &rep); err != nil {
		t.Fatal(err)
	}
	if len(rep.Candidates) != 2 || rep.Candidates[1].Name != "router-b" {
		t.Fatalf("candidates %+v", rep.Candidates)
	}
	b := rep.Candidates[1]
	jan, feb := b.Rows[0], b.Rows[1]
	if jan.Errors != 0 || feb.Errors <= 5 || feb.Verdict != record.Reject || strings.Join(b.Flagged, ",") != "2026-02" {
		t.Fatalf("router-b rows %+v, flagged %v", b.Rows, b.Flagged)
	}
	want, err := trendpkg.FisherExact(trendpkg.Table{A: feb.Errors, B: feb.Labeled - feb.Errors, C: jan.Errors, D: jan.Labeled - jan.Errors}, trendpkg.Greater)
	if err != nil || feb.PValue == nil || *feb.PValue != want {
		t.Errorf("2026-02 p-value %v, want %v (%v)", feb.PValue, want, err)
	}
	if a := rep.Candidates[0]; a.Rows[0].Errors != 0 || a.Rows[1].Errors != 0 || len(a.Flagged) != 0 {
		t.Errorf("router-a %+v", a)
	}
}

// trendLabel fills the label column of a worksheet from truth.
func trendLabel(t *testing.T, worksheet string, truth map[string]string) []byte {
	t.Helper()
	f, err := os.Open(worksheet)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	rows, err := csv.NewReader(f).ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	col := map[string]int{}
	for i, h := range rows[0] {
		col[h] = i
	}
	li, ri := col["label"], col["record_id"]
	for _, r := range rows[1:] {
		r[li] = truth[r[ri]]
	}
	var buf bytes.Buffer
	w := csv.NewWriter(&buf)
	w.WriteAll(rows)
	return buf.Bytes()
}

// TestTrendAuthenticatesEveryRecord: an edited record.json is refused (it
// used to be charted), as is a trend with nothing to trust; with
// --allow-unauthenticated it is charted and every output says so.
func TestTrendAuthenticatesEveryRecord(t *testing.T) {
	t.Parallel()
	dir := t.TempDir()
	months := filepath.Join(dir, "monthly")
	entries, _ := os.ReadDir(trendMonthly)
	for _, e := range entries {
		os.MkdirAll(filepath.Join(months, e.Name()), 0o755)
		for _, f := range []string{"record.json", "record.sig"} {
			writeFile(t, filepath.Join(months, e.Name(), f), mustRead(t, filepath.Join(trendMonthly, e.Name(), f)))
		}
	}
	may := filepath.Join(months, "2026-05", "record.json")
	js := mustRead(t, may)
	writeFile(t, may, bytes.Replace(js, []byte(`"errors": 2,`), []byte(`"errors": 0,`), 1))

	// Nothing to trust: a usage error, before anything is read.
	_, errOut, code := trendRun(t, "trend", months, "--signers", "")
	if code != exitBadInput || !strings.Contains(errOut, "trend authenticates every record it charts") {
		t.Errorf("no trust inputs: exit %d: %s", code, errOut)
	}
	chart := filepath.Join(dir, "out", "trend")
	out, errOut, code := trendRun(t, "trend", months, "--pub", trendFixtureSeal, "--chart", chart)
	if code != exitRejected || out != "" ||
		!strings.Contains(errOut, "probity: "+may+": not authenticated: ") || !strings.Contains(errOut, "the file was changed after signing") ||
		!strings.Contains(errOut, "probity: 1 of 12 records could not be authenticated; nothing was charted") {
		t.Errorf("edited record: exit %d\n%s%s", code, out, errOut)
	}
	if _, err := os.Stat(chart + ".png"); err == nil {
		t.Errorf("a refused trend wrote a chart")
	}

	out, errOut, code = trendRun(t, "trend", months, "--pub", trendFixtureSeal, "--allow-unauthenticated", "--chart", chart)
	if code != exitRejected || !strings.Contains(out, "UNAUTHENTICATED records charted: 2026-05") ||
		!strings.Contains(errOut, "probity: note: "+may+" is charted unauthenticated: ") {
		t.Errorf("allowed: exit %d\n%s%s", code, out, errOut)
	}
	if text := strings.Join(strings.Fields(pdfText(t, chart+".pdf")), " "); !strings.Contains(text, "UNAUTHENTICATED records charted (marked *): 1 of 12, not authenticated by their signatures or not checked: 2026-05") {
		t.Errorf("the chart's PDF does not say what it charted unauthenticated:\n%s", text)
	}
	out, _, _ = trendRun(t, "trend", months, "--allow-unauthenticated", "--json")
	var rep struct {
		Unauthenticated []string `json:"unauthenticated"`
		Periods         []struct {
			Authenticated bool `json:"authenticated"`
		} `json:"periods"`
	}
	if err := json.Unmarshal([]byte(out), &rep); err != nil || len(rep.Unauthenticated) != 12 || rep.Periods[0].Authenticated {
		t.Errorf("nothing trusted: every record is unauthenticated: %v %+v", err, rep)
	}
}

// trendRisks sets the consumer's and producer's risks of a record's fixed
// plan to those of its (n, c) under its model, as a record of such a
// plan would state them.
func trendRisks(r *record.Record) {
	p := &r.Plan
	n, c := p.SampleSize, p.AcceptanceNumber
	if N := int64(p.Population); N > 0 {
		p.ConsumerRisk = plan.HypergeometricCDF(c, N, plan.BadLotErrors(N, p.Ceiling), n)
		pr := plan.HypergeometricSF(c, N, plan.GoodLotErrors(N, *p.Anticipated), n)
		p.ProducerRisk = &pr
		return
	}
	p.ConsumerRisk = plan.BinomialCDF(c, n, p.Ceiling)
	pr := plan.BinomialSF(c, n, *p.Anticipated)
	p.ProducerRisk = &pr
}
