package main

import (
	"bytes"
	"encoding/json"
	"fmt"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"
	"time"

	"probity/plan"
	"probity/plan/planfile"
	"probity/sampling/loggen"
)

// planRandom is the plan tests' random stream, bytes 0x00, 0x01, …, 0x3f
// (the seed of a plan written without --seed).
func planRandom() testOption {
	random := make([]byte, 64)
	for i := range random {
		random[i] = byte(i)
	}
	return withRandom(random)
}

// runPlanCmd runs probity plan with test deps: a clock with a zone and
// nanoseconds (the plan's date must not depend on them) and planRandom.
func runPlanCmd(t *testing.T, args ...string) (int, string, string) {
	t.Helper()
	return runTest(t, append([]string{"plan"}, args...),
		atTime(time.Date(2026, 11, 30, 9, 15, 42, 123456789, time.FixedZone("x", 3600))), planRandom())
}

func TestPlanIssueExample(t *testing.T) {
	t.Parallel()
	code, out, errOut := runPlanCmd(t, "--ceiling", "0.02", "--confidence", "0.95", "--anticipated", "0.01")
	if code != exitOK || errOut != "" {
		t.Fatalf("exit %d, stderr %q", code, errOut)
	}
	for _, want := range []string{
		"Label 1,271 decisions drawn at random from the prediction log; accept the model if at most 17 of them are errors.",
		"exact binomial                            1,271  (this plan)",
		"Hoeffding                                18,208",
		"producer's risk: a model whose true error is the anticipated 1 % fails with probability 9.323 % (allowed 10 %).",
		"2 %          4.988 %  ceiling",
	} {
		if !strings.Contains(out, want) {
			t.Errorf("output lacks %q:\n%s", want, out)
		}
	}
}

// A candidate name with > (a threshold's) reads as it is in --json output,
// never as JSON's HTML escape \u003e (issue 16 item 14).
func TestPlanJSONWithoutEscapes(t *testing.T) {
	for _, extra := range [][]string{nil, {"--multiplicity", "holm"}} {
		args := append([]string{"--confidence", "0.95", "--ceiling", "0.02", "--thresholds", "s:0.5,0.6", "--positive", "a", "--negative", "b", "--json"}, extra...)
		code, out, errOut := runPlanCmd(t, args...)
		if code != exitOK || strings.Contains(out, `\u00`) {
			t.Errorf("%v: exit %d %s\n%s", extra, code, errOut, out)
		}
	}
}

func TestPlanJSON(t *testing.T) {
	t.Parallel()
	code, out, errOut := runPlanCmd(t, "--ceiling", "0.02", "--confidence", "0.95", "--anticipated", "0.01", "--json")
	if code != exitOK || errOut != "" {
		t.Fatalf("exit %d, stderr %q", code, errOut)
	}
	var j map[string]any
	if err := json.Unmarshal([]byte(out), &j); err != nil {
		t.Fatalf("not one JSON object: %v\n%s", err, out)
	}
	for _, k := range []string{"sample_size", "acceptance_number", "consumer_risk", "producer_risk", "per_candidate_risk", "method", "multiplicity", "comparison", "oc"} {
		if _, ok := j[k]; !ok {
			t.Errorf("JSON lacks %q", k)
		}
	}
	if j["sample_size"] != 1271.0 || j["acceptance_number"] != 17.0 || j["method"] != "exact" || j["multiplicity"] != "bonferroni" {
		t.Errorf("JSON plan: %v", j)
	}
	if cmp := j["comparison"].(map[string]any); cmp["exact-binomial"] != 1271.0 || cmp["hoeffding"] == nil {
		t.Errorf("comparison = %v", cmp)
	}
	oc := j["oc"].([]any)
	first := oc[0].(map[string]any)
	if len(oc) != 21 || first["error"] != 0.0 || first["accept_probability"] != 1.0 {
		t.Errorf("oc = %v", oc)
	}
	// without p0 the producer's risk is null and the half-ceiling rejection given
	_, out, _ = runPlanCmd(t, "--ceiling", "0.02", "--confidence", "0.95", "--json")
	j = nil
	if err := json.Unmarshal([]byte(out), &j); err != nil {
		t.Fatal(err)
	}
	if v, ok := j["producer_risk"]; !ok || v != nil {
		t.Errorf("producer_risk = %v, want null", v)
	}
	if j["sample_size"] != 149.0 || j["acceptance_number"] != 0.0 || j["reject_at_half_ceiling"] == nil {
		t.Errorf("zero-failure JSON: %v", j)
	}
}

