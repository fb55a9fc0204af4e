package agreement

import (
	"path/filepath"
	"slices"
	"testing"

	"probity/plan/record"
	"probity/sampling/drawfolder"
)

// TestResolveDrawFolderFiles runs Resolve on the files of
// testdata/agreement/folder, read with the draw folder's own readers: 14
// items (2 spares), items 1–6 doubled, two disagreements adjudicated.
func TestResolveDrawFolderFiles(t *testing.T) {
	dir := filepath.Join("..", "..", "testdata", "agreement", "folder")
	path := func(name string) string { return filepath.Join(dir, name) }
	ledger, err := drawfolder.ReadLedger(path("ledger.csv"), []string{"line-a"})
	if err != nil {
		t.Fatal(err)
	}
	_, first, err := drawfolder.ReadWorksheet(path("worksheet.csv"))
	if err != nil {
		t.Fatal(err)
	}
	_, second, err := drawfolder.ReadWorksheet(path("worksheet-second.csv"))
	if err != nil {
		t.Fatal(err)
	}
	classes := []string{"defect", "ok"}
	adj, err := ReadAdjudications(path("adjudication.csv"), classes)
	if err != nil {
		t.Fatal(err)
	}
	res, err := Resolve(Input{
		Classes: classes,
		Ledger:  ledger, LedgerFile: path("ledger.csv"),
		First: first, FirstFile: path("worksheet.csv"),
		Second: second, SecondFile: path("worksheet-second.csv"),
		Adjudications: adj, AdjudicationFile: path("adjudication.csv"),
		Strict: true,
	})
	if err != nil {
		t.Fatal(err)
	}
	want := []string{"1:ok/agreed", "2:defect/adjudicated", "3:ok/adjudicated", "4:unsure/neither", "5:ok/agreed", "6:defect/agreed",
		"7:ok/first", "8:ok/first", "9:unsure/first", "10:ok/first", "11:defect/first", "12:ok/first", "13:ok/first", "14:/first"}
	if got := labelsOf(res); !slices.Equal(got, want) {
		t.Errorf("labels\n got %v\nwant %v", got, want)
	}
	q := res.Quality
	// Compared: items 1, 2, 5, 6 → [[1 1] [0 2]]. By hand (exact
	// arithmetic): p_o = 3/4; kappa margins (1/2, 1/2), (1/4, 3/4), p_e =
	// 1/2, κ = 1/2; AC1 π = (3/8, 5/8), p_e = 15/32, γ = (9/32)/(17/32) =
	// 9/17.
	if !slices.Equal(q.Table[0], []int{1, 1}) || !slices.Equal(q.Table[1], []int{0, 2}) {
		t.Errorf("table %v", q.Table)
	}
	if !near(q.Kappa.Value, 0.5, 1e-12) || !near(q.AC1.Value, 9.0/17, 1e-12) || !near(q.AC1.ChanceAgreement, 15.0/32, 1e-12) {
		t.Errorf("kappa %v AC1 %v (p_e %v), want 1/2, 9/17 (15/32)", q.Kappa.Value, q.AC1.Value, q.AC1.ChanceAgreement)
	}
	wantLab := []record.Labeler{{Name: "ana", First: 7}, {Name: "bea", Second: 6}, {Name: "cyd", First: 6}}
	if !slices.Equal(q.Labelers, wantLab) {
		t.Errorf("labelers %+v, want %+v", q.Labelers, wantLab)
	}
	if q.Unsure != 2 || q.Adjudicated != 2 || len(q.Disagreements) != 2 || len(q.Warnings) != 0 {
		t.Errorf("unsure %d adjudicated %d disagreements %d warnings %q", q.Unsure, q.Adjudicated, len(q.Disagreements), q.Warnings)
	}
	if d := q.Disagreements[1]; d.Note != "shadow, not porosity" || d.DecidedBy != "Dana Reyes" || d.Second != "unsure" {
		t.Errorf("disagreement 2 = %+v", d)
	}
}
