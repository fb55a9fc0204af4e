package intake

import (
	"errors"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"probity/plan/inputerr"
	"probity/sampling/drawfolder"
)

func TestCompleteLabelsGiveTheSample(t *testing.T) {
	fx := newDrawFixture(t)
	rows := fx.labeled()
	rows[fx.mainIndex("a", 3)].Label = "defect"
	res, err := fx.check(t, rows, Options{})
	if err != nil {
		t.Fatal(err)
	}
	if len(res.Items) != 29 || res.Design.Strata[0].Sample != 17 || res.Design.Strata[1].Sample != 12 {
		t.Fatalf("%d items, strata %+v", len(res.Items), res.Design.Strata)
	}
	defects := 0
	for _, it := range res.Items {
		if it.Label == "defect" {
			defects++
		}
	}
	if defects != 1 {
		t.Errorf("%d defect labels, want 1", defects)
	}
	if res.Fingerprints.Labels == "" || res.Fingerprints.Worksheet != fx.folder.Manifest.Files["worksheet.csv"] {
		t.Errorf("fingerprints %+v", res.Fingerprints)
	}
	if len(res.Deviations.SparesUsed)+len(res.Deviations.Unlabeled)+len(res.Deviations.Unsure) != 0 {
		t.Errorf("deviations %+v", res.Deviations)
	}
}

func TestSparesReplaceInOrder(t *testing.T) {
	fx := newDrawFixture(t)
	rows := fx.labeled()
	rows[fx.mainIndex("a", 2)].Label = ""
	rows[fx.mainIndex("a", 5)].Label = "unsure"
	rows[fx.spareIndex("a", 0)].Label = "unsure" // the first spare could not be labeled either
	rows[fx.spareIndex("a", 1)].Label = "ok"
	// One item is still missing: refused without AllowIncomplete.
	_, err := fx.check(t, rows, Options{})
	if err == nil || !strings.Contains(err.Error(), "1 item is unlabeled or unsure and no spare replaces it (item ") {
		t.Fatalf("got %v", err)
	}
	var ie *inputerr.Error
	if !errors.As(err, &ie) || !errors.Is(err, ErrIncomplete) || ie.Hint == "" || strings.Contains(ie.Hint, "--") {
		t.Errorf("not ErrIncomplete with a hint in the package's own words: %#v", err)
	}
	res, err := fx.check(t, rows, Options{AllowIncomplete: true})
	if err != nil {
		t.Fatal(err)
	}
	if res.Counted != 1 || !res.Deviations.AllowIncomplete || len(res.Deviations.SparesUsed) != 2 ||
		len(res.Deviations.Unlabeled) != 1 || len(res.Deviations.Unsure) != 2 {
		t.Errorf("counted %d, deviations %+v", res.Counted, res.Deviations)
	}
	missing := 0
	for _, it := range res.Items {
		if it.Missing {
			missing++
		}
	}
	if missing != 1 || res.Design.Strata[0].Sample != 17 {
		t.Errorf("%d missing items, stratum a n_h %d", missing, res.Design.Strata[0].Sample)
	}
	if !strings.Contains(strings.Join(res.Deviations.Notes, " "), "counted as errors for every candidate") {
		t.Errorf("notes %q", res.Deviations.Notes)
	}
}

func TestSpareMisuseIsRefused(t *testing.T) {
	fx := newDrawFixture(t)
	cases := map[string]struct {
		edit func(rows []drawfolder.WorksheetRow)
		want string
	}{
		"out of order": {func(rows []drawfolder.WorksheetRow) {
			rows[fx.mainIndex("b", 0)].Label = ""
			rows[fx.spareIndex("b", 1)].Label = "ok"
		}, "spares must be used in order"},
		"nothing to replace": {func(rows []drawfolder.WorksheetRow) {
			rows[fx.spareIndex("a", 0)].Label = "ok"
		}, "no unlabeled or unsure item of that stratum is left"},
		"bad label": {func(rows []drawfolder.WorksheetRow) {
			rows[4].Label = "defekt"
		}, `label "defekt" (item 5) is not one of the plan's classes (ok, defect), blank or "unsure"`},
	}
	for name, c := range cases {
		rows := fx.labeled()
		c.edit(rows)
		_, err := fx.check(t, rows, Options{AllowIncomplete: true})
		if err == nil || !strings.Contains(err.Error(), c.want) || !strings.Contains(err.Error(), "labels.csv line") {
			t.Errorf("%s: got %v, want %q with the file and line", name, err, c.want)
		}
	}
}

