package signature

import (
	"bytes"
	"testing"
)

// FuzzParse: Parse never panics, and whatever it accepts marshals back to
// the same bytes (the format has one spelling).
func FuzzParse(f *testing.F) {
	_, priv, _ := GenerateKey(bytes.NewReader(bytes.Repeat([]byte{3}, 64)))
	good := Sign(priv, map[string][]byte{"record.json": []byte("{}\n"), "record.pdf": []byte("%PDF")}).Marshal()
	f.Add(good)
	f.Add([]byte(Header + "\n"))
	f.Add([]byte(""))
	f.Add(bytes.Replace(good, []byte("file: record.pdf"), []byte("file: record.pdf x"), 1))
	f.Fuzz(func(t *testing.T, data []byte) {
		s, err := Parse(data, FileName)
		if err != nil {
			return
		}
		again := s.Marshal()
		back, err := Parse(again, FileName)
		if err != nil || !bytes.Equal(back.Marshal(), again) {
			t.Fatalf("accepted input does not round-trip: %v", err)
		}
	})
}
