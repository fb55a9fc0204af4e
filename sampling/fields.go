package sampling

import (
	"bytes"
	"encoding/json"
	"errors"
	"fmt"
)

// errBareQuote and errQuote are the CSV quoting errors of one record.
var (
	errBareQuote = errors.New(`a " appears inside a field that is not quoted`)
	errQuote     = errors.New(`a quoted field is not followed by a separator or the end of the line`)
	errOpenQuote = errors.New(`a quoted field is never closed`)
)

// fieldSplitter extracts the needed fields of one delimited record.
// need[c] is the slot of column c, or −1 when the draw does not read it.
// vals[slot] is valid until the next call.
type fieldSplitter struct {
	sep     byte
	quoted  bool // CSV: RFC 4180 quotes; TSV: none
	need    []int
	vals    [][]byte
	scratch []byte
	// last is the index of the last needed column (−1 when none): past
	// it, separators are only counted.
	last int
	// noQuotes is set by the caller when the current chunk holds no
	// quote character, so the per-record check can be skipped.
	noQuotes bool
}

// setNeed sets the needed columns and derives last.
func (s *fieldSplitter) setNeed(need []int) {
	s.need = need
	s.last = -1
	for i, v := range need {
		if v >= 0 {
			s.last = i
		}
	}
}

// split parses rec (one record, line end removed) and returns its number
// of fields. Fields beyond len(need) are counted, not read.
func (s *fieldSplitter) split(rec []byte) (int, error) {
	if !s.quoted || s.noQuotes || bytes.IndexByte(rec, '"') < 0 {
		nf := 0
		start := 0
		for {
			i := bytes.IndexByte(rec[start:], s.sep)
			end := len(rec)
			if i >= 0 {
				end = start + i
			}
			if nf < len(s.need) {
				if slot := s.need[nf]; slot >= 0 {
					s.vals[slot] = rec[start:end]
				}
			}
			nf++
			if i < 0 {
				return nf, nil
			}
			start = end + 1
			if nf > s.last {
				// No more needed fields: count the rest in one pass.
				return nf + bytes.Count(rec[start:], []byte{s.sep}) + 1, nil
			}
		}
	}
	return s.splitQuoted(rec)
}

// splitQuoted is split for a CSV record holding quotes.
func (s *fieldSplitter) splitQuoted(rec []byte) (int, error) {
	if cap(s.scratch) < len(rec) {
		s.scratch = make([]byte, 0, 2*len(rec))
	}
	buf := s.scratch[:0]
	nf := 0
	i := 0
	for {
		begin := len(buf)
		if i < len(rec) && rec[i] == '"' {
			i++
			for {
				j := bytes.IndexByte(rec[i:], '"')
				if j < 0 {
					return nf, errOpenQuote
				}
				buf = append(buf, rec[i:i+j]...)
				i += j + 1
				if i < len(rec) && rec[i] == '"' {
					buf = append(buf, '"')
					i++
					continue
				}
				break
			}
			if i < len(rec) && rec[i] != s.sep {
				return nf, errQuote
			}
		} else {
			j := bytes.IndexByte(rec[i:], s.sep)
			end := len(rec)
			if j >= 0 {
				end = i + j
			}
			if bytes.IndexByte(rec[i:end], '"') >= 0 {
				return nf, errBareQuote
			}
			buf = append(buf, rec[i:end]...)
			i = end
		}
		if nf < len(s.need) {
			if slot := s.need[nf]; slot >= 0 {
				s.vals[slot] = buf[begin:len(buf):len(buf)]
			}
		}
		nf++
		if i >= len(rec) {
			s.scratch = buf
			return nf, nil
		}
		i++ // the separator
		if i == len(rec) {
			// A trailing separator ends with an empty field.
			if nf < len(s.need) {
				if slot := s.need[nf]; slot >= 0 {
					s.vals[slot] = nil
				}
			}
			s.scratch = buf
			return nf + 1, nil
		}
	}
}

