// Package personname checks and normalises the names of people that a
// record carries: the signers of the sign-off block and of the electronic
// signatures, the labelers of the worksheets and the adjudicators. A name
// is printed for a reviewer and compared with other names (the same
// labeler on both labels of an item; the signer a signers file names), so
// it must look like what it is: characters that print nothing, or that
// reorder the text around them, are refused rather than kept or dropped.
//
// The package computes and never prints.
package personname

import (
	"errors"
	"fmt"
	"strings"
	"unicode"
	"unicode/utf8"

	"golang.org/x/text/unicode/norm"
)

// ErrName is wrapped by every refusal of a name.
var ErrName = errors.New("invalid name")

// Clean returns name without its surrounding white space and in Unicode
// normalisation form NFC (so "é" typed as one character and as "e" plus a
// combining accent are the same name), or an error wrapping ErrName that
// names the first character a name must not hold:
//
//   - invalid UTF-8;
//   - a control character (Unicode category Cc: NUL, tab, line breaks,
//     escape, the C1 controls);
//   - a format character (category Cf): the zero-width space, joiners and
//     word joiner, the byte-order mark, the soft hyphen, and the
//     bidirectional marks, embeddings, overrides and isolates such as
//     U+202E RIGHT-TO-LEFT OVERRIDE, which print nothing or reorder what
//     is printed around them;
//   - a line or paragraph separator (Zl, Zp), a surrogate (Cs), a
//     private-use character (Co) or a noncharacter.
//
// An empty name (after trimming) is returned as "" without error; the
// caller decides whether a name is required.
func Clean(name string) (string, error) {
	if !utf8.ValidString(name) {
		return "", fmt.Errorf("%w: it is not valid UTF-8 text", ErrName)
	}
	for i, r := range name {
		if what := forbidden(r); what != "" {
			return "", fmt.Errorf("%w: character %d is U+%04X (%s), which a name must not hold", ErrName, utf8.RuneCountInString(name[:i])+1, r, what)
		}
	}
	return norm.NFC.String(strings.TrimSpace(name)), nil
}

// Same reports whether two names are the same person's as written: equal
// after Clean, ignoring case (Unicode simple folding). A name Clean refuses
// is compared as written, trimmed.
func Same(a, b string) bool {
	return strings.EqualFold(comparable(a), comparable(b))
}

func comparable(s string) string {
	if c, err := Clean(s); err == nil {
		return c
	}
	return strings.TrimSpace(s)
}

// forbidden names the kind of r when a name must not hold it, else "".
func forbidden(r rune) string {
	if what, ok := named[r]; ok {
		return what
	}
	switch {
	case unicode.Is(unicode.Cc, r):
		return "a control character"
	case unicode.Is(unicode.Cf, r):
		return "an invisible formatting character"
	case unicode.Is(unicode.Zl, r), unicode.Is(unicode.Zp, r):
		return "a line or paragraph separator"
	case unicode.Is(unicode.Cs, r):
		return "a surrogate"
	case unicode.Is(unicode.Co, r):
		return "a private-use character"
	case isNoncharacter(r):
		return "a noncharacter"
	}
	return ""
}

// isNoncharacter reports the 66 noncharacters: U+FDD0–U+FDEF and the last
// two code points of every plane.
func isNoncharacter(r rune) bool {
	return (r >= 0xFDD0 && r <= 0xFDEF) || r&0xFFFE == 0xFFFE
}

// named are the characters most often met in pasted names, by name.
var named = map[rune]string{
	0x0000: "NUL",
	0x0009: "a tab",
	0x000A: "a line break",
	0x000D: "a carriage return",
	0x00AD: "a soft hyphen, which is invisible",
	0x200B: "a zero-width space",
	0x200C: "a zero-width non-joiner",
	0x200D: "a zero-width joiner",
	0x200E: "a left-to-right mark",
	0x200F: "a right-to-left mark",
	0x202A: "a left-to-right embedding",
	0x202B: "a right-to-left embedding",
	0x202C: "a pop directional formatting",
	0x202D: "a left-to-right override",
	0x202E: "a right-to-left override",
	0x2060: "a word joiner",
	0x2066: "a left-to-right isolate",
	0x2067: "a right-to-left isolate",
	0x2068: "a first strong isolate",
	0x2069: "a pop directional isolate",
	0xFEFF: "a zero-width no-break space (byte-order mark)",
}
