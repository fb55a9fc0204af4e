package main

import (
	"bytes"
	"context"
	"encoding/csv"
	"fmt"
	"image"
	"image/color"
	"image/png"
	"os"
	"path/filepath"
	"strings"
	"sync"
	"testing"
	"time"

	"github.com/chromedp/cdproto/network"
	"github.com/chromedp/cdproto/runtime"
	"github.com/chromedp/chromedp"
	"github.com/chromedp/chromedp/kb"

	"probity/plan"
	"probity/plan/chrono"
	"probity/plan/testkit/needs"
	"probity/sampling"
	"probity/sampling/drawfolder"
	"probity/sampling/labeltrail"
	"probity/sampling/safewrite"
)

// browserFixture is a small invented draw for the browser tests: weld
// inspections at two yards, each shown as a scan image and a long
// inspector's remark.
type browserFixture struct {
	*recFixture
	media string
}

// labelSecondInBrowser labels the second worksheet at address with the
// keyboard in a tab of its own, as the second labeler: every doubled item
// starts unlabeled (the first labels never show) and gets its true label,
// but unsure, which stays unsure (an adjudicated class would leave the
// spare that replaced it with nothing to replace). It returns the typed
// equivalent of the second worksheet.
func labelSecondInBrowser(ctx context.Context, t *testing.T, fx *browserFixture, address, unsure, shots string) []drawfolder.WorksheetRow {
	t.Helper()
	tab, cancel := chromedp.NewContext(ctx)
	defer cancel()
	if err := chromedp.Run(tab, chromedp.EmulateViewport(1280, 800), chromedp.Navigate(address),
		chromedp.WaitVisible("#name", chromedp.ByID), chromedp.SendKeys("#name", "Sam Example\n", chromedp.ByID)); err != nil {
		t.Fatal(err)
	}
	want := make([]drawfolder.WorksheetRow, len(fx.second))
	copy(want, fx.second)
	cur := waitItem(tab, t, "")
	if l := text(tab, t, "#curlabel"); l != "not labeled" {
		t.Errorf("the second labeler sees the label %q", l)
	}
	checkLayout(tab, t, "second labels")
	shoot(tab, t, filepath.Join(shots, "label-second.png"))
	for i := range want {
		if want[i].RecordID != cur {
			t.Fatalf("the second worksheet shows %s where %s is due", cur, want[i].RecordID)
		}
		if l := text(tab, t, "#curlabel"); l != "not labeled" {
			t.Errorf("the second labeler sees %s labeled %q", cur, l)
		}
		if cur == unsure {
			press(tab, t, "u")
			waitFor(tab, t, `document.getElementById("curlabel").textContent === "unsure"`)
			press(tab, t, kb.ArrowRight)
			want[i].Label, want[i].Labeler = drawfolder.Unsure, "Sam Example"
		} else {
			press(tab, t, map[string]string{"sound": "1", "defect": "2"}[fx.truth[cur]])
			want[i].Label, want[i].Labeler = fx.truth[cur], "Sam Example"
		}
		if i < len(want)-1 {
			cur = waitItem(tab, t, cur)
		}
	}
	waitFor(tab, t, `!document.getElementById("done").hidden`)
	return want
}

