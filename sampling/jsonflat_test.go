package sampling

import (
	"bytes"
	"encoding/json"
	"testing"
)

// generalParse runs the general (encoding/json) path alone.
func generalParse(names []string, rec []byte) ([][]byte, error) {
	j := jsonFields{names: names, vals: make([][]byte, len(names)), obj: map[string]json.RawMessage{}}
	err := j.parseGeneral(rec)
	return j.vals, err
}

// FuzzJSONFlatMatchesGeneral: whenever the fast path accepts a record, the
// general path (encoding/json) accepts it too and gives the same values.
func FuzzJSONFlatMatchesGeneral(f *testing.F) {
	for _, s := range []string{
		`{"record_id":"a","g":"x","score":0.1}`,
		` { "record_id" : "a" , "g" : null , "score" : -1.5e+3 } `,
		`{"record_id":"a","g":true,"score":false,"record_id":"b"}`,
		`{"record_id":"ä€","g":"x y","score":0}`,
		`{"record_id":"a","g":"x","score":01}`,
		`{"record_id":"a","g":"x","score":1.}`,
		`{"record_id":"a","g":"x",}`,
		`{"record_id":"a\u0041","g":"x","score":1}`,
		`{"record_id":"a","g":{"n":1},"score":1}`,
		`{"record_id":"a","g":"x"}`,
		"{\"record_id\":\"\xff\",\"g\":\"x\",\"score\":1}",
		`{"record_id":"a","g":"x","score":1}x`,
		`[1,2]`,
		`{}`,
	} {
		f.Add([]byte(s))
	}
	names := []string{"record_id", "g", "score"}
	f.Fuzz(func(t *testing.T, rec []byte) {
		fast := jsonFields{names: names, vals: make([][]byte, len(names))}
		if !fast.parseFlat(rec) {
			return
		}
		want, err := generalParse(names, rec)
		if err != nil {
			t.Fatalf("fast path accepted %q, encoding/json: %v", rec, err)
		}
		for i := range names {
			if !bytes.Equal(fast.vals[i], want[i]) || (fast.vals[i] == nil) != (want[i] == nil) {
				t.Fatalf("%q: key %q fast %q, encoding/json %q", rec, names[i], fast.vals[i], want[i])
			}
		}
	})
}

// TestJSONFlatTakesTheCommonShape checks that the fast path does accept
// the records probity-genlog writes and the usual value kinds, and leaves
// escapes, nesting and invalid JSON to the general path.
func TestJSONFlatTakesTheCommonShape(t *testing.T) {
	names := []string{"record_id", "g", "score"}
	for _, c := range []struct {
		rec  string
		fast bool
	}{
		{`{"record_id":"rec0000000001","g":"west","score":0.7153,"text":"note for case 70153"}`, true},
		{` { "record_id" : "a" , "g" : null , "score" : -1.5e+3 } `, true},
		{`{"record_id":"a","g":"x","score":true,"extra":false}`, true},
		{`{"record_id":"a\"b","g":"x","score":1}`, false},
		{`{"record_id":"a","g":"x","score":1,"n":[1]}`, false},
		{`{"record_id":"a","g":"x","score":01}`, false},
		{`{"record_id":"a","g":"x"}`, false},
	} {
		j := jsonFields{names: names, vals: make([][]byte, len(names))}
		if got := j.parseFlat([]byte(c.rec)); got != c.fast {
			t.Errorf("%s: fast path %v, want %v", c.rec, got, c.fast)
		}
	}
}
