package sampling

import (
	"bytes"
	"unicode/utf8"
)

// parseFlat is the fast path of jsonFields.parse for the common shape of
// a JSON Lines record: one object whose values are strings without escape
// sequences, numbers, true, false or null. It checks the record against
// the JSON grammar (RFC 8259) as it goes and fills vals exactly as the
// general path would (strings unquoted, numbers and literals as written,
// null as empty; of a repeated key the last value). It returns false —
// and the caller takes the general path, which also words any error —
// for anything else: an escape, a nested value, a string that is not
// valid UTF-8 (the general path keeps its bytes too, and words the refusal
// of an id), a needed key missing, or a record that is not valid JSON.
func (j *jsonFields) parseFlat(rec []byte) bool {
	if bytes.IndexByte(rec, '\\') >= 0 {
		return false
	}
	if j.slot == nil {
		j.slot = make(map[string]int, len(j.names))
		for i, n := range j.names {
			j.slot[n] = i
		}
		j.found = make([]bool, len(j.names))
	}
	clear(j.found)
	i := skipSpace(rec, 0)
	if i >= len(rec) || rec[i] != '{' {
		return false
	}
	i = skipSpace(rec, i+1)
	if i < len(rec) && rec[i] == '}' {
		i++
	} else {
		for {
			key, next, ok := flatString(rec, i)
			if !ok {
				return false
			}
			i = skipSpace(rec, next)
			if i >= len(rec) || rec[i] != ':' {
				return false
			}
			i = skipSpace(rec, i+1)
			val, isString, next, ok := flatValue(rec, i)
			if !ok {
				return false
			}
			if sl, need := j.slot[string(key)]; need {
				j.found[sl] = true
				switch {
				case isString:
					j.vals[sl] = val
				case string(val) == "null":
					j.vals[sl] = nil
				default:
					j.vals[sl] = val
				}
			}
			i = skipSpace(rec, next)
			if i >= len(rec) {
				return false
			}
			if rec[i] == '}' {
				i++
				break
			}
			if rec[i] != ',' {
				return false
			}
			i = skipSpace(rec, i+1)
		}
	}
	if skipSpace(rec, i) != len(rec) {
		return false
	}
	for _, f := range j.found {
		if !f {
			return false
		}
	}
	return true
}

// skipSpace returns the index of the first byte at or after i that is not
// JSON whitespace (space, tab, line feed, carriage return).
func skipSpace(b []byte, i int) int {
	for i < len(b) {
		switch b[i] {
		case ' ', '\t', '\n', '\r':
			i++
		default:
			return i
		}
	}
	return i
}

// flatString reads a string without escapes starting at b[i] == '"' and
// returns its content and the index after the closing quote; ok is false
// for anything else, a control character or invalid UTF-8 inside.
func flatString(b []byte, i int) (s []byte, next int, ok bool) {
	if i >= len(b) || b[i] != '"' {
		return nil, 0, false
	}
	end := bytes.IndexByte(b[i+1:], '"')
	if end < 0 {
		return nil, 0, false
	}
	s = b[i+1 : i+1+end]
	ascii := true
	for _, c := range s {
		if c < 0x20 {
			return nil, 0, false
		}
		if c >= 0x80 {
			ascii = false
		}
	}
	if !ascii && !utf8.Valid(s) {
		return nil, 0, false
	}
	return s, i + 2 + end, true
}

// flatValue reads a string, number, true, false or null at b[i].
func flatValue(b []byte, i int) (v []byte, isString bool, next int, ok bool) {
	if i >= len(b) {
		return nil, false, 0, false
	}
	switch c := b[i]; {
	case c == '"':
		s, n, ok := flatString(b, i)
		return s, true, n, ok
	case c == '-' || c >= '0' && c <= '9':
		n, ok := numberEnd(b, i)
		if !ok {
			return nil, false, 0, false
		}
		return b[i:n], false, n, true
	default:
		for _, lit := range [...]string{"true", "false", "null"} {
			if bytes.HasPrefix(b[i:], []byte(lit)) {
				return b[i : i+len(lit)], false, i + len(lit), true
			}
		}
		return nil, false, 0, false
	}
}

// numberEnd checks the JSON number grammar from b[i] —
// -?(0|[1-9][0-9]*)(\.[0-9]+)?([eE][+-]?[0-9]+)? — and returns its end.
func numberEnd(b []byte, i int) (int, bool) {
	digits := func(i int) int {
		for i < len(b) && b[i] >= '0' && b[i] <= '9' {
			i++
		}
		return i
	}
	if i < len(b) && b[i] == '-' {
		i++
	}
	switch {
	case i < len(b) && b[i] == '0':
		i++
	case i < len(b) && b[i] >= '1' && b[i] <= '9':
		i = digits(i)
	default:
		return 0, false
	}
	if i < len(b) && b[i] == '.' {
		j := digits(i + 1)
		if j == i+1 {
			return 0, false
		}
		i = j
	}
	if i < len(b) && (b[i] == 'e' || b[i] == 'E') {
		i++
		if i < len(b) && (b[i] == '+' || b[i] == '-') {
			i++
		}
		j := digits(i)
		if j == i {
			return 0, false
		}
		i = j
	}
	return i, true
}
