package main

import (
	"bytes"
	"encoding/json"
	"math/rand/v2"
	"os"
	"path/filepath"
	"reflect"
	"regexp"
	"strings"
	"sync"
	"testing"
	"time"

	"probity/sampling/drawfolder"
	"probity/sampling/labelserver"
	"probity/sampling/labeltrail"
)

// syncBuffer is a stream a command writes to while a test reads it.
type syncBuffer struct {
	mu  sync.Mutex
	buf bytes.Buffer
}

func (b *syncBuffer) Write(p []byte) (int, error) {
	b.mu.Lock()
	defer b.mu.Unlock()
	return b.buf.Write(p)
}

func (b *syncBuffer) String() string {
	b.mu.Lock()
	defer b.mu.Unlock()
	return b.buf.String()
}

// labelRun is a `probity label` running in this process.
type labelRun struct {
	out, err *syncBuffer
	stop     chan struct{}
	done     chan int
	// addr maps a worksheet's file name to its printed address.
	addr map[string]string
}

// labelStart is when the label events of startLabel's runs begin; each
// reading of the clock advances it by a second.
var labelStart = time.Date(2026, 12, 1, 10, 0, 0, 0, time.UTC)

// bannerAddress finds a worksheet's address in label's output.
var bannerAddress = regexp.MustCompile(`\((worksheet[a-z-]*\.csv), \d+ items\):\s+(http://\S+)`)

// startLabel runs probity label with args until its addresses are
// printed; it fails the test when the command ends first.
func startLabel(t *testing.T, args ...string) *labelRun {
	t.Helper()
	return startLabelAt(t, labelStart, args...)
}

// startLabelAt is startLabel with a clock that starts at start.
func startLabelAt(t *testing.T, start time.Time, args ...string) *labelRun {
	t.Helper()
	r := &labelRun{out: &syncBuffer{}, err: &syncBuffer{}, stop: make(chan struct{}), done: make(chan int, 1), addr: map[string]string{}}
	var mu sync.Mutex
	tick := start
	d, _, _ := newTestDeps(withOutput(r.out, r.err), withStop(r.stop), withRandomFrom(rand.NewChaCha8([32]byte{0x3c})),
		withClock(func() time.Time {
			mu.Lock()
			defer mu.Unlock()
			tick = tick.Add(time.Second)
			return tick
		}))
	go func() { r.done <- run(append([]string{"label"}, args...), d) }()
	deadline := time.After(30 * time.Second)
	for {
		if out := r.out.String(); strings.Contains(out, "stop with Ctrl-C") {
			for _, m := range bannerAddress.FindAllStringSubmatch(out, -1) {
				r.addr[m[1]] = m[2]
			}
			return r
		}
		select {
		case code := <-r.done:
			t.Fatalf("probity label %s ended with %d before serving:\n%s%s", strings.Join(args, " "), code, r.out.String(), r.err.String())
		case <-deadline:
			t.Fatalf("probity label did not start in 30 s")
		case <-time.After(10 * time.Millisecond):
		}
	}
}

// close stops the server and returns its exit code.
func (r *labelRun) close() int {
	close(r.stop)
	return <-r.done
}

// labelClient opens a worksheet's address as a browser would.
func labelClient(t *testing.T, address, name string) *labelserver.Client {
	t.Helper()
	c, err := labelserver.Open(nil, address)
	if err != nil {
		t.Fatal(err)
	}
	if err := c.Name(name); err != nil {
		t.Fatal(err)
	}
	return c
}

// give sends one label event from the item's current values.
func give(t *testing.T, c *labelserver.Client, item int, label, note, reason string) labelserver.LabelView {
	t.Helper()
	it, err := c.Item(item)
	if err != nil {
		t.Fatal(err)
	}
	v, err := c.Label(labelserver.LabelRequest{Item: item, Label: label, Note: note, PreviousLabel: it.Label, PreviousNote: it.Note, Reason: reason})
	if err != nil {
		t.Fatalf("item %d %q: %v", item, label, err)
	}
	return v
}

