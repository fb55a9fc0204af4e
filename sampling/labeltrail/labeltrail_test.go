package labeltrail

import (
	"bytes"
	"errors"
	"os"
	"path/filepath"
	"strings"
	"testing"
	"time"

	"probity/plan/inputerr"
	"probity/sampling/drawfolder"
	"probity/sampling/safewrite"
)

var t0 = time.Date(2026, 12, 1, 9, 30, 0, 0, time.UTC)

// testDraw is a small invented draw: four items, two of them doubled.
func testDraw() Draw {
	rows := []drawfolder.WorksheetRow{
		{Item: 1, RecordID: "r-001", Show: []string{"a long scan note, with a comma"}},
		{Item: 2, RecordID: "r-002", Show: []string{"b"}},
		{Item: 3, RecordID: "r-003", Show: []string{"c \"quoted\""}},
		{Item: 4, RecordID: "r-004", Show: []string{"d"}},
	}
	return Draw{
		Manifest: strings.Repeat("a", 64), Plan: strings.Repeat("b", 64), SelectionSeed: "seed",
		Classes: []string{"defect", "sound"}, Show: []string{"scan"},
		Sheets: map[string][]drawfolder.WorksheetRow{
			drawfolder.WorksheetFile:       rows,
			drawfolder.WorksheetSecondFile: rows[:2],
		},
	}
}

func ev(sheet string, item int, prev, label, note, reason string) Label {
	return Label{Labeler: "Dana Example", Sheet: sheet, Item: item, RecordID: "r-00" + string(rune('0'+item)),
		PreviousLabel: prev, Label: label, Note: note, Reason: reason}
}

// newTrail creates a trail with a few events and returns its path.
func newTrail(t testing.TB, d Draw) string {
	t.Helper()
	path := filepath.Join(t.TempDir(), FileName)
	l, err := Create(path, d, t0)
	if err != nil {
		t.Fatal(err)
	}
	defer l.Close()
	ws := drawfolder.WorksheetFile
	events := []Label{
		ev(ws, 1, "", "defect", "", ""),
		ev(ws, 2, "", "unsure", "too dark to judge", ""),
		ev(ws, 1, "defect", "sound", "", "misread the trace"),
		ev(drawfolder.WorksheetSecondFile, 1, "", "sound", "", ""),
	}
	for i, e := range events {
		if _, err := l.Append(t0.Add(time.Duration(i+1)*time.Minute), e); err != nil {
			t.Fatalf("event %d: %v", i+1, err)
		}
	}
	return path
}

func TestTrailDerivesTheWorksheetByteForByte(t *testing.T) {
	d := testDraw()
	path := newTrail(t, d)
	tr, err := Read(path)
	if err != nil {
		t.Fatal(err)
	}
	s, err := Replay(tr, d)
	if err != nil {
		t.Fatal(err)
	}
	// The same labels typed into the worksheet by hand (common practice,
	// no source: the worksheet a spreadsheet user would hand in).
	want := []drawfolder.WorksheetRow{
		{Item: 1, RecordID: "r-001", Show: []string{"a long scan note, with a comma"}, Label: "sound", Labeler: "Dana Example"},
		{Item: 2, RecordID: "r-002", Show: []string{"b"}, Label: "unsure", Note: "too dark to judge", Labeler: "Dana Example"},
		{Item: 3, RecordID: "r-003", Show: []string{"c \"quoted\""}},
		{Item: 4, RecordID: "r-004", Show: []string{"d"}},
	}
	var buf bytes.Buffer
	if err := drawfolder.WriteWorksheet(&buf, d.Show, want); err != nil {
		t.Fatal(err)
	}
	got, err := s.Derive(drawfolder.WorksheetFile)
	if err != nil {
		t.Fatal(err)
	}
	if !bytes.Equal(got, buf.Bytes()) {
		t.Errorf("derived worksheet:\n%s\nwant:\n%s", got, buf.Bytes())
	}
	again, _ := s.Derive(drawfolder.WorksheetFile)
	if !bytes.Equal(got, again) {
		t.Error("two derivations differ")
	}
	rows := s.Worksheet(drawfolder.WorksheetFile)
	if rows[0].Line != 4 || rows[1].Line != 3 || rows[2].Line != 0 {
		t.Errorf("row lines %d %d %d, want the trail lines 4 3 0", rows[0].Line, rows[1].Line, rows[2].Line)
	}
	second, _ := s.Derive(drawfolder.WorksheetSecondFile)
	if !strings.Contains(string(second), "1,r-001,\"a long scan note, with a comma\",sound,,Dana Example\n2,r-002,b,,,\n") {
		t.Errorf("second worksheet:\n%s", second)
	}
	sum := s.Summary()
	if sum.Events != 4 || sum.Changed != 1 || len(sum.Labelers) != 1 || !sum.First.Equal(t0.Add(time.Minute)) || !sum.Last.Equal(t0.Add(4*time.Minute)) {
		t.Errorf("summary %+v", sum)
	}
}

