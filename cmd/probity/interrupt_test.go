//go:build unix

package main

import (
	"bytes"
	"errors"
	"flag"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"syscall"
	"testing"
	"time"

	"probity/sampling/loggen"
	"probity/sampling/safewrite"
)

// TestInterruptHelper is not a test of its own: the tests below run the
// test binary again with PROBITY_TEST_HELPER set and a probity command line
// after "--", and this is then probity's main with every write paused between its
// temporaries being on disk and their being moved into place. It creates
// the file PROBITY_TEST_READY names when the pause is reached and waits
// there for the signal.
func TestInterruptHelper(t *testing.T) {
	if os.Getenv("PROBITY_TEST_HELPER") == "" {
		t.Skip("run by the interruption tests")
	}
	ready := os.Getenv("PROBITY_TEST_READY")
	safewrite.SetPauseBeforePlace(func() {
		if err := os.WriteFile(ready, nil, 0o644); err != nil {
			panic(err)
		}
		time.Sleep(time.Hour)
	})
	exitOnSignal(os.Stderr)
	os.Exit(run(flag.Args(), systemDeps()))
}

// helperProcess is a probity process started by startPaused.
type helperProcess struct {
	cmd    *exec.Cmd
	stderr bytes.Buffer
	done   chan error // the result of cmd.Wait
}

// startPaused starts probity with args in a subprocess and returns once it
// is paused in its write phase.
func startPaused(t *testing.T, args ...string) *helperProcess {
	t.Helper()
	ready := filepath.Join(t.TempDir(), "ready")
	h := &helperProcess{done: make(chan error, 1), cmd: exec.Command(os.Args[0], append([]string{"-test.run=^TestInterruptHelper$", "--"}, args...)...)}
	h.cmd.Env = append(os.Environ(), "PROBITY_TEST_HELPER=1", "PROBITY_TEST_READY="+ready)
	h.cmd.Stderr = &h.stderr
	if err := h.cmd.Start(); err != nil {
		t.Fatal(err)
	}
	go func() { h.done <- h.cmd.Wait() }()
	deadline := time.Now().Add(60 * time.Second)
	for {
		if _, err := os.Stat(ready); err == nil {
			return h
		}
		select {
		case <-h.done:
			t.Fatalf("probity %s ended before its write phase:\n%s", strings.Join(args, " "), h.stderr.String())
		case <-time.After(20 * time.Millisecond):
		}
		if time.Now().After(deadline) {
			h.cmd.Process.Kill()
			t.Fatalf("probity %s did not reach its write phase in 60 s", strings.Join(args, " "))
		}
	}
}

// stop sends sig and returns the exit code (-1 when killed by a signal).
func (h *helperProcess) stop(t *testing.T, sig os.Signal) int {
	t.Helper()
	if err := h.cmd.Process.Signal(sig); err != nil {
		t.Fatal(err)
	}
	err := <-h.done
	var ee *exec.ExitError
	switch {
	case err == nil:
		return 0
	case errors.As(err, &ee):
		return ee.ExitCode()
	}
	t.Fatal(err)
	return 0
}

// interruptInputs writes a small log for the draws below, in a folder of
// its own.
func interruptInputs(t *testing.T) string {
	t.Helper()
	return writeGenLog(t, t.TempDir(), "log.csv", loggen.Config{Rows: 3000, Seed: 9})
}