// splitAll returns every field of a delimited record as strings (for the
// header line).
func splitAll(rec []byte, sep byte, quoted bool) ([]string, error) {
	n := bytes.Count(rec, []byte{sep}) + 1
	need := make([]int, n)
	for i := range need {
		need[i] = i
	}
	s := fieldSplitter{sep: sep, quoted: quoted, vals: make([][]byte, n)}
	s.setNeed(need)
	nf, err := s.split(rec)
	if err != nil {
		return nil, err
	}
	out := make([]string, nf)
	for i := range out {
		out[i] = string(s.vals[i])
	}
	return out, nil
}

// quotesOpen reports whether rec ends inside a quoted field (an odd number
// of quote characters: RFC 4180 quotes always come in pairs otherwise).
func quotesOpen(rec []byte) bool { return bytes.Count(rec, []byte{'"'})%2 == 1 }

// jsonFields extracts the needed keys of one JSON Lines record.
type jsonFields struct {
	names []string // key of each slot
	vals  [][]byte
	obj   map[string]json.RawMessage
	// slot and found serve the fast path (jsonflat.go).
	slot  map[string]int
	found []bool
}

// jsonValueError is a problem with one key of a JSON record.
type jsonValueError struct {
	key string
	msg string
}

func (e *jsonValueError) Error() string { return e.msg }

// parse decodes rec (one JSON object) and fills vals: strings unquoted
// to exactly the bytes they stand for (see unquoteJSON), numbers and
// booleans as written, null as empty.
func (j *jsonFields) parse(rec []byte) error {
	if j.parseFlat(rec) {
		return nil
	}
	return j.parseGeneral(rec)
}

// parseGeneral is parse through encoding/json, for every record the fast
// path leaves (and for the wording of every error).
func (j *jsonFields) parseGeneral(rec []byte) error {
	if j.obj == nil {
		j.obj = map[string]json.RawMessage{}
	}
	clear(j.obj)
	if err := json.Unmarshal(rec, &j.obj); err != nil {
		var te *json.UnmarshalTypeError
		if errors.As(err, &te) {
			return errors.New("the line is not a JSON object")
		}
		return fmt.Errorf("not valid JSON: %v", err)
	}
	for slot, name := range j.names {
		raw, ok := j.obj[name]
		if !ok {
			return &jsonValueError{name, fmt.Sprintf("key %q is missing", name)}
		}
		raw = bytes.TrimSpace(raw)
		switch {
		case len(raw) == 0 || string(raw) == "null":
			j.vals[slot] = nil
		case raw[0] == '"':
			s, err := unquoteJSON(nil, raw)
			if err != nil {
				return &jsonValueError{name, fmt.Sprintf("key %q: %v", name, err)}
			}
			if s == nil {
				s = raw[1:1] // "" is an empty value, not null (nil), as on the fast path
			}
			j.vals[slot] = s
		case raw[0] == '{' || raw[0] == '[':
			return &jsonValueError{name, fmt.Sprintf("key %q holds an object or a list, not a value", name)}
		default:
			j.vals[slot] = raw
		}
	}
	return nil
}

// jsonKeys returns the top-level keys of a JSON object in file order.
func jsonKeys(rec []byte) ([]string, error) {
	dec := json.NewDecoder(bytes.NewReader(rec))
	tok, err := dec.Token()
	if err != nil {
		return nil, fmt.Errorf("not valid JSON: %v", err)
	}
	if d, ok := tok.(json.Delim); !ok || d != '{' {
		return nil, errors.New("the line is not a JSON object")
	}
	var keys []string
	for dec.More() {
		tok, err := dec.Token()
		if err != nil {
			return nil, fmt.Errorf("not valid JSON: %v", err)
		}
		k, _ := tok.(string)
		keys = append(keys, k)
		var skip json.RawMessage
		if err := dec.Decode(&skip); err != nil {
			return nil, fmt.Errorf("not valid JSON: %v", err)
		}
	}
	return keys, nil
}
