//go:build unix

package main

import (
	"bufio"
	"errors"
	"flag"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"sync"
	"testing"
	"time"

	"probity/sampling/drawfolder"
	"probity/sampling/labelserver"
	"probity/sampling/labeltrail"
)

// TestLabelHelper is not a test of its own: TestKillNineLosesNothing runs
// the test binary again with PROBITY_TEST_LABEL_HELPER set and a probity
// command line after "--", and this is then probity's main.
func TestLabelHelper(t *testing.T) {
	if os.Getenv("PROBITY_TEST_LABEL_HELPER") == "" {
		t.Skip("run by TestKillNineLosesNothing")
	}
	exitOnSignal(os.Stderr)
	os.Exit(run(flag.Args(), systemDeps()))
}

// TestKillNineLosesNothing labels a draw with two labelers at once through
// a probity label process, kills it with SIGKILL in the middle, and starts
// it again: every event the server confirmed is in the trail, the trail's
// chain holds, and labeling goes on where it stopped.
func TestKillNineLosesNothing(t *testing.T) {
	t.Parallel()
	if testing.Short() {
		t.Skip("starts a probity process")
	}
	fx := newRecFixture(t, true, 0)
	cmd := exec.Command(os.Args[0], "-test.run=^TestLabelHelper$", "--", "label", fx.draw, "--plan", fx.planPath)
	cmd.Env = append(os.Environ(), "PROBITY_TEST_LABEL_HELPER=1")
	stdout, err := cmd.StdoutPipe()
	if err != nil {
		t.Fatal(err)
	}
	var stderr syncBuffer
	cmd.Stderr = &stderr
	if err := cmd.Start(); err != nil {
		t.Fatal(err)
	}
	done := make(chan error, 1)
	address := ""
	sc := bufio.NewScanner(stdout)
	banner := ""
	for sc.Scan() {
		banner += sc.Text() + "\n"
		if m := bannerAddress.FindStringSubmatch(banner); m != nil && m[1] == drawfolder.WorksheetFile {
			address = m[2]
			break
		}
	}
	go func() {
		for sc.Scan() {
		}
		done <- cmd.Wait()
	}()
	if address == "" {
		cmd.Process.Kill()
		t.Fatalf("no address printed:\n%s", stderr.String())
	}

	// Two labelers at once, each through its own session, going through
	// their halves of the sequence until the server is gone.
	a := labelClient(t, address, "Dana Example")
	b := labelClient(t, address, "Jo Example")
	st, err := a.State()
	if err != nil {
		t.Fatal(err)
	}
	var mu sync.Mutex
	confirmed := map[int]string{} // item → label the server confirmed
	var wg sync.WaitGroup
	work := func(c *labelserver.Client, part int) {
		defer wg.Done()
		for i, e := range st.Sequence {
			if i%2 != part {
				continue
			}
			label := fx.truth[fx.worksheet[e.Item-1].RecordID]
			v, err := c.Label(labelserver.LabelRequest{Item: e.Item, Label: label})
			if err != nil {
				return // the server is gone
			}
			mu.Lock()
			confirmed[v.Item.Item] = v.Item.Label
			mu.Unlock()
		}
	}
	wg.Add(2)
	go work(a, 0)
	go work(b, 1)
	// Kill in the middle of labeling, while requests are in flight.
	for {
		mu.Lock()
		n := len(confirmed)
		mu.Unlock()
		if n >= 40 {
			break
		}
		time.Sleep(time.Millisecond)
	}
	if err := cmd.Process.Signal(os.Kill); err != nil {
		t.Fatal(err)
	}
	var ee *exec.ExitError
	if err := <-done; !errors.As(err, &ee) || ee.ExitCode() != -1 {
		t.Fatalf("the server was not killed: %v", err)
	}
	wg.Wait()
	if len(confirmed) >= len(st.Sequence) {
		t.Fatal("the kill came after labeling ended")
	}

	// Every confirmed event is in the trail. (A line the kill cut short
	// was never confirmed; --drop-incomplete removes it.)
	trail := filepath.Join(fx.draw, labeltrail.FileName)
	r := startLabelAt(t, time.Now(), fx.draw, "--plan", fx.planPath, "--drop-incomplete")
	tr, err := labeltrail.Read(trail)
	if err != nil {
		t.Fatalf("the trail after kill -9: %v", err)
	}
	c := labelClient(t, r.addr[drawfolder.WorksheetFile], "Dana Example")
	for item, label := range confirmed {
		it, err := c.Item(item)
		if err != nil || it.Label != label {
			t.Errorf("item %d was confirmed as %q; after the restart it is %q (%v)", item, label, it.Label, err)
		}
	}
	t.Logf("%d events confirmed before the kill, %d in the trail", len(confirmed), len(tr.Entries)-1)
	// Labeling goes on where it stopped, and the record takes the trail.
	now, _ := c.State()
	for _, e := range now.Sequence {
		if it, _ := c.Item(e.Item); it.Label == "" {
			give(t, c, e.Item, fx.truth[fx.worksheet[e.Item-1].RecordID], "", "")
		}
	}
	if code := r.close(); code != exitOK {
		t.Fatalf("label exit %d", code)
	}
	// labeled on this machine's clock: issued after it
	issued := time.Now().UTC().Add(time.Hour).Format(time.RFC3339)
	code, out, stderr2 := runProbity(t, "record", "--plan", fx.planPath, "--draw", fx.draw, "--trail", trail, "--out", filepath.Join(fx.dir, "rec"), "--date", issued)
	if code != exitOK && code != exitRejected || !strings.Contains(out, "Dana Example, Jo Example") {
		t.Errorf("record after the restart: %d\n%s%s", code, out, stderr2)
	}
}