func TestPlanOutFile(t *testing.T) {
	t.Parallel()
	dir := t.TempDir()
	path := filepath.Join(dir, "plan.yaml")
	code, out, errOut := runPlanCmd(t, "--ceiling", "0.02", "--confidence", "0.95", "--anticipated", "0.01",
		"--thresholds", "score:0.50,0.70", "--positive", "fraud", "--negative", "ok", "--multiplicity", "fixed-sequence",
		"--require", "any", "--system", "claims-triage", "--system-version", "4.2", "--out", path)
	if code != exitOK || errOut != "" {
		t.Fatalf("exit %d, stderr %q", code, errOut)
	}
	f, fp, err := planfile.Load(path)
	if err != nil {
		t.Fatal(err)
	}
	if f.Seed != "000102030405060708090a0b0c0d0e0f" {
		t.Errorf("seed %q, want the first 16 random bytes in hex", f.Seed)
	}
	if want := time.Date(2026, 11, 30, 8, 15, 42, 0, time.UTC); !f.Created.Equal(want) || f.Created.Location() != time.UTC {
		t.Errorf("created %v, want %v (UTC, to the second)", f.Created, want)
	}
	if f.ToolVersion != "0.1.0-test" || f.System != "claims-triage" || f.SystemVersion != "4.2" {
		t.Errorf("metadata: %q %q %q", f.ToolVersion, f.System, f.SystemVersion)
	}
	if f.Inputs.CandidateCount != 2 || len(f.Candidates) != 2 || f.Candidates[0].Name != "score>=0.50" || f.Candidates[1].Name != "score>=0.70" ||
		*f.Candidates[1].Threshold != 0.7 || f.Inputs.Require != plan.RequireAny || f.Inputs.Design != plan.DesignFixed {
		t.Errorf("candidates/inputs: %+v %+v", f.Inputs, f.Candidates)
	}
	if strings.Join(f.Classes, ",") != "fraud,ok" || f.Rule.SampleSize != 1271 {
		t.Errorf("classes %v, n %d (fixed-sequence keeps the full δ)", f.Classes, f.Rule.SampleSize)
	}
	if !strings.Contains(out, fp) {
		t.Errorf("report does not show the fingerprint %s", fp)
	}
	before, _ := os.ReadFile(path)
	// an existing file is refused without --force and left as it was
	code, _, errOut = runPlanCmd(t, "--ceiling", "0.03", "--confidence", "0.95", "--out", path)
	if after, _ := os.ReadFile(path); code != exitBadInput || !bytes.Equal(before, after) ||
		errOut != "probity: --out "+path+" already exists\nhint: add --force to replace it, or choose another name\n" {
		t.Errorf("overwrite without --force: exit %d, stderr %q", code, errOut)
	}
	code, _, _ = runPlanCmd(t, "--ceiling", "0.03", "--confidence", "0.95", "--out", path, "--force")
	if g, _, err := planfile.Load(path); code != exitOK || err != nil || g.Inputs.Ceiling != 0.03 {
		t.Errorf("--force: exit %d, %v", code, err)
	}
	// --seed is used exactly as written
	seeded := filepath.Join(dir, "seeded.yaml")
	if code, _, errOut := runPlanCmd(t, "--ceiling", "0.02", "--confidence", "0.95", "--seed", "audit-2026-11", "--out", seeded); code != exitOK {
		t.Fatalf("--seed: exit %d %s", code, errOut)
	}
	if g, _, _ := planfile.Load(seeded); g.Seed != "audit-2026-11" {
		t.Errorf("seed %q", g.Seed)
	}
	if entries, _ := os.ReadDir(dir); len(entries) != 2 {
		t.Errorf("folder holds %d entries, want plan.yaml and seeded.yaml only", len(entries))
	}
}

