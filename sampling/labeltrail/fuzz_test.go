package labeltrail

import (
	"bytes"
	"errors"
	"os"
	"testing"

	"probity/plan/inputerr"
)

// FuzzParse: Parse never panics; what it accepts is whole lines of
// canonical entries (each re-encodes to its own bytes) chained by their
// hashes, and what it refuses is an *inputerr.Error naming a line.
func FuzzParse(f *testing.F) {
	path := newTrail(f, testDraw())
	data, err := os.ReadFile(path)
	if err != nil {
		f.Fatal(err)
	}
	f.Add(data)
	f.Add(data[:len(data)-7])
	f.Add(bytes.Replace(data, []byte(`"label":"sound"`), []byte(`"label":"defect"`), 1))
	f.Add([]byte("{\"seq\":1}\n"))
	f.Add([]byte{})
	f.Fuzz(func(t *testing.T, data []byte) {
		tr, err := Parse(data, "trail")
		if err != nil {
			if _, ok := inputerr.As(err); !ok {
				t.Fatalf("a refusal that is not an input error: %v", err)
			}
			if errors.Is(err, ErrCutShort) && tr != nil && tr.Whole >= int64(len(data)) {
				t.Fatalf("a cut-short trail whose whole lines are all of it")
			}
			return
		}
		var again []byte
		prev := ""
		for i := range tr.Entries {
			e := tr.Entries[i]
			if e.Prev != prev {
				t.Fatalf("line %d: prev %q, want %q", i+1, e.Prev, prev)
			}
			line, err := encode(&e)
			if err != nil {
				t.Fatal(err)
			}
			again = append(append(again, line...), '\n')
			prev = lineHash(line)
		}
		if !bytes.Equal(again, data) {
			t.Fatalf("accepted bytes are not the entries' canonical lines")
		}
	})
}
