package personname

import (
	"errors"
	"strings"
	"testing"
)

func TestCleanRefusesInvisibleAndReorderingCharacters(t *testing.T) {
	// The characters and their names: Unicode 15 code charts (from memory).
	bad := []struct {
		name, want string
	}{
		{"Dana\x00Example", "U+0000 (NUL)"},
		{"Dana \u202eelpmaxE", "U+202E (a right-to-left override)"},
		{"Da\u200bna", "U+200B (a zero-width space)"},
		{"Dana\u200d", "U+200D (a zero-width joiner)"},
		{"\ufeffDana", "U+FEFF (a zero-width no-break space (byte-order mark))"},
		{"Dana\u2066x\u2069", "U+2066 (a left-to-right isolate)"},
		{"Dana\nExample", "U+000A (a line break)"},
		{"Dana\u2028Example", "U+2028 (a line or paragraph separator)"},
		{"Dana\u0085", "U+0085 (a control character)"},
		{"Dana\u061c", "U+061C (an invisible formatting character)"},
		{"Dana\ue000", "U+E000 (a private-use character)"},
		{"Dana\ufdd0", "U+FDD0 (a noncharacter)"},
		{"Dana\U0010FFFF", "U+10FFFF (a noncharacter)"},
		{"Dana\xff", "not valid UTF-8"},
	}
	for _, c := range bad {
		_, err := Clean(c.name)
		if !errors.Is(err, ErrName) || !strings.Contains(err.Error(), c.want) {
			t.Errorf("Clean(%q) = %v, want ErrName naming %s", c.name, err, c.want)
		}
	}
	if _, err := Clean("Dana \u202eelpmaxE"); !strings.Contains(err.Error(), "character 6 is") {
		t.Errorf("the position is not counted in characters: %v", err)
	}
}

func TestCleanNormalises(t *testing.T) {
	good := []struct{ in, want string }{
		{"  Jörg Þórsson ", "Jörg Þórsson"},
		{"Jo\u0308rg", "Jörg"}, // o + combining diaeresis → ö (NFC)
		{"Dr. Ilse Brandvold-Achebe", "Dr. Ilse Brandvold-Achebe"},
		{"", ""},
		{"李小龍", "李小龍"},
		{"علي", "علي"}, // right-to-left script itself is fine; only the controls are refused
	}
	for _, c := range good {
		got, err := Clean(c.in)
		if err != nil || got != c.want {
			t.Errorf("Clean(%q) = %q, %v; want %q", c.in, got, err, c.want)
		}
	}
}

func TestSame(t *testing.T) {
	cases := []struct {
		a, b string
		want bool
	}{
		{"Jörg", "Jo\u0308rg", true},
		{"ann", " ANN ", true},
		{"ann", "anne", false},
		// A zero-width space no longer makes two names differ: a name
		// holding one is refused by Clean, and compared as written it
		// still differs, so Same is only ever asked about clean names.
		{"ann", "an\u200bn", false},
	}
	for _, c := range cases {
		if got := Same(c.a, c.b); got != c.want {
			t.Errorf("Same(%q, %q) = %v, want %v", c.a, c.b, got, c.want)
		}
	}
}