// Bad input: one sentence naming the flag on stderr, exit 2, nothing on
// stdout and no plan file (nor temporary file) left behind.
func TestPlanBadInput(t *testing.T) {
	t.Parallel()
	for _, tc := range []struct {
		args []string
		want string
	}{
		{[]string{"--ceiling", "1.5", "--confidence", "0.95"}, "probity: --ceiling 1.5: must be between 0 and 1 (exclusive)\n"},
		{[]string{"--ceiling", "0", "--confidence", "0.95"}, "probity: --ceiling 0: must be between 0 and 1 (exclusive)\n"},
		{[]string{"--ceiling", "0.02", "--confidence", "1"}, "probity: --confidence 1: must be between 0 and 1 (exclusive)\n"},
		{[]string{"--ceiling", "2%", "--confidence", "0.95"}, "probity: --ceiling \"2%\" is not a number\n"},
		{[]string{"--ceiling", "0.02", "--confidence", "0.95", "--anticipated", "0.02"}, "probity: --anticipated 0.02: must be at least 0 and below the ceiling 0.02\n"},
		{[]string{"--ceiling", "0.02", "--confidence", "0.95", "--producer-risk", "1.2"}, "probity: --producer-risk 1.2: must be between 0 and 1 (exclusive)\n"},
		{[]string{"--ceiling", "0.02", "--confidence", "0.95", "--candidates", "0"}, "probity: --candidates 0: must be between 1 and 1000000\n"},
		{[]string{"--ceiling", "0.02", "--confidence", "0.95", "--candidates", "two"}, "probity: --candidates \"two\" is not a whole number\n"},
		{[]string{"--ceiling", "0.02", "--confidence", "0.95", "--method", "wald"}, "probity: --method \"wald\": must be one of exact, hoeffding, kl\n"},
		{[]string{"--ceiling", "0.02", "--confidence", "0.95", "--multiplicity", "sidak"}, "probity: --multiplicity \"sidak\": must be one of bonferroni, holm, fixed-sequence\n"},
		{[]string{"--ceiling", "0.02", "--confidence", "0.95", "--design", "adaptive"}, "probity: --design \"adaptive\": must be fixed or sequential\n"},
		{[]string{"--ceiling", "0.001", "--confidence", "0.999", "--population", "500"},
			"probity: --population 500 is smaller than the plan needs: the guarantee would need every decision in the batch labeled\nhint: raise --ceiling, or lower --confidence; or label the whole batch\n"},
		{[]string{"--ceiling", "1e-9", "--confidence", "0.999"},
			"probity: the plan would need more than 100000000 labels; relax --ceiling or --confidence\nhint: raise --ceiling, or lower --confidence\n"},
		{[]string{"--ceiling", "0.02", "--confidence", "0.95", "--anticipated", "0.01999"},
			"probity: the plan would need more than 100000000 labels; relax --anticipated or --producer-risk\nhint: lower --anticipated (further below the ceiling), or allow a larger --producer-risk\n"},
		{[]string{"--ceiling", "0.02", "--confidence", "0.95", "--candidates", "3", "--candidate", "a=pa", "--classes", "x,y"},
			"probity: --candidates 3 disagrees with the 1 candidates declared\nhint: drop --candidates: M follows from the declared candidates\n"},
		{[]string{"--ceiling", "0.02", "--confidence", "0.95", "--candidate", "a=pa"},
			"probity: --classes is required with --candidate: the label values a labeler may give\nhint: e.g. --classes spam,ham\n"},
		{[]string{"--ceiling", "0.02", "--confidence", "0.95", "--thresholds", "score:0.5,x", "--positive", "p", "--negative", "n"}, "probity: --thresholds: \"x\" is not a number\n"},
		{[]string{"--ceiling", "0.02", "--confidence", "0.95", "--thresholds", "score:0.5"},
			"probity: --thresholds needs --positive and --negative, two different labels\nhint: e.g. --positive fraud --negative ok\n"},
		{[]string{"--confidence", "0.95"}, "probity: --ceiling is required: the error rate that must not be exceeded\nhint: e.g. --ceiling 0.02 for 2%\n"},
		{[]string{"--budget", "500", "--confidence", "0.95", "--anticipated", "0.01"}, "probity: --anticipated has no effect with --budget, which makes no plan\nhint: drop --budget to make a plan\n"},
	} {
		dir := t.TempDir()
		path := filepath.Join(dir, "plan.yaml")
		code, out, errOut := runPlanCmd(t, append(tc.args, "--out", path)...)
		if tc.args[0] == "--budget" {
			code, out, errOut = runPlanCmd(t, tc.args...)
		}
		if code != exitBadInput || out != "" || errOut != tc.want {
			t.Errorf("%v: exit %d, stdout %q, stderr %q; want exit 2, stderr %q", tc.args, code, out, errOut, tc.want)
		}
		if entries, _ := os.ReadDir(dir); len(entries) != 0 {
			t.Errorf("%v: left %d files behind", tc.args, len(entries))
		}
	}
	// --out into a missing folder
	missing := filepath.Join(t.TempDir(), "no-such-dir", "plan.yaml")
	code, _, errOut := runPlanCmd(t, "--ceiling", "0.02", "--confidence", "0.95", "--out", missing)
	if code != exitBadInput || !strings.Contains(errOut, "does not exist") {
		t.Errorf("missing folder: exit %d, %q", code, errOut)
	}
}