// newBrowserFixture plans (ceiling 0.15, confidence 0.90: a sample of a
// few dozen) and draws as the command does by default (shares rounded up:
// 8 of each yard's 200, exactly proportional, so the plan's c judges it)
// with one spare per stratum; every scan is a real PNG in the media folder.
func newBrowserFixture(t *testing.T) *browserFixture {
	t.Helper()
	fx := &recFixture{dir: t.TempDir(), truth: map[string]string{}, show: []string{"scan", "remark"}}
	p0 := 0.01
	in := plan.Inputs{Ceiling: 0.15, Confidence: 0.90, CandidateCount: 1, Anticipated: &p0, ProducerRisk: 0.2,
		Method: plan.MethodExact, Multiplicity: plan.Bonferroni, Design: plan.DesignFixed, Require: plan.RequireAll}
	f, err := plan.Build(in, plan.Meta{ToolVersion: "test", Created: time.Date(2026, 11, 30, 9, 0, 0, 0, time.UTC),
		Seed: "5e1d0a7b9c3f4e2d8a6b0c1d2e3f4a5b", System: "Weld triage", SystemVersion: "0.9",
		Classes: []string{"sound", "defect"}, Candidates: []plan.Candidate{{Name: "triage-a", Column: "pred"}}})
	if err != nil {
		t.Fatal(err)
	}
	fx.file = f
	data, err := f.Marshal()
	if err != nil {
		t.Fatal(err)
	}
	fx.planPath = filepath.Join(fx.dir, "plan.yaml")
	writeFile(t, fx.planPath, data)
	media := filepath.Join(fx.dir, "scans")
	if err := os.Mkdir(media, 0o755); err != nil {
		t.Fatal(err)
	}
	var buf bytes.Buffer
	w := csv.NewWriter(&buf)
	w.Write([]string{"record_id", "yard", "scan", "remark", "pred"})
	for i := 1; i <= 400; i++ {
		id := fmt.Sprintf("w%04d", i)
		truth := "sound"
		if i%7 == 0 {
			truth = "defect"
		}
		fx.truth[id] = truth
		scan := fmt.Sprintf("yard-%d/scan-%04d.png", i%2, i)
		remark := fmt.Sprintf("Butt weld on rail section %d, inspected after grinding; the trace shows the usual reflections at the foot and a faint echo near the web that the inspector marked for a second look before the section returns to service.", i)
		w.Write([]string{id, []string{"east", "west"}[i%2], scan, remark, truth})
	}
	w.Flush()
	fx.logPath = filepath.Join(fx.dir, "log.csv")
	writeFile(t, fx.logPath, buf.Bytes())
	log, err := os.Open(fx.logPath)
	if err != nil {
		t.Fatal(err)
	}
	defer log.Close()
	folder, err := sampling.Draw(sampling.DrawInput{Plan: f, PlanFingerprint: plan.Fingerprint(data), LogPath: "log.csv", Log: log,
		Format: "csv", IDColumn: "record_id", StrataColumns: []string{"yard"}, Show: fx.show,
		Alloc: sampling.AllocOptions{Rule: sampling.Proportional, Rounding: sampling.RoundUp, MinPerStratum: 1, MinIfRoom: true, Spare: 1}, Double: 3, ToolVersion: "test"})
	if err != nil {
		t.Fatal(err)
	}
	drawn := chrono.FromClock(time.Date(2026, 11, 30, 15, 0, 0, 0, time.UTC))
	folder.Manifest.Drawn = &drawn
	fx.draw = filepath.Join(fx.dir, "draw")
	if err := drawfolder.Write(fx.draw, folder, safewrite.FolderOptions{}); err != nil {
		t.Fatal(err)
	}
	fx.ledger, fx.worksheet, fx.second = folder.Ledger, folder.Worksheet, folder.Second
	for _, r := range fx.worksheet {
		writeScan(t, filepath.Join(media, r.Show[0]), r.Item)
	}
	return &browserFixture{recFixture: fx, media: media}
}

// writeScan writes an invented scan trace: a 480×200 grey picture with a
// bright band whose height depends on seed.
func writeScan(t *testing.T, path string, seed int) {
	t.Helper()
	img := image.NewGray(image.Rect(0, 0, 480, 200))
	for y := 0; y < 200; y++ {
		for x := 0; x < 480; x++ {
			v := uint8(40 + (x*3+y*seed)%60)
			if y > 80+seed%30 && y < 110+seed%30 {
				v = 220
			}
			img.SetGray(x, y, color.Gray{Y: v})
		}
	}
	var buf bytes.Buffer
	if err := png.Encode(&buf, img); err != nil {
		t.Fatal(err)
	}
	if err := os.MkdirAll(filepath.Dir(path), 0o755); err != nil {
		t.Fatal(err)
	}
	writeFile(t, path, buf.Bytes())
}

// newBrowser starts a headless Chromium (Debian's chromium) that never
// reaches the network on its own (background networking makes it hang on
// a machine without one); as root it needs --no-sandbox.
func newBrowser(t *testing.T, width, height int) (context.Context, context.CancelFunc) {
	t.Helper()
	path := needs.Program(t, "chromium")
	// A fresh profile, removed at the end (the browser may still be
	// writing to it as it exits, so not by t.TempDir).
	profile, err := os.MkdirTemp("", "probity-chromium-")
	if err != nil {
		t.Fatal(err)
	}
	t.Cleanup(func() { os.RemoveAll(profile) })
	opts := []chromedp.ExecAllocatorOption{
		chromedp.ExecPath(path),
		chromedp.Headless, chromedp.DisableGPU, chromedp.NoSandbox, chromedp.NoFirstRun, chromedp.NoDefaultBrowserCheck,
		chromedp.Flag("disable-quic", true),
		chromedp.Flag("disable-background-networking", true),
		chromedp.Flag("disable-component-update", true),
		chromedp.Flag("disable-sync", true),
		chromedp.Flag("disable-extensions", true),
		chromedp.Flag("disable-dev-shm-usage", true),
		chromedp.Flag("hide-scrollbars", true),
		chromedp.UserDataDir(profile),
		chromedp.WindowSize(width, height),
	}
	actx, cancelAlloc := chromedp.NewExecAllocator(context.Background(), opts...)
	ctx, cancelCtx := chromedp.NewContext(actx)
	ctx, cancelTimeout := context.WithTimeout(ctx, 3*time.Minute)
	return ctx, func() { cancelTimeout(); cancelCtx(); cancelAlloc() }
}

