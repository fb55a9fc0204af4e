package labeltrail

import (
	"bytes"
	"crypto/sha256"
	"encoding/hex"
	"encoding/json"
	"fmt"
	"time"
)

// FileName is the trail's name in the draw folder.
const FileName = "label-trail.jsonl"

// Format is the version of the trail's layout written by this code.
const Format = 1

// TimeLayout is the form of every time in a trail: UTC, milliseconds.
const TimeLayout = "2006-01-02T15:04:05.000Z"

// FormatTime writes t in UTC as TimeLayout.
func FormatTime(t time.Time) string { return t.UTC().Format(TimeLayout) }

// Entry is one line of the trail: the first begins it (Begin set), every
// other is a label event (Label set).
type Entry struct {
	// Seq is the 1-based line number.
	Seq int `json:"seq"`
	// Prev is the SHA-256 of the previous line without its line end, ""
	// on the first line.
	Prev string `json:"prev"`
	// Time is when the line was appended, in TimeLayout.
	Time  string `json:"time"`
	Begin *Begin `json:"begin,omitempty"`
	Label *Label `json:"label,omitempty"`
}

// Begin ties a trail to one draw.
type Begin struct {
	Format int `json:"format"`
	// Manifest is the SHA-256 of the draw's manifest.json, Plan the
	// plan's fingerprint and SelectionSeed the draw's seed, as the
	// manifest records them.
	Manifest      string `json:"manifest"`
	Plan          string `json:"plan"`
	SelectionSeed string `json:"selection_seed"`
}

// Label is one label event: who set which item of which worksheet from
// what to what, and why when it changed a label already given.
type Label struct {
	Labeler string `json:"labeler"`
	// Sheet is drawfolder.WorksheetFile or drawfolder.WorksheetSecondFile.
	Sheet    string `json:"sheet"`
	Item     int    `json:"item"`
	RecordID string `json:"record_id"`
	// PreviousLabel and PreviousNote are the item's values before the
	// event; Label and Note after it. A label is a class, "unsure" or "".
	PreviousLabel string `json:"previous_label"`
	Label         string `json:"label"`
	PreviousNote  string `json:"previous_note"`
	Note          string `json:"note"`
	// Reason says why a label already given was changed ("" otherwise).
	Reason string `json:"reason"`
}

// Changes reports whether the event changes a label already given (not
// only its note): such a change needs a reason.
func (l *Label) Changes() bool { return l.PreviousLabel != "" && l.Label != l.PreviousLabel }

// encode is the canonical line of e, without its line end.
func encode(e *Entry) ([]byte, error) {
	var buf bytes.Buffer
	enc := json.NewEncoder(&buf)
	enc.SetEscapeHTML(false)
	if err := enc.Encode(e); err != nil {
		return nil, fmt.Errorf("labeltrail: encoding line %d: %w", e.Seq, err)
	}
	return bytes.TrimSuffix(buf.Bytes(), []byte("\n")), nil
}

// lineHash is the chain's link: the hex SHA-256 of a line without its
// line end.
func lineHash(line []byte) string {
	s := sha256.Sum256(line)
	return hex.EncodeToString(s[:])
}
