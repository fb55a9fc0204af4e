package labeltrail

import (
	"bytes"
	"crypto/sha256"
	"encoding/hex"
	"encoding/json"
	"errors"
	"fmt"
	"time"

	"probity/plan/inputerr"
	"probity/plan/inputfile"
)

// ErrCutShort is the cause of the refusal of a trail whose last line has
// no line end: it was being written when the process stopped, and was
// never confirmed.
var ErrCutShort = errors.New("the last line is cut short")

// ErrBroken is the cause of the refusal of a line whose prev is not the
// hash of the line before it (or whose seq is not its line number): the
// trail was edited, or lines were removed or reordered.
var ErrBroken = errors.New("the hash chain is broken")

// Trail is a parsed trail file.
type Trail struct {
	// Path names the file in errors.
	Path string
	// Entries are the whole lines, in order; Entries[0].Begin is set.
	Entries []Entry
	// Whole is the length in bytes of the whole lines (the file's length
	// unless its last line is cut short).
	Whole int64
	// SHA256 is the hex SHA-256 of the file's bytes (all of them).
	SHA256 string
	// last is the hash of the last whole line ("" when none).
	last string
}

// Begin is the trail's first entry.
func (t *Trail) Begin() *Begin { return t.Entries[0].Begin }

// Read reads and parses the trail at path (Parse).
func Read(path string) (*Trail, error) {
	data, err := inputfile.ReadFile(path, "label trail", inputfile.TableLimit)
	if err != nil {
		return nil, err
	}
	return Parse(data, path)
}

// Parse checks a trail's format and its chain, line by line: each line is
// the canonical JSON of an entry (the first a begin entry, every other a
// label event with its fields filled in) whose seq is its line number,
// whose prev is the SHA-256 of the line before, and whose time is a UTC
// time in TimeLayout. Errors are *inputerr.Error values naming name, the
// line and the field. A last line without a line end is refused with
// ErrCutShort; the Trail of the whole lines before it is returned with
// that error (for a caller that cuts it off).
func Parse(data []byte, name string) (*Trail, error) {
	sum := sha256.Sum256(data)
	t := &Trail{Path: name, SHA256: hex.EncodeToString(sum[:])}
	if len(data) == 0 {
		return nil, inputerr.At(name, 0, "", "the trail is empty").WithHint("a trail begins with the line the labeling writes when it starts")
	}
	rest := data
	for line := 1; len(rest) > 0; line++ {
		i := bytes.IndexByte(rest, '\n')
		if i < 0 {
			if len(t.Entries) == 0 {
				return nil, inputerr.At(name, line, "", "%w: the first line has no line end", ErrCutShort)
			}
			return t, inputerr.At(name, line, "", "%w (%d bytes without a line end): it was being written when the labeling stopped and was never confirmed", ErrCutShort, len(rest)).
				WithHint("every confirmed event is in the lines before it; the labeling can remove the cut line when it starts again")
		}
		text := rest[:i]
		rest = rest[i+1:]
		e, err := parseLine(name, line, text, t.last)
		if err != nil {
			return nil, err
		}
		t.Entries = append(t.Entries, *e)
		t.last = lineHash(text)
		t.Whole += int64(i + 1)
	}
	return t, nil
}

// parseLine decodes and checks one line; prev is the hash of the line
// before it.
func parseLine(name string, line int, text []byte, prev string) (*Entry, error) {
	at := func(field, format string, args ...any) *inputerr.Error {
		return inputerr.At(name, line, field, format, args...)
	}
	dec := json.NewDecoder(bytes.NewReader(text))
	dec.DisallowUnknownFields()
	var e Entry
	if err := dec.Decode(&e); err != nil {
		return nil, at("", "not a trail entry: %v", err).Wrap(err)
	}
	if dec.More() {
		return nil, at("", "not a trail entry: more than one JSON value on the line")
	}
	if e.Seq != line {
		return nil, at("seq", "%w: seq is %d on line %d", ErrBroken, e.Seq, line).
			WithHint("the trail was edited, or lines were removed or reordered; use the trail as the labeling wrote it")
	}
	if e.Prev != prev {
		what := fmt.Sprintf("the SHA-256 of line %d is %s", line-1, prev)
		if line == 1 {
			what = "the first line's prev must be empty"
		}
		return nil, at("prev", "%w: %s, but this entry records %q", ErrBroken, what, e.Prev).
			WithHint("the trail was edited, or lines were removed or reordered; use the trail as the labeling wrote it")
	}
	if _, err := ParseTime(e.Time); err != nil {
		return nil, at("time", "%q is not a UTC time of the form %s", e.Time, TimeLayout)
	}
	switch {
	case line == 1 && (e.Begin == nil || e.Label != nil):
		return nil, at("begin", "the first line must begin the trail (a begin entry, no label)")
	case line > 1 && (e.Label == nil || e.Begin != nil):
		return nil, at("label", "every line after the first must be one label event")
	case e.Begin != nil && e.Begin.Format != Format:
		return nil, at("begin.format", "format %d is not supported (this probity reads format %d)", e.Begin.Format, Format)
	case e.Label != nil && (e.Label.Sheet == "" || e.Label.Item < 1 || e.Label.RecordID == ""):
		return nil, at("label", "a label event needs its sheet, item and record_id")
	}
	again, err := encode(&e)
	if err != nil {
		return nil, err
	}
	if !bytes.Equal(again, text) {
		return nil, at("", "the line is not in the trail's canonical form (keys in order, no spaces): it was edited").
			WithHint("use the trail as the labeling wrote it")
	}
	return &e, nil
}

// ParseTime reads a time written in TimeLayout.
func ParseTime(s string) (time.Time, error) {
	t, err := time.Parse(TimeLayout, s)
	if err != nil {
		return time.Time{}, err
	}
	if FormatTime(t) != s {
		return time.Time{}, fmt.Errorf("%q is not in the form %s", s, TimeLayout)
	}
	return t, nil
}
