package labelserver

import (
	"fmt"
	"net/http"
	"os"
	"strconv"
	"strings"
	"sync"
	"testing"

	"probity/sampling/drawfolder"
	"probity/sampling/labeltrail"
)

// sheetPath is the address of the named worksheet.
func sheetPath(t *testing.T, s *Server, name string) string {
	t.Helper()
	for _, sh := range s.Sheets() {
		if sh.Name == name {
			return sh.Path
		}
	}
	t.Fatalf("no worksheet %s", name)
	return ""
}

func fileSize(t *testing.T, path string) int64 {
	t.Helper()
	st, err := os.Stat(path)
	if err != nil {
		t.Fatal(err)
	}
	return st.Size()
}

func TestEveryResponseCarriesTheSecurityHeaders(t *testing.T) {
	s, ts, _ := newTestServer(t, true)
	c := open(t, ts, sheetPath(t, s, drawfolder.WorksheetFile))
	for _, rel := range []string{"", "app.js", "api/state", "media/scan-01.png", "api/item/99"} {
		req, _ := http.NewRequest("GET", c.base+rel, nil)
		resp, err := c.http.Do(req)
		if err != nil {
			t.Fatal(err)
		}
		resp.Body.Close()
		csp := resp.Header.Get("Content-Security-Policy")
		if !strings.Contains(csp, "default-src 'none'") || !strings.Contains(csp, "frame-ancestors 'none'") {
			t.Errorf("%s: Content-Security-Policy %q", rel, csp)
		}
		if resp.Header.Get("X-Content-Type-Options") != "nosniff" || resp.Header.Get("Cache-Control") != "no-store" {
			t.Errorf("%s: headers %v", rel, resp.Header)
		}
	}
}

func TestRequestsWithoutTheTokenAreRefused(t *testing.T) {
	s, ts, trail := newTestServer(t, true)
	good := sheetPath(t, s, drawfolder.WorksheetFile)
	tok := strings.Trim(strings.TrimPrefix(good, "/s/"), "/")
	wrong := "/s/" + strings.Repeat("0", len(tok)) + "/"
	before := fileSize(t, trail)
	cases := []struct{ method, path string }{
		{"GET", "/"}, {"GET", "/s/"}, {"GET", "/app.js"}, {"GET", "/api/state"},
		{"GET", wrong}, {"GET", wrong + "app.js"}, {"GET", wrong + "api/state"}, {"GET", wrong + "api/item/1"},
		{"GET", wrong + "media/scan-01.png"}, {"POST", wrong + "api/label"}, {"POST", wrong + "api/labeler"},
		{"GET", "/s/" + tok[:len(tok)-1] + "/api/state"}, {"GET", "/s/" + tok + "0/api/state"},
		{"GET", "/media/scan-01.png"},
	}
	for _, c := range cases {
		req, _ := http.NewRequest(c.method, ts.URL+c.path, strings.NewReader(`{"name":"x"}`))
		req.Header.Set("Content-Type", "application/json")
		resp, err := http.DefaultClient.Do(req)
		if err != nil {
			t.Fatal(err)
		}
		resp.Body.Close()
		if resp.StatusCode != http.StatusForbidden {
			t.Errorf("%s %s: status %d, want 403", c.method, c.path, resp.StatusCode)
		}
	}
	if fileSize(t, trail) != before {
		t.Error("a refused request wrote to the trail")
	}
}

func TestStateChangesNeedTheSessionsCSRFToken(t *testing.T) {
	s, ts, trail := newTestServer(t, false)
	path := sheetPath(t, s, drawfolder.WorksheetFile)
	c := open(t, ts, path)
	c.name("Dana Example")
	other := open(t, ts, path) // another browser: its own session and token
	ev := LabelRequest{Item: 1, Label: "defect"}
	before := fileSize(t, trail)
	cases := []struct {
		what    string
		headers map[string]string
		want    int
	}{
		{"wrong CSRF token", map[string]string{csrfHeader: strings.Repeat("0", 64)}, http.StatusForbidden},
		{"no CSRF token", map[string]string{csrfHeader: ""}, http.StatusForbidden},
		{"another session's CSRF token", map[string]string{csrfHeader: other.csrf}, http.StatusForbidden},
		{"cross-origin", map[string]string{"Origin": "http://evil.example"}, http.StatusForbidden},
		{"not JSON", map[string]string{"Content-Type": "text/plain"}, http.StatusUnsupportedMediaType},
	}
	for _, k := range cases {
		if code, body := c.do("POST", "api/label", ev, k.headers); code != k.want {
			t.Errorf("%s: status %d (%s), want %d", k.what, code, body, k.want)
		}
		if code, _ := c.do("POST", "api/labeler", map[string]string{"name": "Mallory"}, k.headers); code != k.want {
			t.Errorf("%s (labeler): status %d, want %d", k.what, code, k.want)
		}
	}
	// A request without the session's cookie (a page of another site
	// posting blindly) is refused too.
	req, _ := http.NewRequest("POST", c.base+"api/label", strings.NewReader(`{"item":1,"label":"defect"}`))
	req.Header.Set("Content-Type", "application/json")
	req.Header.Set(csrfHeader, c.csrf)
	resp, err := http.DefaultClient.Do(req)
	if err != nil {
		t.Fatal(err)
	}
	resp.Body.Close()
	if resp.StatusCode != http.StatusForbidden {
		t.Errorf("no session cookie: status %d", resp.StatusCode)
	}
	if fileSize(t, trail) != before {
		t.Fatal("a refused request wrote to the trail")
	}
	if st := c.state(); st.Labeler != "Dana Example" || st.Labeled != 0 {
		t.Errorf("state after refusals: %+v", st)
	}
	// The right token works.
	c.mustLabel(1, "defect", "", "")
}

