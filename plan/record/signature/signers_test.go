package signature

import (
	"crypto/ed25519"
	"errors"
	"strings"
	"testing"
)

func TestParseSigners(t *testing.T) {
	fpA := Fingerprint(keyFrom(1).Public().(ed25519.PublicKey))
	fpB := Fingerprint(keyFrom(2).Public().(ed25519.PublicKey))
	text := "signers:\n  - name: \" Jo\u0308rg Þórsson \"\n    roles: [reviewed, approved]\n    key: " + fpA +
		"\n  - name: Audit operations\n    roles: [operator]\n    key: " + fpB + "\n"
	s, err := ParseSigners([]byte(text), "signers.yaml")
	if err != nil {
		t.Fatal(err)
	}
	if len(s.List) != 2 || s.List[0].Name != "Jörg Þórsson" || s.List[1].Line != 5 {
		t.Fatalf("%+v", s.List)
	}
	if err := s.Check(fpA, "jörg þórsson", "approved"); err != nil {
		t.Errorf("the named signer in a role of theirs: %v", err)
	}
	for _, c := range []struct{ fp, name, role, want string }{
		{fpA, "Someone Else", "reviewed", "belongs to Jörg Þórsson in signers.yaml (line 2), not to Someone Else"},
		{fpA, "Jörg Þórsson", "prepared", "may sign as reviewed, approved in signers.yaml (line 2), not as prepared"},
		{fpB, "Audit operations", "reviewed", "not as reviewed"},
		{"sha256:" + strings.Repeat("0", 64), "x", "reviewed", "is not in the signers file signers.yaml"},
	} {
		if err := s.Check(c.fp, c.name, c.role); !errors.Is(err, ErrMismatch) || !strings.Contains(err.Error(), c.want) {
			t.Errorf("Check(%s, %s): %v, want %q", c.name, c.role, err, c.want)
		}
	}
	bad := map[string]string{
		"signers:\n  - name: A\n    roles: [reviewer]\n    key: " + fpA + "\n":                                                           "line 3, field signers[0].roles",
		"signers:\n  - name: A\n    roles: [reviewed]\n    key: abc\n":                                                                   "line 4, field signers[0].key",
		"signers:\n  - name: \"A\\u202e\"\n    roles: [reviewed]\n    key: " + fpA + "\n":                                                "line 2, field signers[0].name: invalid signers file: invalid name: character 2 is U+202E",
		"signers:\n  - roles: [reviewed]\n    key: " + fpA + "\n":                                                                        "field signers[0].name: invalid signers file: the name is missing",
		"signers:\n  - name: A\n    roles: [reviewed]\n    key: " + fpA + "\n  - name: B\n    roles: [approved]\n    key: " + fpA + "\n": "line 7, field signers[1].key: invalid signers file: key " + fpA + " is listed twice (lines 2 and 7)",
		"signers:\n  - name: A\n    roles: [reviewed]\n    key: " + fpA + "\n    email: a@example.org\n":                                 "field email not found",
		"signers: []\n": "names no signer",
		"signers:\n  - name: A\n    roles: [reviewed]\n    key: " + fpA + "\n---\nsigners: []\n": "more than one YAML document",
	}
	for text, want := range bad {
		_, err := ParseSigners([]byte(text), "signers.yaml")
		if !errors.Is(err, ErrSignersFile) || !strings.Contains(err.Error(), want) {
			t.Errorf("%q: got %v, want %q", text, err, want)
		}
	}
}
