package demolog

import (
	"probity/sampling/drawfolder"
	"testing"
)

func fixture(s Scenario) ([]drawfolder.WorksheetRow, []drawfolder.LedgerRow) {
	// Items 1–6: strata A, B alternating; items 7–10 spares (two per stratum).
	strata := []string{"A", "B", "A", "B", "A", "B", "A", "A", "B", "B"}
	var ws []drawfolder.WorksheetRow
	var lg []drawfolder.LedgerRow
	for i, st := range strata {
		id := s.RecordID(i * 7)
		ws = append(ws, drawfolder.WorksheetRow{Item: i + 1, RecordID: id})
		lg = append(lg, drawfolder.LedgerRow{Item: i + 1, RecordID: id, Stratum: st, Spare: i >= 6})
	}
	return ws, lg
}

// TestLabelReplacesUnsureBySparesInOrder: an unsure item in stratum A is
// replaced by A's first spare (item 7), not its second (item 8), and no
// other spare is touched.
func TestLabelReplacesUnsureBySparesInOrder(t *testing.T) {
	s := Default()
	ws, lg := fixture(s)
	out, sum, err := s.Label(ws, lg, []int{3}) // third main item: item 3, stratum A
	if err != nil {
		t.Fatal(err)
	}
	if out[2].Label != "unsure" || out[2].Note == "" {
		t.Fatalf("item 3 = %+v, want unsure with a note", out[2])
	}
	if len(sum.Unsure) != 1 || sum.Unsure[0] != ws[2].RecordID {
		t.Fatalf("unsure %v", sum.Unsure)
	}
	if len(sum.SparesUsed) != 1 || sum.SparesUsed[0] != ws[6].RecordID {
		t.Fatalf("spares used %v, want only item 7's id %s", sum.SparesUsed, ws[6].RecordID)
	}
	for i, r := range out {
		switch {
		case i == 2:
		case i == 6 || i < 6:
			if r.Label != s.Truth(r.RecordID) || r.Labeler != Labeler {
				t.Errorf("item %d label %q labeler %q, want the truth %q", r.Item, r.Label, r.Labeler, s.Truth(r.RecordID))
			}
		default:
			if r.Label != "" {
				t.Errorf("spare item %d was labeled %q but not needed", r.Item, r.Label)
			}
		}
	}
	if sum.Labeled != 6 {
		t.Fatalf("labeled %d, want 5 main items and 1 spare", sum.Labeled)
	}
}

// TestLabelRunsOutOfSpares: three unsure items in stratum A with two spares.
func TestLabelRunsOutOfSpares(t *testing.T) {
	s := Default()
	ws, lg := fixture(s)
	if _, _, err := s.Label(ws, lg, []int{1, 3, 5}); err == nil {
		t.Fatal("want an error when a stratum runs out of spares")
	}
}
