package labeltrail

import (
	"bytes"
	"errors"
	"fmt"
	"os"
	"slices"
	"strings"
	"time"
	"unicode"
	"unicode/utf8"

	"probity/plan/inputerr"
	"probity/sampling/drawfolder"
)

// Limits on the text of a label event, in characters.
const (
	MaxName   = 100
	MaxNote   = 2000
	MaxReason = 500
)

// ErrConflict is the cause of the refusal of an event whose previous
// label or note is not the item's current one: someone else labeled the
// item meanwhile.
var ErrConflict = errors.New("the item changed meanwhile")

// Draw is what a trail is checked against: the draw's manifest
// fingerprint, the plan's classes, the worksheets that may be labeled and
// the earliest time a label may have.
type Draw struct {
	// Manifest is the SHA-256 of manifest.json; Plan and SelectionSeed
	// as the manifest records them.
	Manifest, Plan, SelectionSeed string
	Classes                       []string
	// Show is the worksheets' shown columns.
	Show []string
	// Sheets maps a worksheet's file name (drawfolder.WorksheetFile,
	// drawfolder.WorksheetSecondFile) to its rows, in order (any labels
	// in them are ignored).
	Sheets map[string][]drawfolder.WorksheetRow
	// NotBefore is the draw's time: no label may be earlier (zero when
	// the manifest records none).
	NotBefore time.Time
}

// DrawOf is the Draw of an opened folder: its worksheet and, when the
// draw doubled items, its worksheet-second.csv; no label may precede the
// draw time its manifest records.
func DrawOf(f *drawfolder.Folder, classes []string) (Draw, error) {
	m := f.Manifest
	d := Draw{
		Manifest: drawfolder.SHA256Hex(f.ManifestBytes), Plan: m.PlanFingerprint, SelectionSeed: m.SelectionSeed,
		Classes: classes, Show: m.ShowColumns,
		Sheets: map[string][]drawfolder.WorksheetRow{drawfolder.WorksheetFile: f.Worksheet},
	}
	if m.Drawn != nil {
		d.NotBefore = m.Drawn.Time
	}
	second := f.Path(drawfolder.WorksheetSecondFile)
	if _, err := os.Lstat(second); err == nil {
		_, rows, err := drawfolder.ReadWorksheet(second)
		if err != nil {
			return d, err
		}
		d.Sheets[drawfolder.WorksheetSecondFile] = rows
	}
	return d, nil
}

// BeginEntry is the begin entry of a new trail for d.
func (d Draw) BeginEntry() Begin {
	return Begin{Format: Format, Manifest: d.Manifest, Plan: d.Plan, SelectionSeed: d.SelectionSeed}
}

// Cell is an item's current values in one worksheet.
type Cell struct {
	Label, Note string
	// Labeler gave the current label ("" while the label is blank).
	Labeler string
	// Line is the trail line of the item's last event (0: none).
	Line int
}

// Summary is what a trail says about the labeling, for the record.
type Summary struct {
	// Labelers are the names on label events, sorted.
	Labelers []string
	// First and Last are the times of the first and the last label
	// event (zero when there is none).
	First, Last time.Time
	// Events counts the label events; Changed those that changed a label
	// already given.
	Events, Changed int
}

// State is the labeling a trail has reached: every item's values.
type State struct {
	draw  Draw
	path  string
	begin time.Time
	cells map[string]map[int]*Cell
	rows  map[string]map[int]drawfolder.WorksheetRow
	names map[string]bool
	sum   Summary
}

func newState(d Draw, path string, begin time.Time) *State {
	s := &State{draw: d, path: path, begin: begin, cells: map[string]map[int]*Cell{},
		rows: map[string]map[int]drawfolder.WorksheetRow{}, names: map[string]bool{}}
	for sheet, rows := range d.Sheets {
		s.cells[sheet] = map[int]*Cell{}
		s.rows[sheet] = map[int]drawfolder.WorksheetRow{}
		for _, r := range rows {
			s.cells[sheet][r.Item] = &Cell{}
			s.rows[sheet][r.Item] = r
		}
	}
	return s
}