// trailSession labels fx's draw through the page as a labeler would: the
// first sample item unsure with a note, the spare the page offers, the
// second item wrong and then corrected with a reason, every other sample
// item its true label. It returns the equivalent worksheet a labeler
// would have typed by hand.
func trailSession(t *testing.T, fx *recFixture, address string) []drawfolder.WorksheetRow {
	t.Helper()
	const who = "Dana Example"
	c := labelClient(t, address, who)
	st, err := c.State()
	if err != nil {
		t.Fatal(err)
	}
	want := make([]drawfolder.WorksheetRow, len(fx.worksheet))
	copy(want, fx.worksheet)
	byItem := map[int]*drawfolder.WorksheetRow{}
	for i := range want {
		byItem[want[i].Item] = &want[i]
	}
	set := func(item int, label, note string) {
		r := byItem[item]
		r.Label, r.Note, r.Labeler = label, note, who
	}
	first, second := st.Sequence[0].Item, st.Sequence[1].Item
	v := give(t, c, first, "unsure", "label torn; cannot read the address", "")
	set(first, "unsure", "label torn; cannot read the address")
	if v.Offer == 0 {
		t.Fatalf("no spare offered for item %d", first)
	}
	spare := byItem[v.Offer]
	give(t, c, spare.Item, fx.truth[spare.RecordID], "", "")
	set(spare.Item, fx.truth[spare.RecordID], "")
	wrong := map[string]string{"ok": "defect", "defect": "ok"}[fx.truth[byItem[second].RecordID]]
	give(t, c, second, wrong, "", "")
	give(t, c, second, fx.truth[byItem[second].RecordID], "", "pressed the wrong key")
	set(second, fx.truth[byItem[second].RecordID], "")
	for _, e := range st.Sequence[2:] {
		r := byItem[e.Item]
		give(t, c, e.Item, fx.truth[r.RecordID], "", "")
		set(e.Item, fx.truth[r.RecordID], "")
	}
	if st, err = c.State(); err != nil || st.Labeled != st.Total {
		t.Fatalf("after labeling: %+v %v", st, err)
	}
	return want
}

// writeRows writes a labeled worksheet.
func writeRows(t *testing.T, fx *recFixture, name string, rows []drawfolder.WorksheetRow) string {
	t.Helper()
	var buf bytes.Buffer
	if err := drawfolder.WriteWorksheet(&buf, fx.show, rows); err != nil {
		t.Fatal(err)
	}
	path := filepath.Join(fx.dir, name)
	writeFile(t, path, buf.Bytes())
	return path
}

// recordJSON reads a record folder's record.json as a map.
func recordJSON(t *testing.T, dir string) map[string]any {
	t.Helper()
	data, err := os.ReadFile(filepath.Join(dir, "record.json"))
	if err != nil {
		t.Fatal(err)
	}
	var m map[string]any
	if err := json.Unmarshal(data, &m); err != nil {
		t.Fatal(err)
	}
	return m
}

// sameRecordBesidesTrail checks that two records agree in every field but
// what the trail adds: its summary, its fingerprint and the record id
// (which covers the trail).
func sameRecordBesidesTrail(t *testing.T, fromTrail, fromWorksheet map[string]any) {
	t.Helper()
	if fromTrail["label_trail"] == nil || fromTrail["fingerprints"].(map[string]any)["trail"] == nil {
		t.Fatalf("the record from the trail does not state it: %v", fromTrail["fingerprints"])
	}
	delete(fromTrail, "label_trail")
	delete(fromTrail["fingerprints"].(map[string]any), "trail")
	// the trail also dates the labeling, in the chronology
	if c, ok := fromTrail["chronology"].(map[string]any); !ok || c["labeled"] == nil {
		t.Errorf("the record from the trail does not date the labeling: %v", fromTrail["chronology"])
	} else {
		delete(c, "labeled")
	}
	delete(fromTrail, "record_id")
	delete(fromWorksheet, "record_id")
	for k := range fromWorksheet {
		if !reflect.DeepEqual(fromTrail[k], fromWorksheet[k]) {
			t.Errorf("record.json %q differs:\n from the trail:     %v\n from the worksheet: %v", k, fromTrail[k], fromWorksheet[k])
		}
	}
	if len(fromTrail) != len(fromWorksheet) {
		t.Errorf("the records have %d and %d keys", len(fromTrail), len(fromWorksheet))
	}
}

