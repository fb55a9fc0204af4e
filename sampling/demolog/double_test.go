package demolog

import (
	"bytes"
	"probity/sampling/drawfolder"
	"strings"
	"testing"
)

// TestSecondLabelsAndAdjudication: the second labeler slips exactly at the
// listed positions, and the adjudication file has one row per
// disagreement, each giving the truth.
func TestSecondLabelsAndAdjudication(t *testing.T) {
	s := Default()
	var first, second []drawfolder.WorksheetRow
	for i := 0; i < 8; i++ {
		id := s.RecordID(i * 11)
		first = append(first, drawfolder.WorksheetRow{Item: i + 1, RecordID: id, Label: s.Truth(id)})
		second = append(second, drawfolder.WorksheetRow{Item: i + 1, RecordID: id})
	}
	first[5].Label = "unsure" // the first labeler could not judge item 6
	got, err := s.LabelSecond(second, []int{2, 7})
	if err != nil {
		t.Fatal(err)
	}
	for i, r := range got {
		want := s.Truth(r.RecordID)
		if i == 1 || i == 6 {
			want = otherLabel(want)
		}
		if r.Label != want || r.Labeler != SecondLabeler {
			t.Errorf("item %d: %q by %q, want %q", r.Item, r.Label, r.Labeler, want)
		}
	}
	var buf bytes.Buffer
	n, err := s.WriteAdjudications(&buf, first, got)
	if err != nil {
		t.Fatal(err)
	}
	lines := strings.Split(strings.TrimSpace(buf.String()), "\n")
	if n != 3 || len(lines) != 4 || lines[0] != "item,record_id,final_label,decided_by,note" {
		t.Fatalf("%d rows:\n%s", n, buf.String())
	}
	for _, l := range lines[1:] {
		f := strings.Split(l, ",")
		if s.Truth(f[1]) != f[2] || f[3] != Adjudicator {
			t.Errorf("adjudication %q does not give the truth %q", l, s.Truth(f[1]))
		}
	}
	if !strings.HasPrefix(lines[1], "2,") || !strings.HasPrefix(lines[2], "6,") || !strings.HasPrefix(lines[3], "7,") {
		t.Errorf("adjudicated items %v, want 2, 6, 7", lines[1:])
	}
}