func TestPlanBudget(t *testing.T) {
	t.Parallel()
	code, out, errOut := runPlanCmd(t, "--budget", "500", "--confidence", "0.95", "--ceiling", "0.02")
	if code != exitOK || errOut != "" {
		t.Fatalf("exit %d, stderr %q", code, errOut)
	}
	// 1 − 0.05^(1/500) = 0.5974% (closed form of the zero-error bound)
	for _, want := range []string{"0        0.598 %", "For the ceiling 2 % these labels allow at most 4 errors."} {
		if !strings.Contains(out, want) {
			t.Errorf("budget output lacks %q:\n%s", want, out)
		}
	}
	_, out, _ = runPlanCmd(t, "--budget", "100", "--confidence", "0.95", "--ceiling", "0.01", "--json")
	var j struct {
		Rows             []plan.BudgetRow `json:"rows"`
		AcceptanceNumber *int             `json:"acceptance_number"`
	}
	if err := json.Unmarshal([]byte(out), &j); err != nil {
		t.Fatal(err)
	}
	if len(j.Rows) != 11 || j.AcceptanceNumber == nil || *j.AcceptanceNumber != -1 {
		t.Errorf("budget JSON: %+v", j)
	}
}

func TestPlanPopulationAndMethods(t *testing.T) {
	t.Parallel()
	code, out, _ := runPlanCmd(t, "--ceiling", "0.02", "--confidence", "0.95", "--anticipated", "0.01", "--population", "20000")
	if code != exitOK || !strings.Contains(out, "Label 1,199 decisions drawn at random from the batch of 20,000; accept the model if at most 16") ||
		!strings.Contains(out, "a batch with 400 or more errors") {
		t.Errorf("population plan:\n%s", out)
	}
	for _, m := range []string{"hoeffding", "kl"} {
		code, out, errOut := runPlanCmd(t, "--ceiling", "0.02", "--confidence", "0.95", "--anticipated", "0.01", "--method", m, "--json")
		var j struct {
			N          int              `json:"sample_size"`
			Model      string           `json:"model"`
			Comparison map[string]int64 `json:"comparison"`
		}
		if code != exitOK {
			t.Fatalf("%s: exit %d %s", m, code, errOut)
		}
		if err := json.Unmarshal([]byte(out), &j); err != nil {
			t.Fatal(err)
		}
		if j.Model != m || int64(j.N) != j.Comparison[m] || j.N <= 1271 {
			t.Errorf("--method %s: n %d, model %s, comparison %v", m, j.N, j.Model, j.Comparison)
		}
	}
}