// pageWatch records what a page asked for and what went wrong in it.
type pageWatch struct {
	mu       sync.Mutex
	requests []string
	errors   []string
}

func watchPage(ctx context.Context) *pageWatch {
	w := &pageWatch{}
	chromedp.ListenTarget(ctx, func(ev any) {
		w.mu.Lock()
		defer w.mu.Unlock()
		switch e := ev.(type) {
		case *network.EventRequestWillBeSent:
			w.requests = append(w.requests, e.Request.URL)
		case *runtime.EventExceptionThrown:
			w.errors = append(w.errors, e.ExceptionDetails.Error())
		case *runtime.EventConsoleAPICalled:
			if e.Type == runtime.APITypeError {
				w.errors = append(w.errors, fmt.Sprintf("console error %v", e.Args))
			}
		}
	})
	return w
}

// screenshotDir is where the browser tests keep their screenshots:
// PROBITY_TEST_SCREENSHOTS when set (to look at them), else a temp dir.
func screenshotDir(t *testing.T) string {
	if d := os.Getenv("PROBITY_TEST_SCREENSHOTS"); d != "" {
		if err := os.MkdirAll(d, 0o755); err != nil {
			t.Fatal(err)
		}
		return d
	}
	return t.TempDir()
}

// text reads an element's text.
func text(ctx context.Context, t *testing.T, sel string) string {
	t.Helper()
	var s string
	if err := chromedp.Run(ctx, chromedp.Text(sel, &s, chromedp.ByQuery)); err != nil {
		t.Fatalf("reading %s: %v", sel, err)
	}
	return s
}

// press presses keys on the page as a keyboard does: one keyDown that
// carries the key's text, which the page may prevent (chromedp.KeyEvent
// sends the text in a separate char event, which a page cannot stop:
// the "n" that opens the note box would land in it), then keyUp.
func press(ctx context.Context, t *testing.T, keys string) {
	t.Helper()
	for _, r := range keys {
		evs := kb.Encode(r)
		down := *evs[0]
		if len(evs) == 3 {
			down.Text, down.UnmodifiedText = evs[1].Text, evs[1].UnmodifiedText
		}
		if err := chromedp.Run(ctx, &down, evs[len(evs)-1]); err != nil {
			t.Fatalf("pressing %q: %v", keys, err)
		}
	}
}

// waitItem waits until the page shows a record other than not.
func waitItem(ctx context.Context, t *testing.T, not string) string {
	t.Helper()
	deadline := time.Now().Add(20 * time.Second)
	for time.Now().Before(deadline) {
		var id string
		var hidden bool
		chromedp.Run(ctx, chromedp.Evaluate(`document.getElementById("item").hidden`, &hidden),
			chromedp.Evaluate(`document.getElementById("recid").textContent`, &id))
		if id = strings.TrimPrefix(id, "record "); !hidden && id != "" && id != not {
			return id
		}
		time.Sleep(20 * time.Millisecond)
	}
	failShot(ctx, t)
	t.Fatalf("the page did not move on from %s", not)
	return ""
}

// waitFor waits until a JavaScript condition holds in the page.
func waitFor(ctx context.Context, t *testing.T, cond string) {
	t.Helper()
	deadline := time.Now().Add(20 * time.Second)
	for time.Now().Before(deadline) {
		var ok bool
		if err := chromedp.Run(ctx, chromedp.Evaluate(cond, &ok)); err == nil && ok {
			return
		}
		time.Sleep(20 * time.Millisecond)
	}
	failShot(ctx, t)
	t.Fatalf("timed out waiting for %s", cond)
}

