package record

import (
	"errors"
	"strings"
	"testing"
)

func TestParseSignoff(t *testing.T) {
	got, err := ParseSignoff([]byte("approved:\n  name: Ren Æsir-Dóttir\n  title: Head of quality\n  date: 2026-03-02\nprepared:\n  name: Sam Example\n"), "signoff.yaml")
	if err != nil {
		t.Fatal(err)
	}
	if len(got) != 2 || got[0].Role != "prepared" || got[1].Name != "Ren Æsir-Dóttir" || got[1].Date != "2026-03-02" || got[1].Meaning != "" {
		t.Errorf("%+v", got)
	}
	bad := map[string]string{
		"approved:\n  name: A\n  dated: 2026-01-01\n":  "line 2, field approved",
		"approved:\n  name: A\n  date: 02/03/2026\n":   "line 3, field approved.date",
		"signed:\n  name: A\n":                         "line 1, field signed",
		"- a\n":                                        "line 1",
		"approved:\n  name: A\napproved:\n  name: B\n": "",
	}
	for text, want := range bad {
		_, err := ParseSignoff([]byte(text), "signoff.yaml")
		if err == nil || !strings.Contains(err.Error(), "signoff.yaml") || !strings.Contains(err.Error(), want) {
			t.Errorf("%q: got %v, want an error containing %q", text, err, want)
		}
		if err != nil && want != "" && !errors.Is(err, ErrSignoffFile) {
			t.Errorf("%q: error does not wrap ErrSignoffFile", text)
		}
	}
}

// TestParseSignoffHelpExample parses the example shown in `probity record
// --help` (flow style).
func TestParseSignoffHelpExample(t *testing.T) {
	text := "prepared: {name: Dana Example, title: ML engineer, date: 2026-12-01}\nreviewed: {name: Jo Example, title: Model-risk reviewer}\napproved: {name: Sam Example, title: Head of quality,\n           meaning: \"I approve the release of version 2.4\"}\n"
	got, err := ParseSignoff([]byte(text), "signoff.yaml")
	if err != nil {
		t.Fatal(err)
	}
	if len(got) != 3 || got[2].Meaning != "I approve the release of version 2.4" || got[0].Date != "2026-12-01" {
		t.Errorf("%+v", got)
	}
}