func TestTheLabelerIsNamedOnceBeforeLabeling(t *testing.T) {
	s, ts, _ := newTestServer(t, false)
	c := open(t, ts, sheetPath(t, s, drawfolder.WorksheetFile))
	if code, _, body := c.label(1, "defect", "", ""); code != http.StatusForbidden {
		t.Errorf("a label before the name: %d %s", code, body)
	}
	for _, bad := range []string{"", "   ", "two\nlines", strings.Repeat("x", labeltrail.MaxName+1)} {
		if code, _ := c.do("POST", "api/labeler", map[string]string{"name": bad}, nil); code != http.StatusBadRequest {
			t.Errorf("name %q: status %d", bad, code)
		}
	}
	c.name("Dana Example")
	c.name("Dana Example")
	if code, _ := c.do("POST", "api/labeler", map[string]string{"name": "Jo Example"}, nil); code != http.StatusConflict {
		t.Errorf("a second name in one session: status %d", code)
	}
}

func TestMediaCannotEscapeTheFolder(t *testing.T) {
	s, ts, _ := newTestServer(t, true)
	c := open(t, ts, sheetPath(t, s, drawfolder.WorksheetFile))
	c.name("Dana Example")
	code, body := c.do("GET", "media/scan-01.png", nil, nil)
	if code != 200 || !strings.HasPrefix(body, "\x89PNG") {
		t.Fatalf("the shown image: %d", code)
	}
	if it := c.item(1); it.Fields[0].Image != "media/scan-01.png" {
		t.Errorf("item 1's image address %q", it.Fields[0].Image)
	}
	// Item 2 names ../outside.png and item 3 link.png, a symbolic link
	// out of the folder: both are shown as text, never as images.
	for _, item := range []int{2, 3} {
		if it := c.item(item); it.Fields[0].Image != "" {
			t.Errorf("item %d is shown as the image %q", item, it.Fields[0].Image)
		}
	}
	for _, rel := range []string{"media/link.png", "media/..%2foutside.png", "media/%2e%2e/outside.png", "media/%2e%2e%2foutside.png",
		"media/../../outside.png", "media/scan-01.png/..%2f..%2foutside.png", "media/other.png", "media/", "media/%2fetc%2fpasswd"} {
		code, body := c.do("GET", rel, nil, nil)
		if code == 200 || strings.Contains(body, "secret") {
			t.Errorf("%s: status %d, body %q", rel, code, body)
		}
	}
	// Without a media folder nothing is served as an image.
	s2, ts2, _ := newTestServer(t, false)
	c2 := open(t, ts2, sheetPath(t, s2, drawfolder.WorksheetFile))
	if code, _ := c2.do("GET", "media/scan-01.png", nil, nil); code != http.StatusNotFound {
		t.Errorf("no media folder: status %d", code)
	}
	if it := c2.item(1); it.Fields[0].Image != "" {
		t.Errorf("no media folder: image %q", it.Fields[0].Image)
	}
}