// TestInterruptDuringDrawWrite: SIGINT or SIGTERM during a draw's write
// phase exits 130 or 143 and leaves nothing: into a new folder (with
// missing parents), neither the folder, nor its parents, nor a temporary;
// over an earlier draw (--force), the earlier files byte for byte.
func TestInterruptDuringDrawWrite(t *testing.T) {
	t.Parallel()
	if testing.Short() {
		t.Skip("starts probity processes")
	}
	log := interruptInputs(t)
	for _, c := range []struct {
		sig  syscall.Signal
		code int
		word string
	}{{syscall.SIGINT, exitInterrupted, "interrupted"}, {syscall.SIGTERM, exitTerminated, "terminated"}} {
		root := t.TempDir()
		out := filepath.Join(root, "audits", "2026-11", "draw")
		h := startPaused(t, "draw", "--plan", drawPlan, "--log", log, "--out", out, "--strata", "region", "--double", "10")
		if got := tree(t, root); len(got) == 0 {
			t.Fatalf("%s: nothing was being written", c.word)
		}
		code := h.stop(t, c.sig)
		if code != c.code || !strings.Contains(h.stderr.String(), "probity: "+c.word) {
			t.Errorf("%s: exit %d, want %d; stderr:\n%s", c.word, code, c.code, h.stderr.String())
		}
		if got := tree(t, root); len(got) != 0 {
			t.Errorf("%s: left %v", c.word, got)
		}
	}

	// Over an earlier draw with --force: the earlier draw stays whole.
	root := t.TempDir()
	out := filepath.Join(root, "draw")
	if code, _, stderr := runDrawCmd(t, nil, "--plan", drawPlan, "--log", log, "--out", out, "--double", "10"); code != exitOK {
		t.Fatalf("first draw: %s", stderr)
	}
	before := map[string][]byte{}
	for _, n := range tree(t, out) {
		before[n], _ = os.ReadFile(filepath.Join(out, n))
	}
	h := startPaused(t, "draw", "--plan", drawPlan, "--log", log, "--out", out, "--strata", "region", "--force")
	if code := h.stop(t, syscall.SIGINT); code != exitInterrupted {
		t.Errorf("--force: exit %d; stderr:\n%s", code, h.stderr.String())
	}
	after := tree(t, out)
	if len(after) != len(before) {
		t.Errorf("the folder holds %v after the interruption, had %d files", after, len(before))
	}
	for n, b := range before {
		if got, _ := os.ReadFile(filepath.Join(out, n)); !bytes.Equal(got, b) {
			t.Errorf("%s changed", n)
		}
	}
}

// TestKilledDrawThenRerun: a draw killed outright (SIGKILL) in its write
// phase leaves its temporaries (nothing can remove them); the next draw
// into the same place removes them, since their process is gone, and
// succeeds — into a new folder and into an existing empty one.
func TestKilledDrawThenRerun(t *testing.T) {
	t.Parallel()
	if testing.Short() {
		t.Skip("starts probity processes")
	}
	log := interruptInputs(t)
	for _, existing := range []bool{false, true} {
		root := t.TempDir()
		out := filepath.Join(root, "draw")
		if existing {
			os.Mkdir(out, 0o755)
		}
		h := startPaused(t, "draw", "--plan", drawPlan, "--log", log, "--out", out)
		h.stop(t, syscall.SIGKILL)
		left := tree(t, root)
		if !strings.Contains(strings.Join(left, " "), safewrite.TempPrefix) {
			t.Fatalf("existing=%v: the killed draw left no temporary (%v); the test does not test anything", existing, left)
		}
		code, stdout, stderr := runDrawCmd(t, nil, "--plan", drawPlan, "--log", log, "--out", out)
		if code != exitOK || !strings.Contains(stdout, "drew 581 items") {
			t.Fatalf("existing=%v: rerun exit %d\n%s", existing, code, stderr)
		}
		for _, p := range tree(t, root) {
			if strings.Contains(p, safewrite.TempPrefix) {
				t.Errorf("existing=%v: %s is still there after the rerun", existing, p)
			}
		}
	}
	// A temporary an older probity left (no process id in its name) is not
	// removed; the refusal says what it is and how to remove it.
	out := filepath.Join(t.TempDir(), "draw")
	os.Mkdir(out, 0o755)
	old := filepath.Join(out, ".worksheet.csv.tmp-3141592")
	writeFile(t, old, []byte("item,record_id"))
	code, _, stderr := runDrawCmd(t, nil, "--plan", drawPlan, "--log", log, "--out", out)
	if code != exitBadInput || !strings.Contains(stderr, old+", which looks like a temporary file an earlier probity version left") ||
		!strings.Contains(stderr, "hint: remove it (rm -r '"+old+"') and run again") {
		t.Errorf("older temporary: exit %d, stderr:\n%s", code, stderr)
	}
}