// checkLayout checks that nothing sticks out of the viewport sideways and
// that the key hints are visible.
func checkLayout(ctx context.Context, t *testing.T, what string) {
	t.Helper()
	var overflow bool
	var hints string
	if err := chromedp.Run(ctx,
		chromedp.Evaluate(`document.documentElement.scrollWidth > window.innerWidth`, &overflow),
		chromedp.Evaluate(`(() => { const k = document.getElementById("keys"); const r = k.getBoundingClientRect();
			return k.hidden ? "hidden" : (r.bottom <= window.innerHeight + 1 && r.height > 0 ? k.textContent : "off screen"); })()`, &hints),
	); err != nil {
		t.Fatal(err)
	}
	if overflow {
		t.Errorf("%s: the page is wider than the window", what)
	}
	for _, k := range []string{"1 sound", "2 defect", "u unsure", "n note", "← previous", "→ next"} {
		if !strings.Contains(hints, k) {
			t.Errorf("%s: the key hints %q lack %q", what, hints, k)
		}
	}
}

// failShot keeps a screenshot of a page a test is about to fail on, with
// the page's message.
func failShot(ctx context.Context, t *testing.T) {
	var msg string
	chromedp.Run(ctx, chromedp.Evaluate(`document.getElementById("message").textContent`, &msg))
	t.Logf("the page's message: %q", msg)
	shoot(ctx, t, filepath.Join(screenshotDir(t), "failure-"+strings.ReplaceAll(t.Name(), "/", "-")+".png"))
}

// shoot saves a screenshot of the window.
func shoot(ctx context.Context, t *testing.T, path string) {
	t.Helper()
	var buf []byte
	if err := chromedp.Run(ctx, chromedp.CaptureScreenshot(&buf)); err != nil {
		t.Fatal(err)
	}
	writeFile(t, path, buf)
}