// Issue 13: a plan can be sized for the stratified design the draw will
// make — the strata, the allocation, the minimum per stratum — with the
// producer's risk of the stratified count rule; the plan file records the
// design and the draw follows its allocation (and refuses another).
func TestPlanStratifiedDesign(t *testing.T) {
	dir := t.TempDir()
	planPath := filepath.Join(dir, "plan.yaml")
	code, out, errOut := runPlanCmd(t, "--ceiling", "0.05", "--confidence", "0.9", "--anticipated", "0.02",
		"--stratum-sizes", "north=3000,south=2000,east=600,west=400", "--allocation", "equal",
		"--candidate", "a=model_a", "--classes", "fraud,ok", "--out", planPath)
	if code != exitOK || errOut != "" {
		t.Fatalf("exit %d\n%s%s", code, out, errOut)
	}
	for _, want := range []string{"Stratified design (equal, at least 1 per stratum), judged by the stratified count rule",
		"counted items", "a simple random sample would need"} {
		if !strings.Contains(out, want) {
			t.Errorf("output lacks %q:\n%s", want, out)
		}
	}
	p, _, err := planfile.Load(planPath)
	if err != nil {
		t.Fatal(err)
	}
	st := p.Stratification
	if st == nil || st.Allocation != "equal" || len(st.Strata) != 4 || st.Strata[0].Label != "east" || p.Rule.ProducerRisk == nil || *p.Rule.ProducerRisk > 0.1 ||
		p.Rule.SampleSize <= st.SimpleRandomSampleSize {
		t.Fatalf("plan %+v, stratification %+v", p.Rule, st)
	}
	// an edited design is refused on load (verdict.CheckStratification)
	data, err := os.ReadFile(planPath)
	if err != nil {
		t.Fatal(err)
	}
	for _, e := range []struct{ from, to, field string }{
		{fmt.Sprintf("acceptance_number: %d\n", p.Rule.AcceptanceNumber), fmt.Sprintf("acceptance_number: %d\n", p.Rule.AcceptanceNumber+1), "rule.acceptance_number"},
		{fmt.Sprintf("counted: [%d,", st.Counted[0]), fmt.Sprintf("counted: [%d,", st.Counted[0]-1), "stratification.counted"},
		{fmt.Sprintf("simple_random_sample_size: %d", st.SimpleRandomSampleSize), fmt.Sprintf("simple_random_sample_size: %d", st.SimpleRandomSampleSize+1), "stratification.simple_random_sample_size"},
		{"allocation: equal", "allocation: random", "stratification.allocation"},
	} {
		edited := strings.Replace(string(data), e.from, e.to, 1)
		if edited == string(data) {
			t.Fatalf("%q is not in the plan file:\n%s", e.from, data)
		}
		path := filepath.Join(dir, "edited.yaml")
		writeFile(t, path, []byte(edited))
		if _, _, err := planfile.Load(path); err == nil || !strings.Contains(err.Error(), "field "+e.field) {
			t.Errorf("%s edited: %v", e.field, err)
		}
	}
	// a zero-failure plan for strata loads as written
	zf := filepath.Join(dir, "zf.yaml")
	if code, out, errOut := runPlanCmd(t, "--ceiling", "0.05", "--confidence", "0.9", "--stratum-sizes", "north=3000,south=2000,east=600,west=400",
		"--allocation", "equal", "--candidate", "a=model_a", "--classes", "fraud,ok", "--out", zf); code != exitOK {
		t.Fatalf("zero-failure: exit %d\n%s%s", code, out, errOut)
	}
	if _, _, err := planfile.Load(zf); err != nil {
		t.Errorf("zero-failure plan for strata: %v", err)
	}
	// the draw takes the plan's allocation, and refuses another
	log := writeGenLog(t, dir, "log.csv", loggen.Config{Rows: 6000, Seed: 4})
	drawDir := filepath.Join(dir, "draw")
	code, stdout, stderr := runDrawCmd(t, nil, "--plan", planPath, "--log", log, "--out", drawDir, "--strata", "region")
	if code != exitOK || !strings.Contains(stdout, "allocation: equal") || !strings.Contains(stdout, "verdict: the stratified count rule") {
		t.Fatalf("draw: exit %d\n%s%s", code, stdout, stderr)
	}
	code, _, stderr = runDrawCmd(t, nil, "--plan", planPath, "--log", log, "--out", filepath.Join(dir, "other"), "--strata", "region", "--allocation", "proportional")
	if code != exitBadInput || !strings.Contains(stderr, "differs from the plan's equal allocation") {
		t.Errorf("another allocation: exit %d: %s", code, stderr)
	}
	// design flags without strata, and strata with a sequential design, are refused
	if code, _, stderr := runPlanCmd(t, "--ceiling", "0.05", "--confidence", "0.9", "--allocation", "equal"); code != exitBadInput || !strings.Contains(stderr, "--stratum-sizes") {
		t.Errorf("--allocation alone: exit %d: %s", code, stderr)
	}
	if code, _, stderr := runPlanCmd(t, "--ceiling", "0.05", "--confidence", "0.9", "--anticipated", "0.02", "--design", "sequential", "--stratum-sizes", "a=10,b=20"); code != exitBadInput || !strings.Contains(stderr, "sequential") {
		t.Errorf("sequential with strata: exit %d: %s", code, stderr)
	}
}