// Replay checks the trail against the draw and returns the state it
// reaches: the first line must name d's manifest, plan and seed, and every
// label event must pass the checks of a new one (see State.Check) at its
// own line and time. Errors are *inputerr.Error values naming the trail's
// path and the entry's line.
func Replay(t *Trail, d Draw) (*State, error) {
	b := t.Begin()
	bt, _ := ParseTime(t.Entries[0].Time)
	if b.Manifest != d.Manifest || b.Plan != d.Plan || b.SelectionSeed != d.SelectionSeed {
		return nil, inputerr.At(t.Path, 1, "begin.manifest", "the trail belongs to another draw: it begins with manifest SHA-256 %s…, this draw's is %s…", short(b.Manifest), short(d.Manifest)).
			WithHint("pass the trail from this draw's folder")
	}
	if !d.NotBefore.IsZero() && bt.Before(d.NotBefore) {
		return nil, inputerr.At(t.Path, 1, "time", "the trail begins at %s, before the draw was made (%s)", t.Entries[0].Time, FormatTime(d.NotBefore))
	}
	s := newState(d, t.Path, bt)
	for i := 1; i < len(t.Entries); i++ {
		e := &t.Entries[i]
		at, _ := ParseTime(e.Time)
		if err := s.apply(e.Seq, at, *e.Label); err != nil {
			return nil, err
		}
	}
	return s, nil
}

// Check says whether ev, appended at line with time at, is a valid next
// event: its worksheet is the draw's, the item is in it with that record
// id, the labeler is named, the label is in its normal form (a class,
// "unsure" or ""), the previous label and note are the item's current
// ones (else ErrConflict), a changed label has a reason, the texts are
// within their limits, and the time is not before the trail began or the
// draw was made.
func (s *State) Check(line int, at time.Time, ev Label) error {
	bad := func(field, format string, args ...any) error {
		return inputerr.At(s.path, line, "label."+field, format, args...)
	}
	cells, ok := s.cells[ev.Sheet]
	if !ok {
		return bad("sheet", "%q is not a worksheet of this draw", ev.Sheet)
	}
	c, ok := cells[ev.Item]
	if !ok {
		return bad("item", "item %d is not in %s", ev.Item, ev.Sheet)
	}
	if r := s.rows[ev.Sheet][ev.Item]; r.RecordID != ev.RecordID {
		return bad("record_id", "item %d is record %q in %s, not %q", ev.Item, r.RecordID, ev.Sheet, ev.RecordID)
	}
	if err := CheckLabeler(ev.Labeler); err != nil {
		return bad("labeler", "%v", err)
	}
	if norm, kind := drawfolder.ParseLabel(ev.Label, s.draw.Classes); kind == drawfolder.LabelInvalid || norm != ev.Label {
		return bad("label", "label %q is not one of the plan's classes (%s), %q or blank", ev.Label, strings.Join(s.draw.Classes, ", "), drawfolder.Unsure)
	}
	if err := checkText("note", ev.Note, MaxNote, true); err != nil {
		return bad("note", "%v", err)
	}
	if err := checkText("reason", ev.Reason, MaxReason, true); err != nil {
		return bad("reason", "%v", err)
	}
	if ev.PreviousLabel != c.Label || ev.PreviousNote != c.Note {
		return inputerr.At(s.path, line, "label.previous_label", "%w: item %d of %s is %q (note %q), not %q (note %q)", ErrConflict, ev.Item, ev.Sheet, c.Label, c.Note, ev.PreviousLabel, ev.PreviousNote)
	}
	if ev.Label == c.Label && ev.Note == c.Note {
		return bad("label", "the event changes nothing (item %d is already %q with that note)", ev.Item, c.Label)
	}
	if ev.Changes() && strings.TrimSpace(ev.Reason) == "" {
		return bad("reason", "item %d's label changes from %q to %q without a reason", ev.Item, ev.PreviousLabel, ev.Label)
	}
	if at.Before(s.begin) {
		return inputerr.At(s.path, line, "time", "the label time %s is earlier than the trail's beginning (%s)", FormatTime(at), FormatTime(s.begin))
	}
	if !s.draw.NotBefore.IsZero() && at.Before(s.draw.NotBefore) {
		return inputerr.At(s.path, line, "time", "the label time %s is earlier than the draw (%s): a label cannot precede the sample", FormatTime(at), FormatTime(s.draw.NotBefore))
	}
	return nil
}

// apply checks ev and makes it the item's current value.
func (s *State) apply(line int, at time.Time, ev Label) error {
	if err := s.Check(line, at, ev); err != nil {
		return err
	}
	c := s.cells[ev.Sheet][ev.Item]
	if ev.Label != c.Label {
		c.Labeler = ev.Labeler
		if ev.Label == "" {
			c.Labeler = ""
		}
	}
	c.Label, c.Note, c.Line = ev.Label, ev.Note, line
	sum := &s.sum
	if sum.Events == 0 || at.Before(sum.First) {
		sum.First = at
	}
	if at.After(sum.Last) {
		sum.Last = at
	}
	sum.Events++
	if ev.Changes() {
		sum.Changed++
	}
	if !s.names[ev.Labeler] {
		s.names[ev.Labeler] = true
		sum.Labelers = append(sum.Labelers, ev.Labeler)
		slices.Sort(sum.Labelers)
	}
	return nil
}