// TestRecordOnTheTrailIsTheRecordOfItsWorksheet labels a draw through
// probity label (an unsure item and its spare, a note, a correction),
// then issues the record from the trail and from the worksheet a labeler
// would have typed: the same record but for the trail's statement; verify
// recomputes it from the trail.
func TestRecordOnTheTrailIsTheRecordOfItsWorksheet(t *testing.T) {
	t.Parallel()
	fx := newRecFixture(t, true, 0)
	r := startLabel(t, fx.draw, "--plan", fx.planPath)
	if len(r.addr) != 1 || r.addr[drawfolder.WorksheetFile] == "" || !strings.HasPrefix(r.addr[drawfolder.WorksheetFile], "http://127.0.0.1:") {
		t.Fatalf("addresses %v in\n%s", r.addr, r.out.String())
	}
	want := trailSession(t, fx, r.addr[drawfolder.WorksheetFile])
	if code := r.close(); code != exitOK || !strings.Contains(r.out.String(), "stopped:") {
		t.Fatalf("label exit %d\n%s%s", code, r.out.String(), r.err.String())
	}
	trail := filepath.Join(fx.draw, labeltrail.FileName)
	worksheet := writeRows(t, fx, "typed.csv", want)

	// Both records are sealed with one key, so that verify authenticates
	// them.
	key := filepath.Join(fx.dir, "seal")
	if code, _, stderr := runProbity(t, "keygen", "--out", key); code != exitOK {
		t.Fatalf("keygen: %s", stderr)
	}
	outT, outW := filepath.Join(fx.dir, "rec-trail"), filepath.Join(fx.dir, "rec-worksheet")
	code, stdout, stderr := runProbity(t, "record", "--plan", fx.planPath, "--draw", fx.draw, "--trail", trail, "--out", outT, "--sign-key", key)
	if code != exitRejected && code != exitOK {
		t.Fatalf("record --trail: %d\n%s", code, stderr)
	}
	if !strings.Contains(stdout, "labels from the trail: ") || !strings.Contains(stdout, "by Dana Example") || !strings.Contains(stdout, ", 1 changed") {
		t.Errorf("record's summary lacks the trail:\n%s", stdout)
	}
	if code2, _, stderr := runProbity(t, "record", "--plan", fx.planPath, "--draw", fx.draw, "--labels", worksheet, "--out", outW, "--sign-key", key); code2 != code {
		t.Fatalf("record --labels: %d, want %d\n%s", code2, code, stderr)
	}
	a, b := recordJSON(t, outT), recordJSON(t, outW)
	lt := a["label_trail"].(map[string]any)
	if lt["changed"] != 1.0 || lt["first_label"] != "2026-12-01T10:00:02.000Z" || !reflect.DeepEqual(lt["labelers"], []any{"Dana Example"}) {
		t.Errorf("label_trail %v", lt)
	}
	if a["fingerprints"].(map[string]any)["trail"] != sha256File(t, trail) {
		t.Errorf("the trail's fingerprint is not its SHA-256")
	}
	sameRecordBesidesTrail(t, a, b)

	// The worksheet beside the trail: the same bytes are taken, an edited
	// copy is refused.
	if code, _, stderr := runProbity(t, "record", "--plan", fx.planPath, "--draw", fx.draw, "--trail", trail, "--labels", worksheet, "--out", filepath.Join(fx.dir, "rec-both")); code != exitOK && code != exitRejected {
		t.Errorf("record with the trail and its worksheet: %d\n%s", code, stderr)
	}
	edited := append([]drawfolder.WorksheetRow(nil), want...)
	edited[len(edited)-1].Note = "added later"
	code, _, stderr = runProbity(t, "record", "--plan", fx.planPath, "--draw", fx.draw, "--trail", trail,
		"--labels", writeRows(t, fx, "edited.csv", edited), "--out", filepath.Join(fx.dir, "rec-edited"))
	if code != exitBadInput || !strings.Contains(stderr, "not the worksheet the label trail gives") || listDir(t, filepath.Join(fx.dir, "rec-edited")) != nil {
		t.Errorf("an edited worksheet beside the trail: %d\n%s", code, stderr)
	}

	// verify re-derives the worksheet from the trail.
	code, stdout, stderr = runProbity(t, "verify", outT, "--pub", key+".pub", "--plan", fx.planPath, "--draw", fx.draw, "--trail", trail)
	if code != exitOK || !strings.Contains(stdout, "label trail fingerprint") || !strings.Contains(stdout, "judgement recomputed") {
		t.Errorf("verify --trail: %d\n%s%s", code, stdout, stderr)
	}
	code, stdout, _ = runProbity(t, "verify", outT, "--pub", key+".pub", "--plan", fx.planPath, "--draw", fx.draw, "--labels", worksheet)
	if code != exitOK || !strings.Contains(stdout, "pass it with --trail") {
		t.Errorf("verify --labels of a record from a trail: %d\n%s", code, stdout)
	}
	code, stdout, _ = runProbity(t, "verify", outW, "--pub", key+".pub", "--plan", fx.planPath, "--draw", fx.draw, "--trail", trail)
	if code != exitRejected || !strings.Contains(stdout, "not derived from a label trail") {
		t.Errorf("verify --trail of a record from a worksheet: %d\n%s", code, stdout)
	}
	// An edited trail fails verify (its fingerprint, and its chain).
	data, _ := os.ReadFile(trail)
	lines := strings.SplitAfter(string(data), "\n")
	lines[3] = strings.Replace(lines[3], `"label":"`+fx.truth[want[0].RecordID], `"label":"x`, 1)
	editedTrail := filepath.Join(fx.dir, "edited-trail.jsonl")
	writeFile(t, editedTrail, []byte(strings.Join(lines, "")))
	code, stdout, _ = runProbity(t, "verify", outT, "--pub", key+".pub", "--plan", fx.planPath, "--draw", fx.draw, "--trail", editedTrail)
	if code != exitRejected || !strings.Contains(stdout, "FAIL  "+editedTrail+": SHA-256") || !strings.Contains(stdout, "line 5, field prev: the hash chain is broken") {
		t.Errorf("verify with an edited trail: %d\n%s", code, stdout)
	}
}

