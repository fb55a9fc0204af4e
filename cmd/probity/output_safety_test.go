package main

import (
	"bytes"
	"encoding/json"
	"os"
	"path/filepath"
	"strings"
	"syscall"
	"testing"

	"probity/sampling/loggen"
)

// TestForceNeverReplacesWhatIsNotARegularFile: plan --out P --force
// refuses a FIFO, a symbolic link and a device, exit 2, naming the path
// and what it is, and leaves it as it was; the same holds for a file of a
// folder a draw or a record replaces with --force.
func TestForceNeverReplacesWhatIsNotARegularFile(t *testing.T) {
	dir := t.TempDir()
	fifo := filepath.Join(dir, "plan-fifo.yaml")
	if err := syscall.Mkfifo(fifo, 0o644); err != nil {
		t.Skip("no FIFOs here:", err)
	}
	target := filepath.Join(dir, "elsewhere.yaml")
	writeFile(t, target, []byte("not a plan"))
	link := filepath.Join(dir, "plan-link.yaml")
	if err := os.Symlink(target, link); err != nil {
		t.Fatal(err)
	}
	cases := []struct{ path, kind string }{{fifo, "a named pipe (FIFO)"}, {link, "a symbolic link"}}
	if st, err := os.Stat("/dev/null"); err == nil && st.Mode()&os.ModeCharDevice != 0 {
		cases = append(cases, struct{ path, kind string }{"/dev/null", "a character device"})
	}
	for _, c := range cases {
		code, _, stderr := runPlanCmd(t, "--ceiling", "0.02", "--confidence", "0.95", "--out", c.path, "--force")
		if code != exitBadInput || !strings.Contains(stderr, c.path+": is "+c.kind+"; probity replaces only regular files") {
			t.Errorf("%s: exit %d, stderr %q", c.path, code, stderr)
		}
	}
	if st, _ := os.Lstat(fifo); st.Mode().Type() != os.ModeNamedPipe {
		t.Error("the FIFO is no longer a FIFO")
	}
	if st, _ := os.Lstat(link); st.Mode().Type() != os.ModeSymlink {
		t.Error("the symbolic link is no longer a link")
	}
	if b, _ := os.ReadFile(target); string(b) != "not a plan" {
		t.Error("the link's target was written")
	}
	if st, _ := os.Stat("/dev/null"); st.Mode()&os.ModeCharDevice == 0 {
		t.Error("/dev/null is no longer a device")
	}
	if got := tree(t, dir); len(got) != 3 {
		t.Errorf("left %v", got)
	}

	// A draw folder whose manifest.json is a link, redrawn with --force.
	log := writeGenLog(t, t.TempDir(), "log.csv", loggen.Config{Rows: 3000, Seed: 9})
	out := filepath.Join(t.TempDir(), "draw")
	if code, _, stderr := runDrawCmd(t, nil, "--plan", drawPlan, "--log", log, "--out", out); code != exitOK {
		t.Fatal(stderr)
	}
	manifest := filepath.Join(out, "manifest.json")
	os.Remove(manifest)
	os.Symlink(target, manifest)
	ledger, _ := os.ReadFile(filepath.Join(out, "ledger.csv"))
	code, _, stderr := runDrawCmd(t, nil, "--plan", drawPlan, "--log", log, "--out", out, "--force", "--strata", "region")
	if code != exitBadInput || !strings.Contains(stderr, manifest+": is a symbolic link") {
		t.Errorf("draw --force over a linked manifest: exit %d, %s", code, stderr)
	}
	if now, _ := os.ReadFile(filepath.Join(out, "ledger.csv")); !bytes.Equal(now, ledger) {
		t.Error("the refused draw changed ledger.csv")
	}

	// A record folder whose record.pdf is a FIFO.
	fx := newRecFixture(t, false, 0)
	labels := fx.labels(t, "labels.csv", nil)
	rec := filepath.Join(fx.dir, "rec")
	if code, _, stderr := runProbity(t, "record", "--plan", fx.planPath, "--draw", fx.draw, "--labels", labels, "--out", rec); code != exitOK {
		t.Fatal(stderr)
	}
	pdf := filepath.Join(rec, "record.pdf")
	os.Remove(pdf)
	syscall.Mkfifo(pdf, 0o644)
	js, _ := os.ReadFile(filepath.Join(rec, "record.json"))
	code, _, stderr = runProbity(t, "record", "--plan", fx.planPath, "--draw", fx.draw, "--labels", labels, "--out", rec, "--force", "--date", "2027-01-02")
	if code != exitBadInput || !strings.Contains(stderr, pdf+": is a named pipe (FIFO)") {
		t.Errorf("record --force over a FIFO: exit %d, %s", code, stderr)
	}
	if now, _ := os.ReadFile(filepath.Join(rec, "record.json")); !bytes.Equal(now, js) {
		t.Error("the refused record changed record.json")
	}
}

// TestOutputNeverReplacesAnInput: a command refuses an output path that is
// one of its inputs, with or without --force, and leaves it as it was.
func TestOutputNeverReplacesAnInput(t *testing.T) {
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
	root := t.TempDir()
	months := filepath.Join(root, "monthly")
	entries, err := os.ReadDir(trendMonthly)
	if err != nil {
		t.Fatal(err)
	}
	for _, e := range entries {
		data, err := os.ReadFile(filepath.Join(trendMonthly, e.Name(), "record.json"))
		if err != nil {
			t.Fatal(err)
		}
		os.MkdirAll(filepath.Join(months, e.Name()), 0o755)
		writeFile(t, filepath.Join(months, e.Name(), "record.json"), data)
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
		if got := strings.Join(tree(t, dec), ","); got != "record.json,record.pdf" {
			t.Errorf("%v: the record folder holds %s", args, got)
		}
	}
}

// TestKeygenAndTrendCreateMissingFolders: like draw and record, keygen and
// trend --chart create the folders their output goes into.
func TestKeygenAndTrendCreateMissingFolders(t *testing.T) {
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
