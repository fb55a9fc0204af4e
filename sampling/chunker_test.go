package sampling

import (
	"math/rand/v2"
	"testing"
)

// TestRecordEndMatchesQuoteWalk compares recordEnd on CSV with quotes
// with a walk that toggles the quote state at every '"' and remembers the
// last newline outside quotes.
func TestRecordEndMatchesQuoteWalk(t *testing.T) {
	walk := func(buf []byte) int {
		in, last := false, 0
		for i, c := range buf {
			switch c {
			case '"':
				in = !in
			case '\n':
				if !in {
					last = i + 1
				}
			}
		}
		return last
	}
	s := &scanner{format: FormatCSV}
	r := rand.New(rand.NewPCG(11, 12))
	alphabet := []byte("ab,\"\n")
	for trial := 0; trial < 20000; trial++ {
		buf := make([]byte, r.IntN(200))
		for i := range buf {
			buf[i] = alphabet[r.IntN(len(alphabet))]
		}
		buf = append(buf, '"') // at least one quote: the quote-aware branch
		if got, want := s.recordEnd(buf, false), walk(buf); got != want {
			t.Fatalf("%q: recordEnd %d, want %d", buf, got, want)
		}
	}
}
