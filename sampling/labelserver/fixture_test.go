package labelserver

import (
	"bytes"
	"encoding/json"
	"fmt"
	"io"
	"math/rand/v2"
	"net/http"
	"net/http/cookiejar"
	"net/http/httptest"
	"os"
	"path/filepath"
	"strings"
	"sync"
	"testing"
	"time"

	"probity/sampling/drawfolder"
	"probity/sampling/labeltrail"
	"probity/sampling/safewrite"
)

// The fixture's values that the labeler must never see: stratum labels,
// weights, keys and the candidates' predictions (common practice, no
// source: each is chosen so that it cannot occur in a page by chance).
const (
	northStratum = "north-zq-stratum"
	southStratum = "south-xk-stratum"
	northWeight  = "123.4567"
	southWeight  = "98.7651"
)

var t0 = time.Date(2026, 12, 1, 9, 30, 0, 0, time.UTC)

// prediction is item's score in the ledger: a value no page shows by
// chance.
func prediction(item int) string { return fmt.Sprintf("0.9%02d7313", item) }

func fixtureKey(i int) string { return fmt.Sprintf("%064x", 0xfeed0000+i) }

// writeFixture writes an invented draw folder: per stratum three sample
// items and two spares, the first two items doubled, and a media folder
// with one image, one name escaping the folder and one symbolic link out
// of it. It returns the folder's and the media folder's paths.
func writeFixture(t *testing.T) (string, string) {
	t.Helper()
	dir := t.TempDir()
	draw := filepath.Join(dir, "draw")
	media := filepath.Join(dir, "media")
	os.Mkdir(media, 0o755)
	png := []byte("\x89PNG\r\n\x1a\n" + strings.Repeat("\x00", 32))
	os.WriteFile(filepath.Join(media, "scan-01.png"), png, 0o644)
	os.WriteFile(filepath.Join(dir, "outside.png"), []byte("secret outside the media folder"), 0o644)
	if err := os.Symlink(filepath.Join(dir, "outside.png"), filepath.Join(media, "link.png")); err != nil {
		t.Fatal(err)
	}
	strata := []drawfolder.StratumInfo{
		{Label: northStratum, Population: 370, Sample: 3, Spare: 2, Weight: 123.4567},
		{Label: southStratum, Population: 296, Sample: 3, Spare: 2, Weight: 98.7651},
	}
	c := &drawfolder.Content{
		Manifest: &drawfolder.Manifest{
			Format: drawfolder.ManifestFormat, ToolVersion: "test", PlanFingerprint: strings.Repeat("e", 64),
			Seed: "s", SelectionSeed: "s", KeyDefinition: "k",
			Log:      drawfolder.LogInfo{Path: "log.csv", SHA256: "x", Bytes: 10, Rows: 666, Format: "csv", Compression: "none"},
			IDColumn: "record_id", Allocation: drawfolder.AllocationInfo{Rule: "proportional", Spare: 2},
			Strata: strata, SampleSize: 6, Spares: 4, ShowColumns: []string{"scan", "remark"}, Double: 2,
		},
		Candidates: []string{"m1"},
		Show:       []string{"scan", "remark"},
	}
	long := strings.Repeat("a very long remark that must wrap on the page without breaking the layout ", 6) + strings.Repeat("x", 300)
	shows := [][]string{
		{"scan-01.png", "weld near a joint"}, {"../outside.png", long}, {"link.png", "third"},
		{"ref-4", "fourth"}, {"ref-5", "fifth"}, {"ref-6", "sixth"},
		{"ref-7", "spare one"}, {"ref-8", "spare two"}, {"ref-9", "spare three"}, {"ref-10", "spare four"},
	}
	// Worksheet order: sample items (key order across strata), then the
	// spares; each stratum's spares in key order.
	layout := []struct {
		stratum int
		spare   bool
		key     int
	}{{0, false, 1}, {1, false, 2}, {0, false, 3}, {1, false, 4}, {0, false, 5}, {1, false, 6},
		{0, true, 8}, {0, true, 7}, {1, true, 9}, {1, true, 10}}
	for i, l := range layout {
		s := strata[l.stratum]
		item := i + 1
		id := fmt.Sprintf("rec-%03d", item)
		pred := prediction(item)
		c.Ledger = append(c.Ledger, drawfolder.LedgerRow{Item: item, RecordID: id, Stratum: s.Label, StratumSize: s.Population,
			StratumSample: s.Sample, Weight: s.Weight, Key: fixtureKey(l.key), Spare: l.spare, Double: item <= 2, Predictions: []string{pred}})
		w := drawfolder.WorksheetRow{Item: item, RecordID: id, Show: shows[i]}
		c.Worksheet = append(c.Worksheet, w)
		if item <= 2 {
			c.Second = append(c.Second, w)
		}
	}
	if err := drawfolder.Write(draw, c, safewrite.FolderOptions{}); err != nil {
		t.Fatal(err)
	}
	return draw, media
}

var classes = []string{"defect", "sound"}

