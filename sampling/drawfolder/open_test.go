package drawfolder

import (
	"os"
	"path/filepath"
	"strings"
	"testing"

	"probity/plan/inputerr"
	"probity/sampling/safewrite"
)

// openFixture writes sampleFolder (plan fingerprint "pf") into a new
// folder and returns it.
func openFixture(t *testing.T) (string, *Content) {
	t.Helper()
	dir := filepath.Join(t.TempDir(), "draw")
	c := sampleFolder()
	c.Manifest.Spares = 1
	c.Manifest.Strata[0].Sample = 1
	for i := range c.Ledger {
		c.Ledger[i].StratumSample = 1
	}
	if err := Write(dir, c, safewrite.FolderOptions{}); err != nil {
		t.Fatal(err)
	}
	return dir, c
}

func TestOpenChecksTheFolder(t *testing.T) {
	dir, c := openFixture(t)
	f, err := Open(dir, "pf", c.Candidates)
	if err != nil {
		t.Fatal(err)
	}
	if len(f.Ledger) != 2 || len(f.Worksheet) != 2 || f.LabeledInPlace || f.WorksheetSHA256 != f.Manifest.Files[WorksheetFile] || f.StratumIndex["a|<b>"] != 0 {
		t.Fatalf("opened %+v", f)
	}
	refused := func(name, want string) {
		t.Helper()
		_, err := Open(dir, "pf", c.Candidates)
		if !inputerr.Is(err) || !strings.Contains(err.Error(), want) {
			t.Errorf("%s: got %v, want an input error with %q", name, err, want)
		}
	}
	if _, err := Open(dir, "other", c.Candidates); !inputerr.Is(err) || !strings.Contains(err.Error(), "manifest.json, field plan_fingerprint: the draw was made from the plan with SHA-256 pf…") ||
		inputerr.HintOf(err) != "pass the plan file the draw was made with" {
		t.Errorf("other plan: %v", err)
	}
	edit := func(name, old, new string) func() {
		p := filepath.Join(dir, name)
		data, _ := os.ReadFile(p)
		os.WriteFile(p, []byte(strings.Replace(string(data), old, new, 1)), 0o644)
		return func() { os.WriteFile(p, data, 0o644) }
	}
	undo := edit(LedgerFile, ",yes,no", ",no,no")
	refused("edited ledger", "ledger.csv: SHA-256 ")
	refused("edited ledger", "the file was changed after the draw")
	undo()
	undo = edit(ManifestFile, `"sample": 1,`, `"sample": 2,`)
	refused("strata against ledger", `ledger.csv, field stratum_size: item 1: stratum "a|<b>" has N_h = 3, n_h = 1 where the manifest has 3, 2`)
	undo()
	undo = edit(WorksheetFile, "r1", "forged")
	refused("edited worksheet", "worksheet.csv: SHA-256 ")
	undo()
	// The worksheet labeled in place is still the draw's.
	labeled := append([]WorksheetRow{}, c.Worksheet...)
	labeled[0].Label, labeled[0].Labeler = "yes", "ann"
	wf, _ := os.Create(filepath.Join(dir, WorksheetFile))
	WriteDrawWorksheet(wf, ManifestDrawID(c.Manifest), c.Show, labeled)
	wf.Close()
	f, err = Open(dir, "pf", c.Candidates)
	if err != nil || !f.LabeledInPlace || f.WorksheetSHA256 != f.Manifest.Files[WorksheetFile] {
		t.Errorf("worksheet labeled in place: %v", err)
	}
}
