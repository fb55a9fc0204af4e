package pdfreport

import (
	"strings"
	"testing"

	"probity/plan/record"
	"probity/sampling"
)

// TestFingerprintsListSecondWorksheetAndAdjudication: a record made with a
// second labeling and an adjudication file lists both files' SHA-256 in
// the fingerprint table (they were only in record.json before).
func TestFingerprintsListSecondWorksheetAndAdjudication(t *testing.T) {
	rec := fixtureRecord("general")
	second := strings.Repeat("ab", 32)
	adj := strings.Repeat("cd", 32)
	rec.LabelQuality = &record.LabelQuality{SecondWorksheet: second, Adjudications: adj, Doubled: 20, Compared: 20,
		Classes: []string{"ok", "wrong"}, Table: [][]int{{18, 1}, {1, 0}}}
	text := flat(pdfText(t, render(t, rec, Options{})))
	for _, want := range []string{"Second worksheet " + second, "Adjudication file " + adj} {
		if !strings.Contains(text, want) {
			t.Errorf("fingerprint table lacks %q", want)
		}
	}
	// Without a second labeling the rows are absent.
	text = flat(pdfText(t, render(t, fixtureRecord("general"), Options{})))
	if strings.Contains(text, "Second worksheet") || strings.Contains(text, "Adjudication file") {
		t.Error("a record without a second labeling lists a second worksheet or an adjudication file")
	}
}

// TestSelectionFormulaIsPrinted: the plan section says how the selection
// seed and each row's key are computed, and the formula as printed gives
// the draw's own values (sampling.PeriodSeed and sampling.Key).
func TestSelectionFormulaIsPrinted(t *testing.T) {
	rec := fixtureRecord("general")
	rec.Plan.SelectionSeed = sampling.PeriodSeed(rec.Plan.Seed, rec.Period)
	text := flat(pdfText(t, render(t, rec, Options{})))
	for _, want := range []string{
		`the selection seed is the lowercase hex SHA-256 of the UTF-8 bytes "<plan seed>:period:2026-10"`,
		`key = lowercase hex SHA-256 of the UTF-8 bytes "<selection seed>:<record id>"`,
		"the n_h rows with the smallest keys form the sample",
	} {
		if !strings.Contains(text, want) {
			t.Errorf("text lacks %q", want)
		}
	}
	// The printed formulas, applied by hand, are the draw's.
	if got := record.SHA256([]byte(rec.Plan.Seed + ":period:" + rec.Period)); got != rec.Plan.SelectionSeed {
		t.Errorf("printed seed formula gives %s, the draw %s", got, rec.Plan.SelectionSeed)
	}
	if got, want := record.SHA256([]byte(rec.Plan.SelectionSeed+":w00017")), sampling.Key(rec.Plan.SelectionSeed, "w00017"); got != want {
		t.Errorf("printed key formula gives %s, the draw %s", got, want)
	}
	// A draw without a period keys on the plan seed itself.
	text = flat(pdfText(t, render(t, fixtureRecord("general"), Options{})))
	if !strings.Contains(text, "the selection seed is the plan seed itself") {
		t.Error("a draw without a period does not say that the plan seed is the selection seed")
	}
}

// TestStratumIntervalsAreDescriptive: the per-stratum intervals are said
// to be descriptive, two-sided 95 % and not the verdict's level, and a
// stratum with fewer than 30 labeled items is marked small, with the
// threshold named a rule of thumb.
func TestStratumIntervalsAreDescriptive(t *testing.T) {
	rec := manyRecord() // strata of 20 to 39 labeled items
	text := flat(pdfText(t, render(t, rec, Options{})))
	for _, want := range []string{
		"Descriptive only", "two-sided exact (Clopper–Pearson) 95 % interval",
		"That is not the verdict's level (a one-sided 99.5833 % upper bound",
		"fewer than 30 labeled items is marked small", "30 is a common rule of thumb, no source",
		"Errors per stratum (descriptive): seam-net-00-threshold-0.30",
		"line 01 / shift A (small) 20", "line 05 / shift B (small) 29",
	} {
		if !strings.Contains(text, want) {
			t.Errorf("text lacks %q", want)
		}
	}
	if strings.Contains(text, "line 06 / shift A (small)") {
		t.Error("a stratum of 30 labeled items is marked small")
	}
}