func TestOpenResumesAndAppends(t *testing.T) {
	d := testDraw()
	path := newTrail(t, d)
	l, dropped, err := Open(path, d, false)
	if err != nil || dropped != nil {
		t.Fatal(err, dropped)
	}
	if c := l.State().Cell(drawfolder.WorksheetFile, 1); c.Label != "sound" {
		t.Fatalf("item 1 resumed as %+v", c)
	}
	if _, err := l.Append(t0.Add(time.Hour), ev(drawfolder.WorksheetFile, 3, "", "defect", "", "")); err != nil {
		t.Fatal(err)
	}
	l.Close()
	tr, err := Read(path)
	if err != nil || len(tr.Entries) != 6 {
		t.Fatalf("%v, %d entries", err, len(tr.Entries))
	}
}

func TestASecondProcessCannotAppend(t *testing.T) {
	d := testDraw()
	path := newTrail(t, d)
	l, _, err := Open(path, d, false)
	if err != nil {
		t.Fatal(err)
	}
	defer l.Close()
	if _, _, err := Open(path, d, false); !errors.Is(err, safewrite.ErrLocked) {
		t.Fatalf("second Open: %v, want ErrLocked", err)
	}
}

func TestEventsAreChecked(t *testing.T) {
	d := testDraw()
	d.NotBefore = t0
	ws := drawfolder.WorksheetFile
	l, err := Create(filepath.Join(t.TempDir(), FileName), d, t0)
	if err != nil {
		t.Fatal(err)
	}
	defer l.Close()
	if _, err := l.Append(t0.Add(time.Second), ev(ws, 1, "", "defect", "", "")); err != nil {
		t.Fatal(err)
	}
	cases := []struct {
		name  string
		at    time.Time
		ev    Label
		field string
		is    error
	}{
		{"not a class", t0, ev(ws, 2, "", "Defect", "", ""), "label.label", nil},
		{"unsure in another case", t0, ev(ws, 2, "", "Unsure", "", ""), "label.label", nil},
		{"no such item", t0, ev(ws, 9, "", "defect", "", ""), "label.item", nil},
		{"wrong record id", t0, Label{Labeler: "x", Sheet: ws, Item: 2, RecordID: "r-003", Label: "sound"}, "label.record_id", nil},
		{"no such sheet", t0, ev("other.csv", 1, "", "defect", "", ""), "label.sheet", nil},
		{"no labeler", t0, Label{Sheet: ws, Item: 2, RecordID: "r-002", Label: "sound"}, "label.labeler", nil},
		{"change without a reason", t0, ev(ws, 1, "defect", "sound", "", " "), "label.reason", nil},
		{"stale previous label", t0, ev(ws, 1, "", "sound", "", ""), "label.previous_label", ErrConflict},
		{"nothing changes", t0, ev(ws, 1, "defect", "defect", "", ""), "label.label", nil},
		{"before the draw", t0.Add(-time.Second), ev(ws, 2, "", "sound", "", ""), "time", nil},
		{"control character in a note", t0, ev(ws, 2, "", "sound", "a\x07b", ""), "label.note", nil},
	}
	for _, c := range cases {
		_, err := l.Append(c.at, c.ev)
		e, ok := inputerr.As(err)
		if !ok || e.Field != c.field || e.Line != 3 || (c.is != nil && !errors.Is(err, c.is)) {
			t.Errorf("%s: %v (field %q), want field %s on line 3", c.name, err, fieldOf(e), c.field)
		}
	}
	if tr, err := Read(l.Path()); err != nil || len(tr.Entries) != 2 {
		t.Errorf("refused events were written: %v", err)
	}
}