func TestAnUnsureItemIsOfferedTheSpareTheDrawAssigns(t *testing.T) {
	s, ts, _ := newTestServer(t, false)
	c := open(t, ts, sheetPath(t, s, drawfolder.WorksheetFile))
	c.name("Dana Example")
	st := c.state()
	if st.Total != 6 || len(st.Sequence) != 6 || st.Resume != 0 {
		t.Fatalf("start: %+v", st)
	}
	// Spares are not in the sequence until assigned, and cannot be read
	// or labeled.
	if code, _ := c.do("GET", "api/item/7", nil, nil); code != http.StatusNotFound {
		t.Errorf("an unassigned spare can be read: %d", code)
	}
	if code, _ := c.do("POST", "api/label", LabelRequest{Item: 8, Label: "sound"}, nil); code != http.StatusConflict {
		t.Errorf("an unassigned spare was labeled: %d", code)
	}
	// Item 1 is in the first stratum, whose spares are items 8 (key 7)
	// and 7 (key 8): key order offers item 8 first.
	v := c.mustLabel(1, "unsure", "too dark to judge", "")
	if v.Offer != 8 || v.Total != 7 || v.Labeled != 1 || len(v.Sequence) != 7 {
		t.Fatalf("unsure item 1: offer %d, total %d, labeled %d, sequence %v", v.Offer, v.Total, v.Labeled, v.Sequence)
	}
	if it := c.item(8); it.SpareFor != 1 {
		t.Errorf("item 8 spare for %d", it.SpareFor)
	}
	if code, _ := c.do("POST", "api/label", LabelRequest{Item: 7, Label: "sound"}, nil); code != http.StatusConflict {
		t.Errorf("the second spare was labeled before the first: %d", code)
	}
	// The spare itself unsure: the next spare of the stratum replaces
	// item 1.
	if v := c.mustLabel(8, "unsure", "", ""); v.Offer != 7 {
		t.Errorf("unsure spare 8: offer %d, want 7", v.Offer)
	}
	// A label that assigns no spare leaves the sequence out of the answer.
	if v := c.mustLabel(7, "sound", "", ""); v.Sequence != nil {
		t.Errorf("the answer repeats an unchanged sequence: %v", v.Sequence)
	}
	// Item 1 cannot become a class while its spares are labeled: they
	// would replace nothing.
	if code, _, body := c.label(1, "defect", "", "seen better on a second look"); code != http.StatusConflict {
		t.Errorf("item 1 changed with its spares labeled: %d %s", code, body)
	}
	// Item 3, of the same stratum, unsure: no spare is left for it...
	if v := c.mustLabel(3, "unsure", "", ""); v.Offer != 0 || !v.NoSpare {
		t.Errorf("unsure item 3 with no spare left: %+v", v)
	}
	// ...until item 1 is labeled after all: the rule then gives item 1's
	// spares to item 3 (the first unsure item of the stratum).
	c.mustLabel(1, "defect", "", "seen better on a second look")
	var items []string
	for _, e := range c.state().Sequence {
		items = append(items, strconv.Itoa(e.Item)+"/"+strconv.Itoa(e.SpareFor))
	}
	if got := strings.Join(items, " "); got != "1/0 2/0 3/0 4/0 5/0 6/0 7/3 8/3" {
		t.Errorf("sequence %s", got)
	}
}

func TestAChangedLabelNeedsAReason(t *testing.T) {
	s, ts, trail := newTestServer(t, false)
	c := open(t, ts, sheetPath(t, s, drawfolder.WorksheetFile))
	c.name("Dana Example")
	c.mustLabel(2, "defect", "", "")
	if code, _, body := c.label(2, "sound", "", ""); code != http.StatusBadRequest || !strings.Contains(body, "reason") {
		t.Errorf("a change without a reason: %d %s", code, body)
	}
	c.mustLabel(2, "sound", "", "misread the trace")
	// A stale previous label (another labeler changed it meanwhile) is a
	// conflict, and changes nothing.
	before := fileSize(t, trail)
	code, body := c.do("POST", "api/label", LabelRequest{Item: 2, Label: "defect", PreviousLabel: "defect", Reason: "x"}, nil)
	if code != http.StatusConflict || fileSize(t, trail) != before {
		t.Errorf("a stale event: %d %s", code, body)
	}
	// A note alone needs no reason.
	c.mustLabel(2, "sound", "edge of the weld only", "")
	tr, err := labeltrail.Read(trail)
	if err != nil {
		t.Fatal(err)
	}
	if len(tr.Entries) != 4 || tr.Entries[2].Label.Reason != "misread the trace" {
		t.Errorf("trail %+v", tr.Entries)
	}
}

func TestTheHostHeaderIsChecked(t *testing.T) {
	draw, _ := writeFixture(t)
	s, ts, _ := serveDraw(t, draw, "")
	s.cfg.Hosts = []string{"127.0.0.1:1"}
	req, _ := http.NewRequest("GET", ts.URL+sheetPath(t, s, drawfolder.WorksheetFile), nil)
	resp, err := http.DefaultClient.Do(req)
	if err != nil {
		t.Fatal(err)
	}
	resp.Body.Close()
	if resp.StatusCode != http.StatusForbidden {
		t.Errorf("an unknown Host: status %d", resp.StatusCode)
	}
}

