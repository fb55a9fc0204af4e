package pdfreport

import (
	"os"
	"path/filepath"
	"strings"
	"testing"

	"probity/plan/record"
)

// fixtureLabelQuality is an invented double-labeling summary: 6 doubled
// items, 4 compared ([[1 1] [0 2]]), one disagreement adjudicated and one
// left open. The coefficients are those plan/agreement computes for this
// table (κ = 1/2, AC1 = 9/17 by hand); the PDF only prints them.
func fixtureLabelQuality() *record.LabelQuality {
	return &record.LabelQuality{
		SecondWorksheet: strings.Repeat("ab", 32),
		Doubled:         6, Compared: 4,
		Classes:           []string{"defect", "ok"},
		Table:             [][]int{{1, 1}, {0, 2}},
		ObservedAgreement: 0.75,
		Kappa: record.Agreement{Method: "Cohen's kappa; large-sample standard error of Fleiss, Cohen & Everitt (1969); normal interval",
			Defined: true, Value: 0.5, ChanceAgreement: 0.5, StdErr: 0.3952847, Lower: -0.2747, Upper: 1, Confidence: 0.95},
		AC1: record.Agreement{Method: "Gwet's AC1; variance of Gwet (2008) without finite-population correction; normal interval",
			Defined: true, Value: 9.0 / 17, ChanceAgreement: 15.0 / 32, StdErr: 0.41, Lower: -0.27, Upper: 1, Confidence: 0.95},
		Labelers: []record.Labeler{{Name: "ana", First: 7}, {Name: "bea", Second: 6}, {Name: "Zoë Ødegård", First: 6}},
		Disagreements: []record.Disagreement{
			{Item: 2, RecordID: "seam-00127", First: "defect", FirstLabeler: "ana", Second: "ok", SecondLabeler: "bea",
				Resolution: record.ResolvedAdjudicated, Final: "defect", DecidedBy: "Dana Reyes", Note: "undercut visible on the second scan"},
			{Item: 3, RecordID: "seam-00902", First: "ok", FirstLabeler: "ana", Second: "unsure", SecondLabeler: "bea",
				Resolution: record.ResolvedCountedAsError},
		},
		Adjudicated: 1, Unadjudicated: 1, AllowUnadjudicated: true,
		Disagreed: 1, DisagreementRate: 0.25, DisagreementUpper: 0.7513641,
		Note:            "The reference labels are taken as the truth. NOTE-SENTINEL.",
		Unsure:          2,
		UnsureTreatment: "all 2 replaced by spares, in draw order",
		Warnings:        []string{"worksheet-second.csv line 6: item 5 has no label here, so it has one label only and is not compared"},
	}
}

func TestLabelQualitySection(t *testing.T) {
	rec := fixtureRecord("general")
	plain := flat(pdfText(t, render(t, rec, Options{})))
	if strings.Contains(plain, "Label quality") {
		t.Fatal("a record without double labeling has a Label quality section")
	}
	rec.LabelQuality = fixtureLabelQuality()
	pdf := render(t, rec, Options{})
	text := flat(pdfText(t, pdf))
	for _, want := range []string{
		"Label quality",
		"6 items were drawn at random for a second, independent label; 4 of them were put in a class by both labelers",
		"Observed agreement 75.000 % of 4 compared items",
		"Cohen's kappa 0.500 (95 % interval -0.275 to 1.000; standard error 0.395; chance agreement 0.500)",
		"Gwet's AC1 0.529 (95 % interval -0.270 to 1.000",
		"two different classes on 1 of 4 compared items (25.000 %; one-sided 95 % upper bound 75.137 %)",
		"1 item adjudicated; 1 disagreement not adjudicated, each counted as an error for every candidate",
		"Unsure items 2; all 2 replaced by spares, in draw order",
		"Zoë Ødegård",
		"seam-00127", "adjudicated: defect", "Dana Reyes: undercut visible on the second scan",
		"not adjudicated: counted as an error",
		"item 5 has no label here",
		"What label error does to the bound", "NOTE-SENTINEL",
	} {
		if !strings.Contains(text, want) {
			t.Errorf("PDF text lacks %q", want)
		}
	}
	if dir := os.Getenv("PROBITY_PDF_OUT"); dir != "" {
		if err := os.WriteFile(filepath.Join(dir, "labelquality.pdf"), pdf, 0o644); err != nil {
			t.Fatal(err)
		}
	}
}