func fieldOf(e *inputerr.Error) string {
	if e == nil {
		return ""
	}
	return e.Field
}

func TestACutShortLastLineIsFoundAndDropped(t *testing.T) {
	d := testDraw()
	path := newTrail(t, d)
	data, _ := os.ReadFile(path)
	whole := len(data)
	// A crash while writing line 6: part of it reached the disk.
	cut := append(append([]byte{}, data...), []byte(`{"seq":6,"prev":"ab`)...)
	os.WriteFile(path, cut, 0o644)
	_, err := Read(path)
	e, ok := inputerr.As(err)
	if !errors.Is(err, ErrCutShort) || !ok || e.Line != 6 {
		t.Fatalf("Read: %v, want ErrCutShort on line 6", err)
	}
	if _, _, err := Open(path, d, false); !errors.Is(err, ErrCutShort) {
		t.Fatalf("Open: %v, want ErrCutShort", err)
	}
	l, dropped, err := Open(path, d, true)
	if err != nil {
		t.Fatal(err)
	}
	defer l.Close()
	if string(dropped) != `{"seq":6,"prev":"ab` {
		t.Errorf("dropped %q", dropped)
	}
	if got, _ := os.ReadFile(path); len(got) != whole {
		t.Errorf("file has %d bytes after the cut, want %d", len(got), whole)
	}
	if _, err := l.Append(t0.Add(time.Hour), ev(drawfolder.WorksheetFile, 4, "", "sound", "", "")); err != nil {
		t.Fatal(err)
	}
	if _, err := Read(path); err != nil {
		t.Fatal(err)
	}
}

func TestABrokenChainNamesTheLine(t *testing.T) {
	d := testDraw()
	path := newTrail(t, d)
	data, _ := os.ReadFile(path)
	lines := strings.SplitAfter(string(data), "\n")
	edit := func(f func([]string) []string) error {
		ls := f(append([]string{}, lines...))
		os.WriteFile(path, []byte(strings.Join(ls, "")), 0o644)
		_, err := Read(path)
		return err
	}
	cases := []struct {
		name  string
		f     func([]string) []string
		line  int
		field string
	}{
		{"a label changed in place", func(l []string) []string {
			l[1] = strings.Replace(l[1], `"label":"defect"`, `"label":"sound"`, 1)
			return l
		}, 3, "prev"},
		{"a line removed", func(l []string) []string { return append(l[:2], l[3:]...) }, 3, "seq"},
		{"two lines swapped", func(l []string) []string { l[2], l[3] = l[3], l[2]; return l }, 3, "seq"},
		{"spaces added", func(l []string) []string { l[2] = strings.Replace(l[2], `,"time"`, `, "time"`, 1); return l }, 3, ""},
	}
	for _, c := range cases {
		err := edit(c.f)
		e, ok := inputerr.As(err)
		if !ok || e.Line != c.line || e.Field != c.field {
			t.Errorf("%s: %v, want line %d field %q", c.name, err, c.line, c.field)
		}
	}
}

func TestATrailOfAnotherDrawIsRefused(t *testing.T) {
	d := testDraw()
	path := newTrail(t, d)
	tr, err := Read(path)
	if err != nil {
		t.Fatal(err)
	}
	other := testDraw()
	other.Manifest = strings.Repeat("c", 64)
	_, err = Replay(tr, other)
	if e, ok := inputerr.As(err); !ok || e.Line != 1 || e.Field != "begin.manifest" {
		t.Fatalf("Replay on another draw: %v", err)
	}
	late := testDraw()
	late.NotBefore = t0.Add(3 * time.Minute)
	_, err = Replay(tr, late)
	if e, ok := inputerr.As(err); !ok || e.Line != 1 || e.Field != "time" {
		t.Fatalf("Replay of a trail begun before the draw: %v", err)
	}
}
