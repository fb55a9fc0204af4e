package main

import (
	"bytes"
	"encoding/json"
	"io/fs"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"probity/sampling/loggen"
)

// TestOutputNeverReplacesAnInput: a command refuses an output path that is
// one of its inputs, with or without --force, and leaves it as it was.
func TestOutputNeverReplacesAnInput(t *testing.T) {
	t.Parallel()
	dir := t.TempDir()
	// The log is named like a file of the draw folder it is drawn into.
	log := writeGenLog(t, dir, "ledger.csv", loggen.Config{Rows: 3000, Seed: 9})
	before, _ := os.ReadFile(log)
	code, _, stderr := runDrawCmd(t, nil, "--plan", drawPlan, "--log", log, "--out", dir, "--force")
	if code != exitBadInput || !strings.Contains(stderr, log+": is an input of the command; probity never writes over a file it reads") {
		t.Errorf("draw over its log: exit %d, %s", code, stderr)
	}
	if after, _ := os.ReadFile(log); !bytes.Equal(before, after) {
		t.Error("the draw wrote over its log")
	}
	if got := tree(t, dir); len(got) != 1 {
		t.Errorf("left %v", got)
	}
}

// TestTrendChartNeverReplacesARecord: trend --chart DIR/record, DIR being
// a record folder, would write DIR/record.pdf over the signed record: it is
// refused (exit 2) and the record's files keep their bytes, whether or not
// the folder is among the records read; the PNG is not written either.
func TestTrendChartNeverReplacesARecord(t *testing.T) {
	t.Parallel()
	root := t.TempDir()
	months := filepath.Join(root, "monthly")
	entries, err := os.ReadDir(trendMonthly)
	if err != nil {
		t.Fatal(err)
	}
	for _, e := range entries {
		os.MkdirAll(filepath.Join(months, e.Name()), 0o755)
		for _, f := range []string{"record.json", "record.sig"} {
			data, err := os.ReadFile(filepath.Join(trendMonthly, e.Name(), f))
			if err != nil {
				t.Fatal(err)
			}
			writeFile(t, filepath.Join(months, e.Name(), f), data)
		}
	}
	dec := filepath.Join(months, "2026-12")
	signed := []byte("%PDF-1.4 the signed record\n")
	writeFile(t, filepath.Join(dec, "record.pdf"), signed)
	for _, args := range [][]string{
		{"trend", months, "--chart", filepath.Join(dec, "record")},
		{"trend", filepath.Join(months, "2026-01"), filepath.Join(months, "2026-02"), "--chart", filepath.Join(dec, "record")},
	} {
		_, errOut, code := trendRun(t, args...)
		if code != exitBadInput || !strings.Contains(errOut, filepath.Join(dec, "record.pdf")+": is an input of the command") {
			t.Errorf("%v: exit %d, stderr %q", args, code, errOut)
		}
		if b, _ := os.ReadFile(filepath.Join(dec, "record.pdf")); !bytes.Equal(b, signed) {
			t.Fatalf("%v: record.pdf was replaced", args)
		}
		if got := strings.Join(tree(t, dec), ","); got != "record.json,record.pdf,record.sig" {
			t.Errorf("%v: the record folder holds %s", args, got)
		}
	}
}

// TestKeygenAndTrendCreateMissingFolders: like draw and record, keygen and
// trend --chart create the folders their output goes into.
func TestKeygenAndTrendCreateMissingFolders(t *testing.T) {
	t.Parallel()
	root := t.TempDir()
	key := filepath.Join(root, "keys", "2026", "audit-key")
	if code, _, stderr := runProbity(t, "keygen", "--out", key); code != exitOK {
		t.Fatalf("keygen: exit %d %s", code, stderr)
	}
	for _, p := range []string{key, key + ".pub"} {
		if _, err := os.Stat(p); err != nil {
			t.Error(err)
		}
	}
	if st, _ := os.Stat(key); st.Mode().Perm() != 0o600 {
		t.Errorf("private key mode %v", st.Mode().Perm())
	}
	prefix := filepath.Join(root, "charts", "2026", "trend")
	if _, errOut, code := trendRun(t, "trend", trendMonthly, "--chart", prefix); code != exitRejected {
		t.Fatalf("trend: exit %d %s", code, errOut)
	}
	for _, p := range []string{prefix + ".png", prefix + ".pdf"} {
		if _, err := os.Stat(p); err != nil {
			t.Error(err)
		}
	}
}

// TestRedrawNamesTheManifestNotAFlag: a setting read from a draw folder's
// manifest that cannot be used is reported against the manifest's file and
// key, never as a flag the user did not pass.
func TestRedrawNamesTheManifestNotAFlag(t *testing.T) {
	t.Parallel()
	log := writeGenLog(t, t.TempDir(), "log.csv", loggen.Config{Rows: 3000, Seed: 9})
	out := filepath.Join(t.TempDir(), "draw")
	if code, _, stderr := runDrawCmd(t, nil, "--plan", drawPlan, "--log", log, "--out", out); code != exitOK {
		t.Fatal(stderr)
	}
	path := filepath.Join(out, "manifest.json")
	var m map[string]any
	data, _ := os.ReadFile(path)
	if err := json.Unmarshal(data, &m); err != nil {
		t.Fatal(err)
	}
	m["double"] = 99999
	data, _ = json.MarshalIndent(m, "", "  ")
	writeFile(t, path, data)
	code, _, stderr := runDrawCmd(t, nil, "--plan", drawPlan, "--log", log, "--check", out)
	if code != exitBadInput || !strings.Contains(stderr, path+", field double: 99999: must be between 0 and the sample size 581") || strings.Contains(stderr, "--double") {
		t.Errorf("draw --check on a tampered manifest: exit %d, %s", code, stderr)
	}
}

// tree lists every path under root, relative to it.
func tree(t *testing.T, root string) []string {
	t.Helper()
	var out []string
	filepath.WalkDir(root, func(p string, d fs.DirEntry, err error) error {
		if err == nil && p != root {
			rel, _ := filepath.Rel(root, p)
			out = append(out, rel)
		}
		return nil
	})
	return out
}