// TestLabelResumesWhereLabelingStopped: stopping and starting label again
// keeps every label, and the page resumes at the first unlabeled item.
func TestLabelResumesWhereLabelingStopped(t *testing.T) {
	t.Parallel()
	fx := newRecFixture(t, false, 0)
	r := startLabel(t, fx.draw, "--plan", fx.planPath)
	c := labelClient(t, r.addr[drawfolder.WorksheetFile], "Jo Example")
	st, _ := c.State()
	for _, e := range st.Sequence[:5] {
		give(t, c, e.Item, "ok", "", "")
	}
	r.close()
	r = startLabel(t, fx.draw, "--plan", fx.planPath)
	defer r.close()
	if !strings.Contains(r.out.String(), "5 label events so far") {
		t.Errorf("banner:\n%s", r.out.String())
	}
	c = labelClient(t, r.addr[drawfolder.WorksheetFile], "Jo Example")
	st2, err := c.State()
	if err != nil || st2.Labeled != 5 || st2.Resume != 5 || st2.Sequence[5] != st.Sequence[5] {
		t.Errorf("after a restart: %+v %v", st2, err)
	}
}

// TestATruncatedTrailIsReported: a last line cut short (a crash while it
// was written) is refused by label, record and verify naming the line,
// and label --drop-incomplete removes it and goes on.
func TestATruncatedTrailIsReported(t *testing.T) {
	t.Parallel()
	fx := newRecFixture(t, false, 0)
	r := startLabel(t, fx.draw, "--plan", fx.planPath)
	c := labelClient(t, r.addr[drawfolder.WorksheetFile], "Jo Example")
	st, _ := c.State()
	for _, e := range st.Sequence[:3] {
		give(t, c, e.Item, "ok", "", "")
	}
	r.close()
	trail := filepath.Join(fx.draw, labeltrail.FileName)
	data, _ := os.ReadFile(trail)
	cut := data[:len(data)-40]
	writeFile(t, trail, cut)

	code, _, stderr := runProbity(t, "record", "--plan", fx.planPath, "--draw", fx.draw, "--trail", trail, "--out", filepath.Join(fx.dir, "rec"), "--allow-incomplete")
	if code != exitBadInput || !strings.Contains(stderr, "label-trail.jsonl line 4") || !strings.Contains(stderr, "cut short") {
		t.Errorf("record on a cut trail: %d\n%s", code, stderr)
	}
	code, _, stderr = runTest(t, []string{"label", fx.draw, "--plan", fx.planPath})
	if code != exitBadInput || !strings.Contains(stderr, "line 4") || !strings.Contains(stderr, "--drop-incomplete") {
		t.Errorf("label on a cut trail: %d\n%s", code, stderr)
	}
	if got, _ := os.ReadFile(trail); !bytes.Equal(got, cut) {
		t.Error("a refused label run changed the trail")
	}
	r = startLabel(t, fx.draw, "--plan", fx.planPath, "--drop-incomplete")
	if !strings.Contains(r.err.String(), "removed the last line") || !strings.Contains(r.out.String(), "2 label events so far") {
		t.Errorf("label --drop-incomplete:\n%s%s", r.out.String(), r.err.String())
	}
	c = labelClient(t, r.addr[drawfolder.WorksheetFile], "Jo Example")
	if st, _ := c.State(); st.Labeled != 2 || st.Resume != 2 {
		t.Errorf("after dropping the cut line: %+v", st)
	}
	give(t, c, st.Sequence[2].Item, "defect", "", "")
	r.close()
	if _, err := labeltrail.Read(trail); err != nil {
		t.Errorf("the trail after going on: %v", err)
	}
}

