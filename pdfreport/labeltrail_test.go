package pdfreport

import (
	"strings"
	"testing"

	"probity/plan/record"
)

// TestLabelTrailSection: a record whose labels came from a label trail
// says who labeled, when, and how many labels changed, and lists the
// trail's fingerprint; a record without one has neither.
func TestLabelTrailSection(t *testing.T) {
	rec := fixtureRecord("general")
	plain := flat(pdfText(t, render(t, rec, Options{})))
	if strings.Contains(plain, "Labeling audit trail") || strings.Contains(plain, "Label trail") {
		t.Fatal("a record without a trail has a trail section")
	}
	rec.Fingerprints.Trail = strings.Repeat("7e", 32)
	rec.LabelTrail = &record.LabelTrail{Labelers: []string{"Jo Example", "Zoë Ødegård"}, FirstLabel: "2026-11-28T08:01:02.345Z",
		LastLabel: "2026-11-30T16:59:00.000Z", Events: 1234, Changed: 7}
	text := flat(pdfText(t, render(t, rec, Options{})))
	for _, want := range []string{
		"Labeling audit trail",
		"Labelers Jo Example, Zoë Ødegård",
		"First label 2026-11-28T08:01:02.345Z (UTC)",
		"Last label 2026-11-30T16:59:00.000Z (UTC)",
		"Label events 1,234",
		"Changed labels 7 (each with its reason in the trail)",
		"Label trail " + strings.Repeat("7e", 32),
	} {
		if !strings.Contains(text, want) {
			t.Errorf("PDF text lacks %q", want)
		}
	}
}
