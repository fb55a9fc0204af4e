package main

import (
	"encoding/csv"
	"encoding/json"
	"fmt"
	"math/rand/v2"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// measuresAudit writes an invented log of 6 000 decisions (two sections,
// a score with about 3 % true defects scoring high), plans fnr and error
// for one threshold and draws it; it returns the folder's paths and the
// hidden truth by record id.
func measuresAudit(t *testing.T) (dir, planPath, drawDir, drawOut string, truth map[string]string) {
	t.Helper()
	dir = t.TempDir()
	rng := rand.New(rand.NewPCG(14, 2))
	truth = map[string]string{}
	var b strings.Builder
	b.WriteString("record_id,section,score\n")
	for i := range 6000 {
		id := fmt.Sprintf("R%05d", i)
		defect := rng.Float64() < 0.03
		score := rng.Float64() * rng.Float64() * 0.6 // mostly low
		truth[id] = "sound"
		if defect {
			truth[id] = "defect"
			score = 1 - 0.6*rng.Float64()*rng.Float64()
		}
		fmt.Fprintf(&b, "%s,%s,%.4f\n", id, []string{"north", "south"}[i%2], score)
	}
	logPath := filepath.Join(dir, "log.csv")
	if err := os.WriteFile(logPath, []byte(b.String()), 0o644); err != nil {
		t.Fatal(err)
	}
	planPath = filepath.Join(dir, "plan.yaml")
	if code, _, stderr := runTest(t, []string{"plan", "--confidence", "0.95", "--producer-risk", "0.1", "--thresholds", "score:0.5",
		"--positive", "defect", "--negative", "sound", "--measure", "fnr:0.3", "--measure", "error:0.05", "--anticipated", "fnr:0.1",
		"--anticipated", "error:0.01", "--prevalence", "0.03", "--decisions", "6000", "--release", "best:fnr", "--out", planPath}); code != exitOK {
		t.Fatalf("plan: exit %d: %s", code, stderr)
	}
	drawDir = filepath.Join(dir, "draw")
	code, stdout, stderr := runTest(t, []string{"draw", "--plan", planPath, "--log", logPath, "--out", drawDir, "--strata", "section", "-q"})
	if code != exitOK {
		t.Fatalf("draw: exit %d: %s", code, stderr)
	}
	return dir, planPath, drawDir, stdout, truth
}

// labelTop writes a copy of the worksheet with its first k sample items
// labeled from the truth.
func labelTop(t *testing.T, drawDir, out string, k int, truth map[string]string) {
	t.Helper()
	f, err := os.Open(filepath.Join(drawDir, "worksheet.csv"))
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	rows, err := csv.NewReader(f).ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	col := map[string]int{}
	for j, h := range rows[0] {
		col[h] = j
	}
	for i := 1; i < len(rows) && i <= k; i++ {
		if j, ok := col["spare"]; ok && rows[i][j] != "" {
			continue
		}
		rows[i][col["label"]] = truth[rows[i][col["record_id"]]]
	}
	g, err := os.Create(out)
	if err != nil {
		t.Fatal(err)
	}
	w := csv.NewWriter(g)
	w.WriteAll(rows)
	if err := g.Close(); err != nil {
		t.Fatal(err)
	}
}

// TestDrawAndProgressMeasures: draw prints each claim's counted items, the
// counts it accepts and its producer's risk (no base count rule), and
// progress assesses a labeled prefix claim by claim, in the table and in
// --json, deciding every claim once all is labeled.
func TestDrawAndProgressMeasures(t *testing.T) {
	t.Parallel()
	dir, planPath, drawDir, drawOut, truth := measuresAudit(t)
	for _, want := range []string{"verdict: each claim by its own exact test", "accepts at most", "producer's risk", "score>=0.5", "fnr < 30 %", "error < 5 %", "false alarms", "design: "} {
		if !strings.Contains(drawOut, want) {
			t.Errorf("draw output lacks %q:\n%s", want, drawOut)
		}
	}
	if strings.Contains(drawOut, "stratified count rule") || strings.Contains(drawOut, "the plan's c =") {
		t.Errorf("draw prints the base plan's count rule for a plan with measures:\n%s", drawOut)
	}
	// --json: the same tests, as one object
	code, stdout, stderr := runTest(t, []string{"draw", "--plan", planPath, "--log", filepath.Join(dir, "log.csv"), "--out", filepath.Join(dir, "draw2"),
		"--strata", "section", "-q", "--json"})
	if code != exitOK {
		t.Fatalf("draw --json: exit %d: %s", code, stderr)
	}
	var dj struct {
		SampleSize int `json:"sample_size"`
		Measures   struct {
			Labels int `json:"labels"`
			Claims []struct {
				Measure      string `json:"measure"`
				Counted      int    `json:"counted"`
				AcceptEvents int    `json:"accept_events"`
				AcceptOther  *int   `json:"accept_other"`
			} `json:"claims"`
		} `json:"measures"`
	}
	if err := json.Unmarshal([]byte(stdout), &dj); err != nil {
		t.Fatalf("draw --json: %v:\n%s", err, stdout)
	}
	if len(dj.Measures.Claims) != 2 || dj.Measures.Labels != dj.SampleSize || dj.Measures.Claims[0].AcceptOther == nil || dj.Measures.Claims[1].AcceptOther != nil ||
		!strings.Contains(drawOut, fmt.Sprintf("%d wrong", dj.Measures.Claims[1].AcceptEvents)) {
		t.Errorf("draw --json: %s", stdout)
	}
	labels := filepath.Join(dir, "labels.csv")
	labelTop(t, drawDir, labels, 50, truth)
	code, stdout, stderr = runTest(t, []string{"progress", "--plan", planPath, "--draw", drawDir, "--labels", labels})
	if code != exitOK {
		t.Fatalf("progress: exit %d: %s", code, stderr)
	}
	for _, want := range []string{"Plan with measures:", "Labeled from the top: 50 of", "claim", "labeled/counted", "fnr < 30 %", "Release (best:fnr): not decided yet.", "Continue: at most"} {
		if !strings.Contains(stdout, want) {
			t.Errorf("progress output lacks %q:\n%s", want, stdout)
		}
	}
	labelTop(t, drawDir, labels, 1<<30, truth)
	code, stdout, stderr = runTest(t, []string{"progress", "--plan", planPath, "--draw", drawDir, "--labels", labels, "--json"})
	if code != exitOK {
		t.Fatalf("progress --json: exit %d: %s", code, stderr)
	}
	var rep struct {
		Labeled int `json:"labeled"`
		Claims  []struct {
			Candidate, Measure, Decision string
			Counted, Labeled             int
		} `json:"claims"`
		ReleaseDecided bool `json:"release_decided"`
		MaxRemaining   int  `json:"max_remaining"`
	}
	if err := json.Unmarshal([]byte(stdout), &rep); err != nil {
		t.Fatalf("%v:\n%s", err, stdout)
	}
	if len(rep.Claims) != 2 || rep.MaxRemaining != 0 || !rep.ReleaseDecided {
		t.Fatalf("fully labeled: %s", stdout)
	}
	for _, c := range rep.Claims {
		if c.Decision == "continue" || c.Labeled != c.Counted {
			t.Errorf("fully labeled, %s of %s: %+v", c.Measure, c.Candidate, c)
		}
	}
}
