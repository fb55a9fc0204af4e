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

// TestParseSignoffRefusesHiddenCharacters: a NUL, a right-to-left override
// or a zero-width space in a name is refused with its line and field; a
// name is trimmed and put in NFC; a meaning's lines are joined.
func TestParseSignoffRefusesHiddenCharacters(t *testing.T) {
	bad := map[string]string{
		"reviewed:\n  name: \"Jo\\0Example\"\n":                "line 2, field reviewed.name: invalid sign-off file: invalid name: character 3 is U+0000 (NUL)",
		"reviewed:\n  name: \"Jo \\u202eelpmaxE\"\n":           "line 2, field reviewed.name: invalid sign-off file: invalid name: character 4 is U+202E (a right-to-left override)",
		"reviewed:\n  name: A\n  title: \"Re\\u200bviewer\"\n": "line 3, field reviewed.title: invalid sign-off file: invalid name: character 3 is U+200B (a zero-width space)",
	}
	for text, want := range bad {
		_, err := ParseSignoff([]byte(text), "signoff.yaml")
		if err == nil || !strings.Contains(err.Error(), "signoff.yaml "+want) {
			t.Errorf("%q: got %v, want %q", text, err, want)
		}
	}
	got, err := ParseSignoff([]byte("reviewed:\n  name: \"  Jo\\u0308rg \"\n  meaning: >\n    I reviewed\n    the method.\n"), "signoff.yaml")
	if err != nil {
		t.Fatal(err)
	}
	if got[0].Name != "Jörg" || got[0].Meaning != "I reviewed the method." {
		t.Errorf("%+v", got)
	}
}
