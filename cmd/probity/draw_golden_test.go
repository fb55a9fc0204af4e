package main

import (
	"bytes"
	"os"
	"path/filepath"
	"testing"

	"probity/plan/testkit/golden"
)

// TestDrawGolden locks a fixed-seed draw of a fixed log: the worksheets,
// ledger, manifest and summary must not change without a deliberate
// -update (a regression guard for the selection, allocation,
// ordering and number formatting; the selection itself is checked
// independently in sampling's tests).
func TestDrawGolden(t *testing.T) {
	t.Parallel()
	goldenDir := "../../testdata/draw/golden"
	out := filepath.Join(t.TempDir(), "draw")
	code, stdout, stderr := runDrawCmd(t, nil, "--plan", drawPlan, "--log", "../../testdata/draw/log-small.csv", "--out", out,
		"--strata", "channel", "--band", "score=0.5,0.9", "--show", "text", "--spare", "1", "--double", "12", "--min-per-stratum", "40")
	if code != exitOK {
		t.Fatalf("exit %d: %s", code, stderr)
	}
	files := map[string][]byte{"summary.txt": bytes.ReplaceAll([]byte(stdout), []byte(out), []byte("OUT"))}
	for _, name := range []string{"worksheet.csv", "worksheet-second.csv", "ledger.csv", "manifest.json"} {
		b, err := os.ReadFile(filepath.Join(out, name))
		if err != nil {
			t.Fatal(err)
		}
		files[name] = b
	}
	for name, got := range files {
		golden.Compare(t, filepath.Join(goldenDir, name), got)
	}
}
