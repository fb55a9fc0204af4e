package main

import (
	"os"
	"path/filepath"
	"strings"
	"testing"

	"probity/sampling/loggen"
)

// refusedDraw runs a draw into a new folder that must be refused: exit 2,
// stderr exactly want (one line per element), and no output folder or
// temporary left behind.
func refusedDraw(t *testing.T, stdin []byte, want []string, args ...string) {
	t.Helper()
	parent := t.TempDir()
	out := filepath.Join(parent, "draw")
	code, stdout, stderr := runDrawCmd(t, stdin, append(args, "--out", out)...)
	if code != exitBadInput {
		t.Fatalf("exit %d, want %d\nstdout: %s\nstderr: %s", code, exitBadInput, stdout, stderr)
	}
	if got := strings.Split(strings.TrimSuffix(stderr, "\n"), "\n"); strings.Join(got, "\n") != strings.Join(want, "\n") {
		t.Fatalf("stderr\n%s\nwant\n%s", stderr, strings.Join(want, "\n"))
	}
	if left := tree(t, parent); len(left) > 0 {
		t.Fatalf("a refused draw left %v behind", left)
	}
}

// writeLog writes a log file into a new temp folder.
func writeLog(t *testing.T, name, content string) string {
	t.Helper()
	p := filepath.Join(t.TempDir(), name)
	if err := os.WriteFile(p, []byte(content), 0o644); err != nil {
		t.Fatal(err)
	}
	return p
}

// TestDrawRefusesIDsNotUTF8 (issue 16, item 5): ids are bytes; one that is
// not valid UTF-8 is refused with its line in CSV, TSV and JSON Lines
// alike (JSON Lines used to rewrite it to U+FFFD).
func TestDrawRefusesIDsNotUTF8(t *testing.T) {
	t.Parallel()
	logs := map[string]string{
		"log.csv":   "record_id,model_a,score\nr1,ok,0.1\nr\xe92,ok,0.2\n",
		"log.tsv":   "record_id\tmodel_a\tscore\nr1\tok\t0.1\nr\xe92\tok\t0.2\n",
		"log.jsonl": "{\"record_id\":\"r1\",\"model_a\":\"ok\",\"score\":0.1}\n{\"record_id\":\"r\xe92\",\"model_a\":\"ok\",\"score\":0.2}\n",
	}
	for name, content := range logs {
		log := writeLog(t, name, content)
		line := "3"
		if name == "log.jsonl" {
			line = "2"
		}
		refusedDraw(t, nil, []string{
			"probity: " + log + " line " + line + `, field record_id: the record id "r\xe92" is not valid UTF-8 (byte 0xe9 at byte 2)`,
			"hint: ids and strata values are kept exactly as bytes; convert the log to UTF-8 (e.g. iconv -f latin1 -t utf-8), and take the ids from the converted log everywhere",
		}, "--plan", drawPlan, "--log", log, "--dedupe", "first")
	}
}

// TestDrawBoundsMemory (issue 16, item 6): a log without line ends, a
// line over the limit and spares beyond the sample are refused before
// memory grows with them; --max-line raises the limit.
func TestDrawBoundsMemory(t *testing.T) {
	t.Parallel()
	long := writeLog(t, "long.csv", "record_id,model_a,score,text\nr1,ok,0.1,"+strings.Repeat("x", 2<<20)+"\n")
	refusedDraw(t, nil, []string{
		"probity: " + long + " line 2: the line is longer than 1 MiB",
		"hint: a log holds one record per line; if its lines really are this long, raise the limit with --max-line, e.g. --max-line 256MiB",
	}, "--plan", drawPlan, "--log", long, "--max-line", "1MiB")
	refusedDraw(t, nil, []string{
		"probity: --max-line \"16 furlongs\" is not a size from 1 byte to 1 TiB",
		"hint: e.g. --max-line 64MiB",
	}, "--plan", drawPlan, "--log", long, "--max-line", "16 furlongs")
	if _, err := os.Stat("/dev/zero"); err == nil {
		refusedDraw(t, nil, []string{
			"probity: /dev/zero line 1: the line is longer than 16 MiB and holds NUL bytes: this is not a text log",
			"hint: give a CSV, TSV or JSON Lines file, optionally gzip-compressed",
		}, "--plan", drawPlan, "--log", "/dev/zero")
	}
	log := writeGenLog(t, t.TempDir(), "log.csv", loggen.Config{Rows: 2000, Seed: 61})
	refusedDraw(t, nil, []string{
		"probity: --spare 99999999999: at most the sample size 581 per stratum",
		"hint: spares replace the few items that cannot be labeled; a handful per stratum is usual",
	}, "--plan", drawPlan, "--log", log, "--spare", "99999999999")
}

