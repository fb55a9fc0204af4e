//go:build unix

package main

import (
	"bytes"
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
	t.Parallel()
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