// TestTwoLabelersAtOnceLoseNothing: two browsers label the first
// worksheet and a third the second one, all at once; every confirmed
// event is in the trail, whose chain holds.
func TestTwoLabelersAtOnceLoseNothing(t *testing.T) {
	s, ts, trail := newTestServer(t, false)
	first := sheetPath(t, s, drawfolder.WorksheetFile)
	a, b := open(t, ts, first), open(t, ts, first)
	second := open(t, ts, sheetPath(t, s, drawfolder.WorksheetSecondFile))
	a.name("Dana Example")
	b.name("Jo Example")
	second.name("Sam Example")
	var wg sync.WaitGroup
	var mu sync.Mutex
	confirmed := 0
	work := func(c *client, items []int, rounds int) {
		defer wg.Done()
		for r := 0; r < rounds; r++ {
			for _, it := range items {
				note := fmt.Sprintf("round %d", r)
				code, _, _ := c.label(it, "defect", note, "")
				if code == 200 {
					mu.Lock()
					confirmed++
					mu.Unlock()
				}
			}
		}
	}
	wg.Add(3)
	go work(a, []int{1, 3, 5}, 10)
	go work(b, []int{2, 4, 6}, 10)
	go work(second, []int{1, 2}, 10)
	wg.Wait()
	tr, err := labeltrail.Read(trail)
	if err != nil {
		t.Fatal(err)
	}
	if got := len(tr.Entries) - 1; got != confirmed || confirmed != 80 {
		t.Fatalf("%d events confirmed, %d in the trail, want 80", confirmed, got)
	}
	// Both labelers on one item at once: one wins, the other is told the
	// item changed; nothing is lost or doubled.
	wg.Add(2)
	codes := make([]int, 2)
	for i, c := range []*client{a, b} {
		go func() {
			defer wg.Done()
			codes[i], _ = c.do("POST", "api/label", LabelRequest{Item: 1, Label: "sound", PreviousLabel: "defect", PreviousNote: "round 9", Reason: "second look " + strconv.Itoa(i)}, nil)
		}()
	}
	wg.Wait()
	if !(codes[0] == 200 && codes[1] == 409 || codes[0] == 409 && codes[1] == 200) {
		t.Errorf("two changes of one item at once: %v", codes)
	}
}

// TestNoResponseUnblindsTheLabeler labels the whole draw as two labelers
// would (classes, an unsure item and its spare, a note, a correction, the
// second worksheet) and scans every response body: no stratum, weight,
// key or prediction of the ledger appears, and the second labeler's
// responses never carry the first labels.
func TestNoResponseUnblindsTheLabeler(t *testing.T) {
	s, ts, _ := newTestServer(t, true)
	c := open(t, ts, sheetPath(t, s, drawfolder.WorksheetFile))
	c.name("Dana Example")
	c.state()
	firstNote := "first-labeler-note-7f3a"
	c.mustLabel(1, "unsure", firstNote, "")
	c.mustLabel(8, "defect", "", "")
	for it := 2; it <= 6; it++ {
		c.mustLabel(it, []string{"defect", "sound"}[it%2], "", "")
	}
	c.mustLabel(4, "sound", "", "looked again")
	c.do("GET", "media/scan-01.png", nil, nil)
	c.do("GET", "api/item/7", nil, nil)
	c.state()

	sc := open(t, ts, sheetPath(t, s, drawfolder.WorksheetSecondFile))
	sc.name("Sam Example")
	st := sc.state()
	if st.Total != 2 || st.Labeled != 0 {
		t.Errorf("second worksheet: %+v", st)
	}
	for _, e := range st.Sequence {
		if it := sc.item(e.Item); it.Label != "" || it.Note != "" || it.Labeler != "" {
			t.Errorf("the second labeler sees item %d's first label: %+v", e.Item, it)
		}
	}
	sc.mustLabel(1, "sound", "", "")
	sc.mustLabel(2, "defect", "", "")
	sc.state()

	secret := []string{northStratum, southStratum, northWeight, southWeight, "123.46", "98.77", "370", "296"}
	for item := 1; item <= 10; item++ {
		secret = append(secret, fixtureKey(item), fixtureKey(item)[56:], prediction(item))
	}
	check := func(who string, bodies []string, extra ...string) {
		for i, body := range bodies {
			for _, v := range append(secret, extra...) {
				if strings.Contains(body, v) {
					t.Errorf("%s: response %d contains %q:\n%.300s", who, i, v, body)
				}
			}
		}
	}
	if len(c.bodies) < 20 || len(sc.bodies) < 8 {
		t.Fatalf("only %d and %d responses scanned", len(c.bodies), len(sc.bodies))
	}
	check("first labeler", c.bodies)
	check("second labeler", sc.bodies, firstNote, "Dana Example", "looked again")
}