// TestLabelingInABrowser labels a small draw end to end in headless
// Chromium with the keyboard only: the name, a note, an unsure item and
// the spare the page offers, a wrong key corrected with a reason, every
// other item by its class key. The page loads nothing but the server's
// own files and raises no error; screenshots at 1280×800 and at a narrow
// width are kept. Then record on the trail gives the record of the
// equivalent typed worksheet. It runs alone, not in parallel: a real
// browser's waits should not compete with the other tests for the CPU.
func TestLabelingInABrowser(t *testing.T) {
	if testing.Short() {
		t.Skip("starts a browser")
	}
	fx := newBrowserFixture(t)
	ctx, cancel := newBrowser(t, 1280, 800)
	defer cancel()
	watch := watchPage(ctx)
	r := startLabel(t, fx.draw, "--plan", fx.planPath, "--media", fx.media)
	address := r.addr[drawfolder.WorksheetFile]
	shots := screenshotDir(t)

	if err := chromedp.Run(ctx, network.Enable(), chromedp.EmulateViewport(1280, 800), chromedp.Navigate(address),
		chromedp.WaitVisible("#name", chromedp.ByID), chromedp.SendKeys("#name", "Dana Example\n", chromedp.ByID)); err != nil {
		t.Fatal(err)
	}
	classKey := map[string]string{"sound": "1", "defect": "2"}
	const who = "Dana Example"
	want := make([]drawfolder.WorksheetRow, len(fx.worksheet))
	copy(want, fx.worksheet)
	byID := map[string]*drawfolder.WorksheetRow{}
	for i := range want {
		byID[want[i].RecordID] = &want[i]
	}
	set := func(id, label, note string) { r := byID[id]; r.Label, r.Note, r.Labeler = label, note, who }

	// The first item: a note, then unsure; the page offers its spare.
	first := waitItem(ctx, t, "")
	checkLayout(ctx, t, "1280×800")
	var imgOK bool
	if err := chromedp.Run(ctx, chromedp.Evaluate(`(() => { const i = document.querySelector("#fields img"); return !!i && i.complete && i.naturalWidth === 480; })()`, &imgOK)); err != nil || !imgOK {
		t.Errorf("the scan image is not shown (%v)", err)
	}
	shoot(ctx, t, filepath.Join(shots, "label-1280x800.png"))
	press(ctx, t, "n")
	waitFor(ctx, t, `!document.getElementById("notebox").hidden`)
	if err := chromedp.Run(ctx, chromedp.SendKeys("#note", "scan too dark to judge\n", chromedp.ByID)); err != nil {
		t.Fatal(err)
	}
	waitFor(ctx, t, `document.getElementById("curnote").textContent.includes("too dark")`)
	press(ctx, t, "u")
	waitFor(ctx, t, `!document.getElementById("offer").hidden`)
	set(first, "unsure", "scan too dark to judge")
	offer := text(ctx, t, "#offer")
	if !strings.Contains(offer, "press s") {
		t.Errorf("the offer reads %q", offer)
	}
	shoot(ctx, t, filepath.Join(shots, "label-unsure-offer.png"))
	press(ctx, t, "s")
	spare := waitItem(ctx, t, first)
	if s := text(ctx, t, "#sparefor"); !strings.Contains(s, "spare, replacing item") {
		t.Errorf("the spare is not marked as one: %q", s)
	}
	press(ctx, t, classKey[fx.truth[spare]])
	set(spare, fx.truth[spare], "")
	// After the spare, the page goes back to the first item still to
	// label.
	cur := waitItem(ctx, t, spare)
	// The second item: the wrong key, then back and the right one with a
	// reason.
	wrong := map[string]string{"1": "2", "2": "1"}[classKey[fx.truth[cur]]]
	press(ctx, t, wrong)
	next := waitItem(ctx, t, cur)
	press(ctx, t, kb.ArrowLeft)
	if back := waitItem(ctx, t, next); back != cur {
		t.Fatalf("← went to %s, not %s", back, cur)
	}
	press(ctx, t, classKey[fx.truth[cur]])
	waitFor(ctx, t, `!document.getElementById("reason").hidden`)
	if err := chromedp.Run(ctx, chromedp.SendKeys("#reason-input", "pressed the wrong key\n", chromedp.ByID)); err != nil {
		t.Fatal(err)
	}
	set(cur, fx.truth[cur], "")
	cur = waitItem(ctx, t, cur)
	// Every other item by its class key, as fast as the page moves on.
	for {
		press(ctx, t, classKey[fx.truth[cur]])
		set(cur, fx.truth[cur], "")
		var done bool
		deadline := time.Now().Add(20 * time.Second)
		prev := cur
		for time.Now().Before(deadline) {
			chromedp.Run(ctx, chromedp.Evaluate(`!document.getElementById("done").hidden`, &done))
			if done {
				break
			}
			var id string
			chromedp.Run(ctx, chromedp.Evaluate(`document.getElementById("recid").textContent`, &id))
			if id = strings.TrimPrefix(id, "record "); id != prev && id != "" {
				cur = id
				break
			}
			time.Sleep(10 * time.Millisecond)
		}
		if done {
			break
		}
		if cur == prev {
			failShot(ctx, t)
			t.Fatalf("the page did not move on from %s", cur)
		}
	}
	count := text(ctx, t, "#count")
	shoot(ctx, t, filepath.Join(shots, "label-done.png"))

	// A narrow window: the last item again, with its long remark.
	if err := chromedp.Run(ctx, chromedp.EmulateViewport(390, 800)); err != nil {
		t.Fatal(err)
	}
	press(ctx, t, kb.ArrowLeft)
	waitItem(ctx, t, "")
	checkLayout(ctx, t, "390×800")
	shoot(ctx, t, filepath.Join(shots, "label-390x800.png"))

	secondWant := labelSecondInBrowser(ctx, t, fx, r.addr[drawfolder.WorksheetSecondFile], first, shots)

	watch.mu.Lock()
	origin := address[:strings.Index(address, "/s/")+1]
	for _, u := range watch.requests {
		if !strings.HasPrefix(u, origin) {
			t.Errorf("the page asked for %s, outside the server", u)
		}
	}
	if len(watch.errors) > 0 {
		t.Errorf("errors in the page: %v", watch.errors)
	}
	watch.mu.Unlock()
	cancel()
	if code := r.close(); code != exitOK {
		t.Fatalf("label exit %d", code)
	}
	n := 0
	for _, r := range want {
		if r.Label != "" {
			n++
		}
	}
	if count != fmt.Sprintf("Labeled %d of %d", n, n) {
		t.Errorf("the count reads %q, want %d of %d", count, n, n)
	}

	trail := filepath.Join(fx.draw, labeltrail.FileName)
	outT, outW := filepath.Join(fx.dir, "rec-trail"), filepath.Join(fx.dir, "rec-worksheet")
	code, stdout, stderr := runProbity(t, "record", "--plan", fx.planPath, "--draw", fx.draw, "--trail", trail, "--out", outT)
	if code != exitOK || !strings.Contains(stdout, ", 1 changed") {
		t.Fatalf("record --trail: %d\n%s%s", code, stdout, stderr)
	}
	if code, _, stderr := runProbity(t, "record", "--plan", fx.planPath, "--draw", fx.draw, "--labels", writeRows(t, fx.recFixture, "typed.csv", want),
		"--second", writeRows(t, fx.recFixture, "typed-second.csv", secondWant), "--out", outW); code != exitOK {
		t.Fatalf("record --labels: %d\n%s", code, stderr)
	}
	sameRecordBesidesTrail(t, recordJSON(t, outT), recordJSON(t, outW))
}
