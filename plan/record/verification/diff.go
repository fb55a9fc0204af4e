package verification

import (
	"bytes"
	"encoding/json"
	"fmt"
	"math"
	"strconv"

	"probity/plan/record"
)

// diffTolerance is the relative tolerance for numbers when a recomputed
// record is compared with a stored one (both are canonical to 15 digits).
const diffTolerance = 1e-9

// Diff compares a stored record with one recomputed from its inputs, field
// by field in record.json's own order, and returns the paths that differ,
// e.g. `candidates[1].errors: 3 in the record, 4 recomputed`. Numbers
// within a relative diffTolerance are the same.
func Diff(stored, again *record.Record) ([]string, error) {
	a, err := record.Encode(stored)
	if err != nil {
		return nil, err
	}
	b, err := record.Encode(again)
	if err != nil {
		return nil, err
	}
	if bytes.Equal(a, b) {
		return nil, nil
	}
	x, err := decodeOrdered(a)
	if err != nil {
		return nil, err
	}
	y, err := decodeOrdered(b)
	if err != nil {
		return nil, err
	}
	var out []string
	diffValue("", x, y, &out)
	return out, nil
}

// object is a JSON object with its keys in the order written, so
// differences are listed in record.json's own (struct) order.
type object struct {
	keys []string
	vals map[string]any
}

// decodeOrdered decodes JSON into objects, []any, json.Number, string,
// bool and nil.
func decodeOrdered(data []byte) (any, error) {
	dec := json.NewDecoder(bytes.NewReader(data))
	dec.UseNumber()
	return decodeValue(dec)
}

func decodeValue(dec *json.Decoder) (any, error) {
	tok, err := dec.Token()
	if err != nil {
		return nil, err
	}
	switch tok {
	case json.Delim('{'):
		o := &object{vals: map[string]any{}}
		for dec.More() {
			k, err := dec.Token()
			if err != nil {
				return nil, err
			}
			v, err := decodeValue(dec)
			if err != nil {
				return nil, err
			}
			key := fmt.Sprint(k)
			o.keys = append(o.keys, key)
			o.vals[key] = v
		}
		_, err := dec.Token()
		return o, err
	case json.Delim('['):
		var l []any
		for dec.More() {
			v, err := decodeValue(dec)
			if err != nil {
				return nil, err
			}
			l = append(l, v)
		}
		_, err := dec.Token()
		return l, err
	}
	return tok, nil
}

func diffValue(path string, a, b any, out *[]string) {
	switch av := a.(type) {
	case *object:
		bv, ok := b.(*object)
		if !ok {
			*out = append(*out, fmt.Sprintf("%s: %s in the record, %s recomputed", path, brief(a), brief(b)))
			return
		}
		keys := append([]string{}, av.keys...)
		for _, k := range bv.keys {
			if _, seen := av.vals[k]; !seen {
				keys = append(keys, k)
			}
		}
		for _, k := range keys {
			p := k
			if path != "" {
				p = path + "." + k
			}
			diffValue(p, av.vals[k], bv.vals[k], out)
		}
	case []any:
		bv, ok := b.([]any)
		if !ok || len(av) != len(bv) {
			*out = append(*out, fmt.Sprintf("%s: %s in the record, %s recomputed", path, brief(a), brief(b)))
			return
		}
		for i := range av {
			diffValue(fmt.Sprintf("%s[%d]", path, i), av[i], bv[i], out)
		}
	case json.Number:
		bv, ok := b.(json.Number)
		if ok && av == bv {
			return
		}
		if ok {
			x, e1 := strconv.ParseFloat(string(av), 64)
			y, e2 := strconv.ParseFloat(string(bv), 64)
			if e1 == nil && e2 == nil && math.Abs(x-y) <= diffTolerance*math.Max(math.Abs(x), math.Abs(y)) {
				return
			}
		}
		*out = append(*out, fmt.Sprintf("%s: %s in the record, %s recomputed", path, brief(a), brief(b)))
	default:
		if fmt.Sprint(a) != fmt.Sprint(b) {
			*out = append(*out, fmt.Sprintf("%s: %s in the record, %s recomputed", path, brief(a), brief(b)))
		}
	}
}

// brief prints a JSON value for a difference message, shortened.
func brief(v any) string {
	if o, ok := v.(*object); ok {
		return fmt.Sprintf("an object of %d fields", len(o.keys))
	}
	data, _ := json.Marshal(v)
	r := []rune(string(data))
	if len(r) > 60 {
		return string(r[:57]) + "…"
	}
	return string(r)
}
