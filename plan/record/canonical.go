package record

import (
	"bytes"
	"encoding/json"
	"errors"
	"fmt"
	"strconv"
)

// FloatDigits is the number of significant digits of every non-integer
// number in canonical record.json: strconv.FormatFloat(x, 'g', 15, 64), so a
// value recomputed on another machine that differs only in the last bits of
// a float64 encodes to the same text.
const FloatDigits = 15

// Encode returns the canonical bytes of record.json: keys in struct field
// order, two-space indentation, no HTML escaping, empty lists as [] (never
// null), every number that is not an integer literal written with
// FloatDigits significant digits ('g' format), and a trailing newline.
// Encode of Decode of canonical bytes returns the same bytes.
func Encode(r *Record) ([]byte, error) {
	c := *r
	c.Normalize()
	var buf bytes.Buffer
	enc := json.NewEncoder(&buf)
	enc.SetEscapeHTML(false)
	enc.SetIndent("", "  ")
	if err := enc.Encode(&c); err != nil {
		return nil, fmt.Errorf("encoding record: %w", err)
	}
	return canonicalNumbers(buf.Bytes())
}

// Decode parses record.json. Unknown keys are refused.
func Decode(data []byte) (*Record, error) {
	dec := json.NewDecoder(bytes.NewReader(data))
	dec.DisallowUnknownFields()
	var r Record
	if err := dec.Decode(&r); err != nil {
		return nil, err
	}
	if dec.More() {
		return nil, errors.New("trailing data after the record object")
	}
	r.fixReleased()
	return &r, nil
}

// IsCanonical reports whether data is exactly the canonical encoding of the
// record it holds (so it was not edited by hand after it was written).
func IsCanonical(data []byte) bool {
	r, err := Decode(data)
	if err != nil {
		return false
	}
	again, err := Encode(r)
	return err == nil && bytes.Equal(again, data)
}

// Normalize replaces nil lists by empty ones, so the encoding never holds
// null for a list. It copies the candidates it changes, so a record shared
// with the caller is not modified through them.
func (r *Record) Normalize() {
	if r.Candidates == nil {
		r.Candidates = []Candidate{}
	}
	if r.Strata == nil {
		r.Strata = []StratumCount{}
	}
	if r.OC == nil {
		r.OC = []OCPoint{}
	}
	if r.Signoff == nil {
		r.Signoff = []Signoff{}
	}
	d := &r.Deviations
	for _, l := range []*[]string{&d.SparesUsed, &d.Unlabeled, &d.Unsure, &d.Notes} {
		if *l == nil {
			*l = []string{}
		}
	}
	if t := r.LabelTrail; t != nil && t.Labelers == nil {
		cp := *t
		cp.Labelers = []string{}
		r.LabelTrail = &cp
	}
	if r.Method.Assumptions == nil {
		r.Method.Assumptions = []string{}
	}
	if ar := r.Method.Rule; ar != nil {
		c := *ar
		if c.Sources == nil {
			c.Sources = []string{}
		}
		if c.Strata == nil {
			c.Strata = []CountedStratum{}
		}
		r.Method.Rule = &c
	}
	if r.Wording.Replaced == nil {
		r.Wording.Replaced = []string{}
	}
	if r.Caveats == nil {
		r.Caveats = []Caveat{}
	}
	cands := make([]Candidate, len(r.Candidates))
	copy(cands, r.Candidates)
	for i := range cands {
		c := &cands[i]
		strata := make([]StratumErr, len(c.Strata))
		copy(strata, c.Strata)
		c.Strata = strata
		if c.Confusion.Classes == nil {
			c.Confusion.Classes = []string{}
		}
		if c.Confusion.Counts == nil {
			c.Confusion.Counts = [][]int{}
		}
		for j := range c.Confusion.Counts {
			if c.Confusion.Counts[j] == nil {
				c.Confusion.Counts[j] = []int{}
			}
		}
	}
	r.Candidates = cands
}

// FormatFloat is the canonical text of a float in record.json.
func FormatFloat(x float64) string {
	return strconv.FormatFloat(x, 'g', FloatDigits, 64)
}

// canonicalNumbers rewrites every JSON number outside strings that is not
// an integer literal with FormatFloat.
func canonicalNumbers(in []byte) ([]byte, error) {
	out := make([]byte, 0, len(in))
	inString, escaped := false, false
	for i := 0; i < len(in); {
		b := in[i]
		if inString {
			out = append(out, b)
			switch {
			case escaped:
				escaped = false
			case b == '\\':
				escaped = true
			case b == '"':
				inString = false
			}
			i++
			continue
		}
		if b == '"' {
			inString = true
			out = append(out, b)
			i++
			continue
		}
		if b == '-' || (b >= '0' && b <= '9') {
			j := i
			for j < len(in) && bytes.IndexByte([]byte("+-.0123456789eE"), in[j]) >= 0 {
				j++
			}
			lit := in[i:j]
			if bytes.ContainsAny(lit, ".eE") {
				x, err := strconv.ParseFloat(string(lit), 64)
				if err != nil {
					return nil, fmt.Errorf("encoding record: number %q: %w", lit, err)
				}
				out = append(out, FormatFloat(x)...)
			} else {
				out = append(out, lit...)
			}
			i = j
			continue
		}
		out = append(out, b)
		i++
	}
	return out, nil
}