// TestABrokenChainIsRefusedWithItsLine: an edited label in the trail
// breaks the chain at the line after it; record names that line.
func TestABrokenChainIsRefusedWithItsLine(t *testing.T) {
	t.Parallel()
	fx := newRecFixture(t, false, 0)
	r := startLabel(t, fx.draw, "--plan", fx.planPath)
	c := labelClient(t, r.addr[drawfolder.WorksheetFile], "Jo Example")
	st, _ := c.State()
	for _, e := range st.Sequence[:4] {
		give(t, c, e.Item, "ok", "", "")
	}
	r.close()
	trail := filepath.Join(fx.draw, labeltrail.FileName)
	data, _ := os.ReadFile(trail)
	lines := strings.SplitAfter(string(data), "\n")
	lines[2] = strings.Replace(lines[2], `"label":"ok"`, `"label":"defect"`, 1)
	writeFile(t, trail, []byte(strings.Join(lines, "")))
	code, _, stderr := runProbity(t, "record", "--plan", fx.planPath, "--draw", fx.draw, "--trail", trail, "--out", filepath.Join(fx.dir, "rec"), "--allow-incomplete")
	if code != exitBadInput || !strings.Contains(stderr, "label-trail.jsonl line 4, field prev") || !strings.Contains(stderr, "hash chain is broken") {
		t.Errorf("record on an edited trail: %d\n%s", code, stderr)
	}
	if listDir(t, filepath.Join(fx.dir, "rec")) != nil {
		t.Error("a refused record left its folder")
	}
}

// TestLabelRefusesBadInputBeforeServing: usage errors and a draw of
// another plan exit 2 and leave no trail behind.
func TestLabelRefusesBadInputBeforeServing(t *testing.T) {
	t.Parallel()
	fx := newRecFixture(t, false, 0)
	other := newRecFixture(t, true, 0)
	for _, c := range []struct {
		args []string
		want string
	}{
		{[]string{fx.draw}, "--plan is required"},
		{[]string{fx.draw, "--plan", fx.planPath, "--port", "70000"}, "--port 70000"},
		{[]string{fx.draw, "--plan", fx.planPath, "--bind", "example.org"}, "--bind"},
		{[]string{fx.draw, "--plan", fx.planPath, "--media", filepath.Join(fx.dir, "none")}, "--media"},
		{[]string{fx.draw, "--plan", other.planPath}, "plan"},
		{[]string{"--plan", fx.planPath}, "exactly one draw folder"},
	} {
		code, _, stderr := runTest(t, append([]string{"label"}, c.args...))
		if code != exitBadInput || !strings.Contains(stderr, c.want) {
			t.Errorf("label %v: exit %d\n%s", c.args, code, stderr)
		}
		if _, err := os.Stat(filepath.Join(fx.draw, labeltrail.FileName)); err == nil {
			t.Fatalf("label %v left a trail", c.args)
		}
	}
}

// TestLabelWarnsOffTheLoopbackInterface: serving on every interface
// needs --bind and is warned about.
func TestLabelWarnsOffTheLoopbackInterface(t *testing.T) {
	t.Parallel()
	fx := newRecFixture(t, false, 0)
	r := startLabel(t, fx.draw, "--plan", fx.planPath, "--bind", "0.0.0.0")
	defer r.close()
	if !strings.Contains(r.err.String(), "warning: serving on 0.0.0.0, reachable from other machines") {
		t.Errorf("no warning:\n%s", r.err.String())
	}
	// A second server on the same draw is refused: one process appends
	// to a trail.
	code, _, stderr := runTest(t, []string{"label", fx.draw, "--plan", fx.planPath})
	if code != exitBadInput || !strings.Contains(stderr, "is open for writing in another process") || !strings.Contains(stderr, "hint: ") {
		t.Errorf("a second server on the draw: %d\n%s", code, stderr)
	}
	fx2 := newRecFixture(t, false, 0)
	r2 := startLabel(t, fx2.draw, "--plan", fx2.planPath, "--port", "0")
	defer r2.close()
	if r2.err.String() != "" {
		t.Errorf("a warning on the loopback interface:\n%s", r2.err.String())
	}
}