// TestPlanJSONIsNotAPlanFile (issue 16, item 12): the JSON report of plan
// --json given as --plan is refused in one line saying what it is (before:
// 26 lines of Go type names).
func TestPlanJSONIsNotAPlanFile(t *testing.T) {
	t.Parallel()
	code, report, stderr := runProbity(t, "plan", "--ceiling", "0.05", "--confidence", "0.9", "--candidate", "a=model_a", "--classes", "ok,fraud", "--json")
	if code != exitOK {
		t.Fatal(stderr)
	}
	path := writeLog(t, "plan.json", report)
	log := writeGenLog(t, t.TempDir(), "log.csv", loggen.Config{Rows: 500, Seed: 12})
	refusedDraw(t, nil, []string{
		"probity: " + path + ": this is a plan's JSON report, not the plan file",
		"hint: pass the YAML plan file probity plan writes (plan.yaml); the JSON it prints describes the plan but is not it",
	}, "--plan", path, "--log", log)
}

// TestOutInAFolderThatTakesNoFiles (issue 16, item 13): --out under /proc,
// which exists but takes no new folders, says so (it used to say that
// /proc does not exist, then only "no such file or directory").
func TestOutInAFolderThatTakesNoFiles(t *testing.T) {
	t.Parallel()
	if err := os.Mkdir("/proc/probity-test", 0o755); err == nil || !os.IsNotExist(err) {
		os.Remove("/proc/probity-test")
		t.Skip("no /proc that refuses new folders here")
	}
	log := writeGenLog(t, t.TempDir(), "log.csv", loggen.Config{Rows: 1000, Seed: 13})
	code, stdout, stderr := runDrawCmd(t, nil, "--plan", drawPlan, "--log", log, "--out", "/proc/probity-test/draw")
	want := "probity: /proc/probity-test: cannot write: /proc exists but does not take new files or folders\nhint: choose a folder on an ordinary disk\n"
	if code != exitBadInput || stderr != want || stdout != "" {
		t.Fatalf("exit %d\n%s%s\nwant\n%s", code, stdout, stderr, want)
	}
}

// TestPluralForms (issue 16, item 18): counts of one take the singular
// ("in 1 strata" and "at most 1 errors" before).
func TestPluralForms(t *testing.T) {
	t.Parallel()
	log := writeGenLog(t, t.TempDir(), "log.csv", loggen.Config{Rows: 2000, Seed: 14})
	out := filepath.Join(t.TempDir(), "draw")
	code, stdout, stderr := runDrawCmd(t, nil, "--plan", drawPlan, "--log", log, "--out", out, "--spare", "1")
	if code != exitOK || !strings.Contains(stdout, "drew 581 items and 1 spare from 2000 rows in scope (2000 read) in 1 stratum into") {
		t.Errorf("draw: exit %d\n%s%s", code, stdout, stderr)
	}
	code, stdout, stderr = runProbity(t, "plan", "--budget", "100", "--confidence", "0.9", "--ceiling", "0.05")
	if code != exitOK || !strings.Contains(stdout, "For the ceiling 5 % these labels allow at most 1 error.") {
		t.Errorf("plan --budget: exit %d\n%s%s", code, stdout, stderr)
	}
}

// TestBudgetRefusesWhatItIgnores (issue 16, item 18): with --budget every
// flag that only shapes a plan is refused rather than silently ignored.
func TestBudgetRefusesWhatItIgnores(t *testing.T) {
	t.Parallel()
	for _, f := range [][]string{{"--producer-risk", "0.2"}, {"--require", "any"}, {"--seed", "abc"}, {"--system", "x"}, {"--classes", "a,b"}} {
		code, stdout, stderr := runProbity(t, append([]string{"plan", "--budget", "100", "--confidence", "0.9"}, f...)...)
		want := "probity: " + f[0] + " has no effect with --budget, which makes no plan\nhint: drop --budget to make a plan\n"
		if code != exitBadInput || stderr != want || stdout != "" {
			t.Errorf("%s: exit %d\n%s%s", f[0], code, stdout, stderr)
		}
	}
}

// TestPeriodWithALineBreak (issue 16, item 11): a --period holding a line
// break says so (it said "leading or trailing spaces"), and a label a
// trend could not line up is refused before drawing.
func TestPeriodWithALineBreak(t *testing.T) {
	t.Parallel()
	log := writeGenLog(t, t.TempDir(), "log.csv", loggen.Config{Rows: 1000, Seed: 15})
	for period, want := range map[string]string{
		"2026-11\n": `probity: --period "2026-11\n" holds a line break`,
		"2026 11":   `probity: --period "2026 11" has the character ' '; a period label is letters, digits, '-', '_' and '.'`,
	} {
		refusedDraw(t, nil, []string{want, "hint: e.g. --period 2026-11"}, "--plan", drawPlan, "--log", log, "--period", period)
	}
}
