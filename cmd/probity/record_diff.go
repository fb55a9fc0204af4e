package main

import (
	"bytes"
	"encoding/json"
	"fmt"
	"math"
	"sort"
	"strconv"

	"probity/plan/record"
)

// diffTolerance is the relative tolerance for numbers when a recomputed
// record is compared with a stored one (both are canonical to 15 digits).
const diffTolerance = 1e-9

// diffRecords compares two records field by field and returns the paths
// that differ, e.g. `candidates[1].errors: 3 in the record, 4 recomputed`.
func diffRecords(stored, again *record.Record) ([]string, error) {
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
	var x, y any
	if err := decodeNumbers(a, &x); err != nil {
		return nil, err
	}
	if err := decodeNumbers(b, &y); err != nil {
		return nil, err
	}
	var out []string
	diffValue("", x, y, &out)
	return out, nil
}

func decodeNumbers(data []byte, v *any) error {
	dec := json.NewDecoder(bytes.NewReader(data))
	dec.UseNumber()
	return dec.Decode(v)
}

func diffValue(path string, a, b any, out *[]string) {
	switch av := a.(type) {
	case map[string]any:
		bv, ok := b.(map[string]any)
		if !ok {
			*out = append(*out, fmt.Sprintf("%s: %s in the record, %s recomputed", path, brief(a), brief(b)))
			return
		}
		keys := map[string]bool{}
		for k := range av {
			keys[k] = true
		}
		for k := range bv {
			keys[k] = true
		}
		sorted := make([]string, 0, len(keys))
		for k := range keys {
			sorted = append(sorted, k)
		}
		sort.Strings(sorted)
		for _, k := range sorted {
			p := k
			if path != "" {
				p = path + "." + k
			}
			diffValue(p, av[k], bv[k], out)
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
	data, _ := json.Marshal(v)
	r := []rune(string(data))
	if len(r) > 60 {
		return string(r[:57]) + "…"
	}
	return string(r)
}