func TestRowDifferencesAreListed(t *testing.T) {
	fx := newDrawFixture(t)
	cases := map[string]struct {
		edit func([]drawfolder.WorksheetRow) []drawfolder.WorksheetRow
		want string
	}{
		// One deleted row is that row, not every row after it (issue 16,
		// item 10).
		"removed row": {func(r []drawfolder.WorksheetRow) []drawfolder.WorksheetRow { return append(r[:3:3], r[4:]...) },
			`rows differ from the draw's worksheet — a row is missing: item 4 (record_id "a0396", line 5 of the draw's worksheet)` + "\nhint"},
		"added row": {func(r []drawfolder.WorksheetRow) []drawfolder.WorksheetRow {
			return append(r, drawfolder.WorksheetRow{Item: 99, RecordID: "zz", Show: []string{"x"}, Label: "ok"})
		}, `line 35: record_id "zz" (item 99) is not in this draw`},
		"edited id": {func(r []drawfolder.WorksheetRow) []drawfolder.WorksheetRow { r[0].RecordID = "other"; return r }, `a row is missing: item 1 (record_id "a0264", line 2 of the draw's worksheet); line 2: record_id "other" (item 1) is not in this draw`},
		// A reformatted shown value names its column and both values
		// (issue 16, item 11).
		"edited shown value": {func(r []drawfolder.WorksheetRow) []drawfolder.WorksheetRow { r[2].Show = []string{"changed"}; return r },
			`line 4: item 3's text is "changed", the draw's worksheet has "text a0363"` + "\nhint: a spreadsheet may have reformatted the value"},
		"sorted rows": {func(r []drawfolder.WorksheetRow) []drawfolder.WorksheetRow { r[0], r[1] = r[1], r[0]; return r },
			"line 3: item 1 is out of order: the draw's worksheet has it before item 2 (on line 2)"},
	}
	for name, c := range cases {
		_, err := fx.check(t, c.edit(fx.labeled()), Options{})
		if err == nil || !strings.Contains(err.Error()+"\nhint: "+inputerr.HintOf(err), c.want) || !strings.Contains(err.Error(), "labels.csv") {
			t.Errorf("%s: got %v, want %q", name, err, c.want)
		}
	}
}

func TestFingerprintMismatchesAreRefused(t *testing.T) {
	// The plan is not the one the draw was made with.
	fx := newDrawFixture(t)
	f, err := drawfolder.Open(fx.drawDir(), fx.planFP, []string{"m1", "m2"})
	if err != nil {
		t.Fatal(err)
	}
	l, err := drawfolder.ReadLabels(fx.writeLabels(t, fx.labeled()))
	if err != nil {
		t.Fatal(err)
	}
	if _, err := Check(fx.plan, strings.Repeat("0", 64), f, l, Options{}); err == nil || !strings.Contains(err.Error(), "manifest.json, field plan_fingerprint") {
		t.Errorf("other plan: %v", err)
	}
	if _, err := drawfolder.Open(fx.drawDir(), strings.Repeat("0", 64), []string{"m1", "m2"}); err == nil || !strings.Contains(err.Error(), "manifest.json, field plan_fingerprint") {
		t.Errorf("other plan: %v", err)
	}
	// An edited ledger.
	lp := filepath.Join(fx.drawDir(), "ledger.csv")
	data, _ := os.ReadFile(lp)
	os.WriteFile(lp, []byte(strings.Replace(string(data), ",ok,ok\n", ",defect,ok\n", 1)), 0o644)
	if _, err := drawfolder.Open(fx.drawDir(), fx.planFP, []string{"m1", "m2"}); err == nil || !strings.Contains(err.Error(), "the file was changed after the draw") || !strings.Contains(err.Error(), "ledger.csv") {
		t.Errorf("edited ledger: %v", err)
	}
	os.WriteFile(lp, data, 0o644)
	// The worksheet labeled in place is recognised as the draw's.
	wp := filepath.Join(fx.drawDir(), "worksheet.csv")
	wf, _ := os.Create(wp)
	drawfolder.WriteDrawWorksheet(wf, drawfolder.ManifestDrawID(fx.folder.Manifest), []string{"text"}, fx.labeled())
	wf.Close()
	f, err = drawfolder.Open(fx.drawDir(), fx.planFP, []string{"m1", "m2"})
	if err != nil || !f.LabeledInPlace || f.WorksheetSHA256 != fx.folder.Manifest.Files["worksheet.csv"] {
		t.Errorf("worksheet labeled in place: %v %+v", err, f)
	}
	// But one with an edited record id is not.
	rows := fx.labeled()
	rows[0].RecordID = "forged"
	wf, _ = os.Create(wp)
	drawfolder.WriteWorksheet(wf, []string{"text"}, rows)
	wf.Close()
	if _, err := drawfolder.Open(fx.drawDir(), fx.planFP, []string{"m1", "m2"}); err == nil || !strings.Contains(err.Error(), "worksheet.csv") {
		t.Errorf("edited worksheet: %v", err)
	}
}