// Issue 13 item 8: a sequential plan on a batch prints its OC curve from
// the hypergeometric model its stated risks use, so the ceiling row is the
// stated consumer's risk (never above the allowed risk) and 1 − the
// anticipated row is the stated producer's risk — also where ceiling·N is
// not a whole number (40 033: ⌈800.66⌉ = 801 errors, ⌊400.33⌋ = 400).
func TestPlanSequentialBatchOC(t *testing.T) {
	for _, N := range []string{"40000", "40033"} {
		code, stdout, stderr := runPlanCmd(t, "--ceiling", "0.02", "--confidence", "0.95", "--anticipated", "0.01",
			"--design", "sequential", "--population", N, "--json")
		if code != exitOK {
			t.Fatalf("population %s: exit %d: %s", N, code, stderr)
		}
		var out struct {
			ConsumerRisk     float64 `json:"consumer_risk"`
			ProducerRisk     float64 `json:"producer_risk"`
			PerCandidateRisk float64 `json:"per_candidate_risk"`
			Population       int64   `json:"population"`
			BadLotErrors     int64   `json:"bad_lot_errors"`
			GoodLotErrors    int64   `json:"good_lot_errors"`
			OC               []struct {
				Error  float64 `json:"error"`
				Accept float64 `json:"accept_probability"`
			} `json:"oc"`
		}
		if err := json.Unmarshal([]byte(stdout), &out); err != nil {
			t.Fatal(err)
		}
		at := func(d int64) (float64, bool) {
			for _, r := range out.OC {
				if r.Error == float64(d)/float64(out.Population) {
					return r.Accept, true
				}
			}
			return 0, false
		}
		bad, ok1 := at(out.BadLotErrors)
		good, ok0 := at(out.GoodLotErrors)
		if !ok1 || !ok0 {
			t.Fatalf("population %s: no OC row at %d or %d errors: %+v", N, out.BadLotErrors, out.GoodLotErrors, out.OC)
		}
		if bad > out.PerCandidateRisk || math.Abs(bad-out.ConsumerRisk) > 1e-12 {
			t.Errorf("population %s: OC at the ceiling (%d errors) %v; stated consumer's risk %v, allowed %v", N, out.BadLotErrors, bad, out.ConsumerRisk, out.PerCandidateRisk)
		}
		if math.Abs(1-good-out.ProducerRisk) > 1e-12 {
			t.Errorf("population %s: 1 − OC at %d errors %v; stated producer's risk %v", N, out.GoodLotErrors, 1-good, out.ProducerRisk)
		}
		_, human, _ := runPlanCmd(t, "--ceiling", "0.02", "--confidence", "0.95", "--anticipated", "0.01", "--design", "sequential", "--population", N)
		if want := fmt.Sprintf("ceiling (%d errors in the batch)", out.BadLotErrors); !strings.Contains(human, want) {
			t.Errorf("population %s: the OC table lacks %q:\n%s", N, want, human)
		}
	}
}
