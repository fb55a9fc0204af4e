package drawfolder

import (
	"strings"
	"testing"

	"probity/plan/inputerr"
)

// The one rule for a label cell (common practice, no source: the rule is
// probity's own and documented in the package comment).
func TestParseLabel(t *testing.T) {
	classes := []string{"ok", "defect", "Needs review"}
	cases := []struct {
		cell  string
		label string
		kind  LabelKind
	}{
		{"", "", LabelBlank},
		{"   ", "", LabelBlank},
		{"\t", "", LabelBlank},
		{"ok", "ok", LabelClass},
		{" ok ", "ok", LabelClass},
		{"defect", "defect", LabelClass},
		{"Needs review", "Needs review", LabelClass},
		{"unsure", Unsure, LabelUnsure},
		{"Unsure", Unsure, LabelUnsure},
		{" UNSURE ", Unsure, LabelUnsure},
		{"uNsUrE", Unsure, LabelUnsure},
		{"OK", "OK", LabelInvalid},
		{"Defect", "Defect", LabelInvalid},
		{"needs review", "needs review", LabelInvalid},
		{"Needs  review", "Needs  review", LabelInvalid},
		{" maybe ", "maybe", LabelInvalid},
		{"unsure?", "unsure?", LabelInvalid},
	}
	for _, c := range cases {
		label, kind := ParseLabel(c.cell, classes)
		if label != c.label || kind != c.kind {
			t.Errorf("ParseLabel(%q) = %q, %d; want %q, %d", c.cell, label, kind, c.label, c.kind)
		}
	}
}

func TestRowLabelRefusesOneWay(t *testing.T) {
	r := WorksheetRow{Item: 4, RecordID: "w4", Label: "sonud", Line: 5}
	_, kind, err := RowLabel("labels.csv", r, []string{"defect", "sound"})
	ie, ok := inputerr.As(err)
	if kind != LabelInvalid || !ok {
		t.Fatalf("kind %d, error %v", kind, err)
	}
	want := `labels.csv line 5, field label: label "sonud" (item 4) is not one of the plan's classes (defect, sound), blank or "unsure"`
	if ie.Error() != want {
		t.Errorf("error\n %s\nwant\n %s", ie.Error(), want)
	}
	if !strings.HasPrefix(ie.Hint, "use exactly one of: defect, sound; leave the label blank or write \"unsure\"") {
		t.Errorf("hint %q", ie.Hint)
	}
	r.Label = " Unsure"
	if l, kind, err := RowLabel("labels.csv", r, []string{"defect", "sound"}); l != Unsure || kind != LabelUnsure || err != nil {
		t.Errorf("unsure: %q %d %v", l, kind, err)
	}
}