// CheckLabeler applies the rule for a labeler's name: given, without
// surrounding spaces, and within MaxName characters of valid UTF-8 with
// no line break or other control character.
func CheckLabeler(name string) error {
	if name == "" {
		return errors.New("the labeler's name must be given")
	}
	if strings.TrimSpace(name) != name {
		return errors.New("the labeler's name has surrounding spaces")
	}
	return checkText("labeler's name", name, MaxName, false)
}

// checkText refuses text over max characters, invalid UTF-8, and control
// characters (line breaks and tabs are allowed when multiline).
func checkText(what, s string, max int, multiline bool) error {
	if !utf8.ValidString(s) {
		return fmt.Errorf("the %s is not valid UTF-8", what)
	}
	if n := utf8.RuneCountInString(s); n > max {
		return fmt.Errorf("the %s has %d characters, more than %d", what, n, max)
	}
	for _, r := range s {
		if unicode.IsControl(r) && !(multiline && (r == '\n' || r == '\t')) {
			return fmt.Errorf("the %s holds the control character %U", what, r)
		}
	}
	return nil
}

// Cell is the current values of item in sheet (nil when there is no such
// item).
func (s *State) Cell(sheet string, item int) *Cell {
	c, ok := s.cells[sheet][item]
	if !ok {
		return nil
	}
	cp := *c
	return &cp
}

// HasEvents reports whether the trail holds any label event on sheet.
func (s *State) HasEvents(sheet string) bool {
	for _, c := range s.cells[sheet] {
		if c.Line > 0 {
			return true
		}
	}
	return false
}

// Summary is the labeling so far.
func (s *State) Summary() Summary {
	sum := s.sum
	sum.Labelers = slices.Clone(s.sum.Labelers)
	return sum
}

// Sheets are the worksheets the state covers, in the draw's order
// (worksheet.csv first).
func (s *State) Sheets() []string {
	var out []string
	for _, name := range []string{drawfolder.WorksheetFile, drawfolder.WorksheetSecondFile} {
		if _, ok := s.cells[name]; ok {
			out = append(out, name)
		}
	}
	return out
}

// Worksheet is sheet labeled as the trail left it: the draw's rows in
// order with label, note and labeler from the trail, and each row's Line
// the trail line of its last event (0 when it has none).
func (s *State) Worksheet(sheet string) []drawfolder.WorksheetRow {
	rows := s.draw.Sheets[sheet]
	out := make([]drawfolder.WorksheetRow, len(rows))
	for i, r := range rows {
		c := s.cells[sheet][r.Item]
		out[i] = drawfolder.WorksheetRow{Item: r.Item, RecordID: r.RecordID, Show: slices.Clone(r.Show),
			Label: c.Label, Note: c.Note, Labeler: c.Labeler, Line: c.Line}
	}
	return out
}

// Derive writes sheet labeled as the trail left it (Worksheet) in the
// worksheet's format: the same trail always gives the same bytes, equal to
// those of a worksheet labeled with the same values by hand and written by
// drawfolder.WriteWorksheet.
func (s *State) Derive(sheet string) ([]byte, error) {
	if _, ok := s.cells[sheet]; !ok {
		return nil, fmt.Errorf("labeltrail: %s is not a worksheet of the draw", sheet)
	}
	var buf bytes.Buffer
	if err := drawfolder.WriteWorksheet(&buf, s.draw.Show, s.Worksheet(sheet)); err != nil {
		return nil, err
	}
	return buf.Bytes(), nil
}

// Labels is sheet derived as a drawfolder.Labels, the form the record is
// judged from: Path names the trail (and the sheet), so a refusal of a
// label names the trail's line; Bytes are Derive's.
func (s *State) Labels(sheet string) (*drawfolder.Labels, error) {
	data, err := s.Derive(sheet)
	if err != nil {
		return nil, err
	}
	return &drawfolder.Labels{
		Path:   s.path,
		Header: drawfolder.WorksheetHeader(s.draw.Show),
		Rows:   s.Worksheet(sheet),
		Bytes:  data,
	}, nil
}

func short(h string) string {
	if len(h) > 12 {
		return h[:12]
	}
	return h
}
