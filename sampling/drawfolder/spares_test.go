package drawfolder

import (
	"bytes"
	"os"
	"path/filepath"
	"slices"
	"testing"
)

// TestWorksheetMarksSpares (issue 16 item 3): a worksheet with spares has
// the spare column after record_id, "spare" on the spares' rows and
// nothing else about them; it reads back with the marks, and a worksheet
// without spares has no such column.
func TestWorksheetMarksSpares(t *testing.T) {
	rows := []WorksheetRow{{Item: 1, RecordID: "a", Show: []string{"x"}}, {Item: 2, RecordID: "b", Spare: true, Show: []string{"y"}}}
	var buf bytes.Buffer
	if err := WriteWorksheet(&buf, []string{"spare"}, rows); err != nil {
		t.Fatal(err)
	}
	want := "item,record_id,spare,log:spare,label,note,labeler\n1,a,,x,,,\n2,b,spare,y,,,\n"
	if buf.String() != want {
		t.Fatalf("worksheet\n%s\nwant\n%s", buf.String(), want)
	}
	path := filepath.Join(t.TempDir(), "w.csv")
	if err := os.WriteFile(path, buf.Bytes(), 0o644); err != nil {
		t.Fatal(err)
	}
	h, got, err := ReadWorksheet(path)
	if err != nil {
		t.Fatal(err)
	}
	if !slices.Equal(ShownColumns(h), []string{"log:spare"}) || got[0].Spare || !got[1].Spare || got[1].Show[0] != "y" {
		t.Errorf("read back %v %+v", h, got)
	}
	buf.Reset()
	if err := WriteWorksheet(&buf, nil, []WorksheetRow{{Item: 1, RecordID: "a"}}); err != nil {
		t.Fatal(err)
	}
	if buf.String() != "item,record_id,label,note,labeler\n1,a,,,\n" {
		t.Errorf("a worksheet without spares:\n%s", buf.String())
	}
	os.WriteFile(path, []byte("item,record_id,spare,label,note\n1,a,maybe,,\n"), 0o644)
	if _, _, err := ReadWorksheet(path); err == nil {
		t.Error("a spare cell that is neither empty nor spare was accepted")
	}
}

// TestSpareRule: the unsure items of a stratum take its spares in key
// order; an unsure spare passes its item on; a blank spare keeps its item
// waiting; spares beyond the unsure items are unused when labeled.
func TestSpareRule(t *testing.T) {
	ledger := []LedgerRow{
		{Item: 1, Stratum: "a", Key: "5"}, {Item: 2, Stratum: "a", Key: "1"}, {Item: 3, Stratum: "b", Key: "2"},
		{Item: 4, Stratum: "a", Key: "9", Spare: true}, {Item: 5, Stratum: "a", Key: "7", Spare: true},
		{Item: 6, Stratum: "a", Key: "8", Spare: true}, {Item: 7, Stratum: "b", Key: "3", Spare: true},
	}
	labels := map[int]LabelKind{1: LabelUnsure, 2: LabelUnsure, 3: LabelClass, 4: LabelClass, 5: LabelUnsure, 6: LabelClass, 7: LabelClass}
	use := NewSpareRule(ledger).Assign(func(i int) LabelKind { return labels[i] })
	// Stratum a's spares in key order: 5 (unsure: item 1 goes on), 6
	// (replaces item 1), 4 (replaces item 2). Stratum b: no unsure item,
	// spare 7 labeled and unused.
	want := []SpareStep{{Item: 1, Spare: 5, Label: LabelUnsure}, {Item: 1, Spare: 6, Label: LabelClass}, {Item: 2, Spare: 4, Label: LabelClass}}
	if !slices.Equal(use.Steps, want) || len(use.Unreplaced) != 0 || !slices.Equal(use.Unused, []int{7}) {
		t.Errorf("use %+v", use)
	}
	labels[6] = LabelBlank
	use = NewSpareRule(ledger).Assign(func(i int) LabelKind { return labels[i] })
	want = []SpareStep{{Item: 1, Spare: 5, Label: LabelUnsure}, {Item: 1, Spare: 6, Label: LabelBlank}, {Item: 2, Spare: 4, Label: LabelClass}}
	if !slices.Equal(use.Steps, want) || !slices.Equal(use.Unreplaced, []int{1}) {
		t.Errorf("with spare 6 blank: use %+v", use)
	}
}
