package demolog

import (
	"encoding/csv"
	"fmt"
	"io"
	"probity/sampling/drawfolder"
	"strconv"
)

// SecondLabeler gives the independent second labels of the doubled items;
// Adjudicator settles the items the two labelers disagree on. Both are
// invented people.
const (
	SecondLabeler = "Kofi Haraldsen"
	Adjudicator   = "Joris Amankwah-Lind"
)

// LabelSecond fills the second worksheet (the doubled items) the way an
// independent expert would: the hidden true label, except at the 1-based
// positions in wrongAt, where this labeler slips and gives the other class.
func (s Scenario) LabelSecond(rows []drawfolder.WorksheetRow, wrongAt []int) ([]drawfolder.WorksheetRow, error) {
	wrong := map[int]bool{}
	for _, p := range wrongAt {
		wrong[p] = true
	}
	out := make([]drawfolder.WorksheetRow, len(rows))
	copy(out, rows)
	for i := range out {
		t := s.Truth(out[i].RecordID)
		if t == "" {
			return nil, fmt.Errorf("record %s is not in the scenario's log", out[i].RecordID)
		}
		if wrong[i+1] {
			t = otherLabel(t)
		}
		out[i].Label, out[i].Labeler = t, SecondLabeler
	}
	return out, nil
}

func otherLabel(l string) string {
	if l == Defect {
		return Sound
	}
	return Defect
}

// WriteAdjudications writes the adjudication file for the doubled items
// whose first and second labels differ: the adjudicator, looking at the
// scan again, gives the hidden true label. It returns how many rows it
// wrote. The columns are item, record_id, final_label, decided_by, note.
func (s Scenario) WriteAdjudications(w io.Writer, first, second []drawfolder.WorksheetRow) (int, error) {
	label := map[int]string{}
	for _, r := range first {
		label[r.Item] = r.Label
	}
	cw := csv.NewWriter(w)
	if err := cw.Write([]string{"item", "record_id", "final_label", "decided_by", "note"}); err != nil {
		return 0, err
	}
	n := 0
	for _, r := range second {
		a, _ := drawfolder.ParseLabel(label[r.Item], []string{Defect, Sound})
		if b, _ := drawfolder.ParseLabel(r.Label, []string{Defect, Sound}); a == b {
			continue
		}
		note := "rescanned; the trace shows " + s.Truth(r.RecordID)
		if err := cw.Write([]string{strconv.Itoa(r.Item), r.RecordID, s.Truth(r.RecordID), Adjudicator, note}); err != nil {
			return n, err
		}
		n++
	}
	cw.Flush()
	return n, cw.Error()
}
