package sampling

import (
	"errors"
	"fmt"
	"unicode/utf16"
	"unicode/utf8"
)

// unquoteJSON decodes a JSON string literal (RFC 8259 §7: raw, with its
// quotes) to the bytes it stands for, appended to dst. Unlike
// encoding/json it never replaces anything: bytes that are not valid
// UTF-8 are kept exactly as the log holds them (a log's values are
// bytes, as in CSV and TSV), and an escape that names no character (a
// lone UTF-16 surrogate such as \ud800) is an error rather than U+FFFD.
func unquoteJSON(dst, raw []byte) ([]byte, error) {
	if len(raw) < 2 || raw[0] != '"' || raw[len(raw)-1] != '"' {
		return dst, errors.New("not a JSON string")
	}
	s := raw[1 : len(raw)-1]
	for i := 0; i < len(s); {
		c := s[i]
		switch {
		case c == '\\':
			if i+1 >= len(s) {
				return dst, errors.New("the string ends in a lone backslash")
			}
			e := s[i+1]
			if e == 'u' {
				r, n, err := unicodeEscape(s[i:])
				if err != nil {
					return dst, err
				}
				dst = utf8.AppendRune(dst, r)
				i += n
				continue
			}
			v, ok := simpleEscape(e)
			if !ok {
				return dst, fmt.Errorf("\\%c is not a JSON escape", e)
			}
			dst = append(dst, v)
			i += 2
		case c == '"':
			return dst, errors.New("a quote inside the string is not escaped")
		case c < 0x20:
			return dst, fmt.Errorf("control character 0x%02x inside the string is not escaped", c)
		default:
			dst = append(dst, c)
			i++
		}
	}
	return dst, nil
}

// simpleEscape returns the byte of the one-letter escape \e.
func simpleEscape(e byte) (byte, bool) {
	switch e {
	case '"', '\\', '/':
		return e, true
	case 'b':
		return '\b', true
	case 'f':
		return '\f', true
	case 'n':
		return '\n', true
	case 'r':
		return '\r', true
	case 't':
		return '\t', true
	}
	return 0, false
}

// unicodeEscape reads \uXXXX at the start of s, and the low half that
// must follow a high surrogate; it returns the character and the bytes
// read.
func unicodeEscape(s []byte) (rune, int, error) {
	hi, ok := hex4(s)
	if !ok {
		return 0, 0, fmt.Errorf("%q is not a \\u escape with four hex digits", s[:min(len(s), 6)])
	}
	switch {
	case !utf16.IsSurrogate(rune(hi)):
		return rune(hi), 6, nil
	case hi < 0xdc00:
		if lo, ok := hex4(s[6:]); ok && lo >= 0xdc00 && lo <= 0xdfff {
			return utf16.DecodeRune(rune(hi), rune(lo)), 12, nil
		}
	}
	return 0, 0, fmt.Errorf("%s is half of a UTF-16 surrogate pair, not a character", s[:6])
}

// hex4 reads "\uXXXX" at the start of s.
func hex4(s []byte) (uint16, bool) {
	if len(s) < 6 || s[0] != '\\' || s[1] != 'u' {
		return 0, false
	}
	var v uint16
	for _, c := range s[2:6] {
		var d byte
		switch {
		case c >= '0' && c <= '9':
			d = c - '0'
		case c >= 'a' && c <= 'f':
			d = c - 'a' + 10
		case c >= 'A' && c <= 'F':
			d = c - 'A' + 10
		default:
			return 0, false
		}
		v = v<<4 | uint16(d)
	}
	return v, true
}
