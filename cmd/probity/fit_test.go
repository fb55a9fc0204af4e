package main

import (
	"bytes"
	"path/filepath"
	"strings"
	"testing"
	"unicode/utf8"
)

// TestFitWriter: long lines are broken at spaces under their own indent
// (a dash that joins a reason is kept with it), short lines and machine
// output pass unchanged, and no word is lost.
func TestFitWriter(t *testing.T) {
	t.Parallel()
	long := "  model-b  REJECT  61/1712 errors, estimate 0.0356, upper bound 0.0464 — 61 errors > c = 22 in n = 1712"
	in := "short line\n" + long + "\n" + strings.Repeat("word ", 50) + "\nno end"
	var b bytes.Buffer
	f := &fitWriter{w: &b, width: 60}
	for _, part := range []string{in[:7], in[7:40], in[40:]} {
		f.Write([]byte(part))
	}
	f.Flush()
	got := b.String()
	for _, l := range strings.Split(got, "\n") {
		if utf8.RuneCountInString(l) > 60 {
			t.Errorf("line of %d columns: %q", utf8.RuneCountInString(l), l)
		}
	}
	if strings.Join(strings.Fields(got), " ") != strings.Join(strings.Fields(in), " ") {
		t.Errorf("words changed:\n%s", got)
	}
	if !strings.HasPrefix(got, "short line\n  model-b  REJECT  61/1712 errors, estimate 0.0356, upper\n      bound 0.0464 — 61 errors > c = 22 in n = 1712\nword") || !strings.HasSuffix(got, "\nno end") {
		t.Errorf("fitted as\n%s", got)
	}
	b.Reset()
	raw := &fitWriter{w: &b, width: 10, raw: true}
	raw.Write([]byte(long + "\n"))
	if b.String() != long+"\n" {
		t.Errorf("raw output changed: %q", b.String())
	}
}

// TestConsoleFits100Columns (issue 16, item 18): what the commands print
// for people fits 100 columns (progress lines reached 206): the demo's
// summary, a plan with three candidates, and progress on a worksheet.
func TestConsoleFits100Columns(t *testing.T) {
	t.Parallel()
	check := func(what, out string) {
		t.Helper()
		for i, l := range strings.Split(out, "\n") {
			if n := utf8.RuneCountInString(l); n > consoleWidth {
				t.Errorf("%s line %d is %d columns: %s", what, i+1, n, l)
			}
		}
	}
	runWide := func(args ...string) string {
		t.Helper()
		code, out, errOut := runTest(t, args, withWidth(consoleWidth))
		if code != exitOK && code != exitRejected {
			t.Fatalf("%v: exit %d: %s", args, code, errOut)
		}
		return out
	}
	check("plan", runWide("plan", "--ceiling", "0.02", "--confidence", "0.95", "--anticipated", "0.01",
		"--thresholds", "defect_score:0.35,0.50,0.65", "--positive", "defect", "--negative", "sound", "--require", "any"))
	pf := progressFixture(t, false)
	check("progress", runWide("progress", "--plan", pf.plan, "--draw", pf.draw, "--labels", pf.label(t, 40, nil)))
	demo := filepath.Join(t.TempDir(), "demo")
	code, out, errOut := runTest(t, []string{"demo", "--out", demo}, append(demoTestOptions, withWidth(consoleWidth))...)
	if code != exitOK {
		t.Fatalf("demo: exit %d %s", code, errOut)
	}
	check("demo", out)
}