// newTestServer opens the fixture and serves it; the clock steps one
// second per reading.
func newTestServer(t *testing.T, media bool) (*Server, *httptest.Server, string) {
	t.Helper()
	draw, mediaDir := writeFixture(t)
	if !media {
		mediaDir = ""
	}
	return serveDraw(t, draw, mediaDir)
}

func serveDraw(t *testing.T, draw, mediaDir string) (*Server, *httptest.Server, string) {
	t.Helper()
	f, err := drawfolder.Open(draw, strings.Repeat("e", 64), []string{"m1"})
	if err != nil {
		t.Fatal(err)
	}
	d, err := labeltrail.DrawOf(f, classes)
	if err != nil {
		t.Fatal(err)
	}
	path := filepath.Join(draw, labeltrail.FileName)
	var log *labeltrail.Log
	if _, err := os.Stat(path); err == nil {
		log, _, err = labeltrail.Open(path, d, false)
		if err != nil {
			t.Fatal(err)
		}
	} else if log, err = labeltrail.Create(path, d, t0); err != nil {
		t.Fatal(err)
	}
	var mu sync.Mutex
	tick := t0
	now := func() time.Time {
		mu.Lock()
		defer mu.Unlock()
		tick = tick.Add(time.Second)
		return tick
	}
	s, err := New(Config{Folder: f, Classes: classes, Trail: log, Media: mediaDir, Now: now, Random: rand.NewChaCha8([32]byte{7})})
	if err != nil {
		t.Fatal(err)
	}
	ts := httptest.NewServer(s.Handler())
	t.Cleanup(func() { ts.Close(); s.Close(); log.Close() })
	return s, ts, path
}

// client is one browser: its cookies, its CSRF token, and every response
// body it received.
type client struct {
	t      *testing.T
	base   string
	http   *http.Client
	csrf   string
	mu     sync.Mutex
	bodies []string
}

// open loads the worksheet's page at path, as a browser does.
func open(t *testing.T, ts *httptest.Server, path string) *client {
	t.Helper()
	jar, _ := cookiejar.New(nil)
	c := &client{t: t, base: ts.URL + path, http: &http.Client{Jar: jar}}
	code, body := c.do("GET", "", nil, nil)
	m := csrfMeta.FindStringSubmatch(body)
	if code != 200 || m == nil {
		t.Fatalf("page: %d %s", code, body)
	}
	c.csrf = m[1]
	for _, a := range []string{"app.js", "app.css"} {
		if code, _ := c.do("GET", a, nil, nil); code != 200 {
			t.Fatalf("%s: %d", a, code)
		}
	}
	return c
}

// do sends a request relative to the worksheet's path; body, when not
// nil, is sent as JSON with the client's CSRF token unless headers say
// otherwise.
func (c *client) do(method, rel string, body any, headers map[string]string) (int, string) {
	c.t.Helper()
	var rd io.Reader
	if body != nil {
		b, _ := json.Marshal(body)
		rd = bytes.NewReader(b)
	}
	req, _ := http.NewRequest(method, c.base+rel, rd)
	if body != nil {
		req.Header.Set("Content-Type", "application/json")
		req.Header.Set(csrfHeader, c.csrf)
	}
	for k, v := range headers {
		req.Header.Set(k, v)
	}
	resp, err := c.http.Do(req)
	if err != nil {
		c.t.Fatal(err)
	}
	defer resp.Body.Close()
	data, _ := io.ReadAll(resp.Body)
	c.mu.Lock()
	c.bodies = append(c.bodies, string(data))
	c.mu.Unlock()
	return resp.StatusCode, string(data)
}

func (c *client) name(n string) {
	c.t.Helper()
	if code, body := c.do("POST", "api/labeler", map[string]string{"name": n}, nil); code != 200 {
		c.t.Fatalf("labeler: %d %s", code, body)
	}
}

func (c *client) state() StateView {
	c.t.Helper()
	code, body := c.do("GET", "api/state", nil, nil)
	var v StateView
	if code != 200 || json.Unmarshal([]byte(body), &v) != nil {
		c.t.Fatalf("state: %d %s", code, body)
	}
	return v
}

func (c *client) item(item int) ItemView {
	c.t.Helper()
	code, body := c.do("GET", fmt.Sprintf("api/item/%d", item), nil, nil)
	var v ItemView
	if code != 200 || json.Unmarshal([]byte(body), &v) != nil {
		c.t.Fatalf("item %d: %d %s", item, code, body)
	}
	return v
}

// label sends a label event from the item's current values and returns
// the status and the answer.
func (c *client) label(item int, label, note, reason string) (int, LabelView, string) {
	c.t.Helper()
	cur := c.item(item)
	code, body := c.do("POST", "api/label", LabelRequest{Item: item, Label: label, Note: note, PreviousLabel: cur.Label, PreviousNote: cur.Note, Reason: reason}, nil)
	var v LabelView
	json.Unmarshal([]byte(body), &v)
	return code, v, body
}

func (c *client) mustLabel(item int, label, note, reason string) LabelView {
	c.t.Helper()
	code, v, body := c.label(item, label, note, reason)
	if code != 200 {
		c.t.Fatalf("label item %d %q: %d %s", item, label, code, body)
	}
	return v
}
