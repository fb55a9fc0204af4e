package delimscan

import (
	"bytes"
	"math/rand/v2"
	"testing"
)

// reference builds the masks byte by byte.
func reference(data []byte, sep byte) ([]uint64, []uint64, []uint64) {
	words := (len(data) + 63) / 64
	s, l, q := make([]uint64, words), make([]uint64, words), make([]uint64, words)
	for i, c := range data {
		if c == sep {
			s[i/64] |= 1 << uint(i%64)
		}
		if c == '\n' {
			l[i/64] |= 1 << uint(i%64)
		}
		if c == '"' {
			q[i/64] |= 1 << uint(i%64)
		}
	}
	return s, l, q
}

func randomText(r *rand.Rand, n int) []byte {
	alphabet := []byte("ab,\t\n\r\"\x00\x80\xff;|")
	b := make([]byte, n)
	for i := range b {
		if r.IntN(4) == 0 {
			b[i] = byte(r.Uint32())
		} else {
			b[i] = alphabet[r.IntN(len(alphabet))]
		}
	}
	return b
}

// TestMasksMatchReference checks the vector path, the portable path and
// the tail against a byte-by-byte reference for lengths 0 to 700 and
// three separators, appending to non-empty slices.
func TestMasksMatchReference(t *testing.T) {
	t.Logf("accelerated: %v", Accelerated())
	r := rand.New(rand.NewPCG(5, 6))
	for n := 0; n <= 700; n++ {
		data := randomText(r, n)
		for _, sep := range []byte{',', '\t', 0x80} {
			ws, wl, wq := reference(data, sep)
			prefix := []uint64{7, 9}
			s, l, q, seen := Masks(data, sep, '"', append([]uint64(nil), prefix...), append([]uint64(nil), prefix...), append([]uint64(nil), prefix...))
			if want := bytes.IndexByte(data, '"') >= 0; seen != want {
				t.Fatalf("n=%d: seen %v, want %v", n, seen, want)
			}
			if len(s) != len(ws)+2 || len(l) != len(wl)+2 || len(q) != len(wq)+2 {
				t.Fatalf("n=%d: %d, %d and %d words, want %d", n, len(s), len(l), len(q), len(ws)+2)
			}
			for i := range ws {
				if s[i+2] != ws[i] || l[i+2] != wl[i] || q[i+2] != wq[i] {
					t.Fatalf("n=%d sep %q word %d: %x %x %x, want %x %x %x", n, sep, i, s[i+2], l[i+2], q[i+2], ws[i], wl[i], wq[i])
				}
			}
			if whole := n / 64; whole > 0 {
				ps, pl, pq := make([]uint64, whole), make([]uint64, whole), make([]uint64, whole)
				pseen := masksPortable(data, sep, '"', ps, pl, pq)
				if want := bytes.IndexByte(data[:64*whole], '"') >= 0; pseen != want {
					t.Fatalf("portable n=%d: seen %v, want %v", n, pseen, want)
				}
				for i := range ps {
					if ps[i] != ws[i] || pl[i] != wl[i] || pq[i] != wq[i] {
						t.Fatalf("portable n=%d word %d differs", n, i)
					}
				}
			}
		}
	}
}

// TestNextAndCount checks Next and Count against a scan of the bits.
func TestNextAndCount(t *testing.T) {
	r := rand.New(rand.NewPCG(7, 8))
	for trial := 0; trial < 300; trial++ {
		n := r.IntN(400) + 1
		data := randomText(r, n)
		s, _, _, _ := Masks(data, ',', '"', nil, nil, nil)
		for q := 0; q < 50; q++ {
			from, to := r.IntN(n+1), r.IntN(n+1)
			want := to
			for i := from; i < to; i++ {
				if data[i] == ',' {
					want = i
					break
				}
			}
			if from >= to {
				want = to
			}
			if got := Next(s, from, to); got != want {
				t.Fatalf("Next(%d, %d) = %d, want %d", from, to, got, want)
			}
			c := 0
			for i := from; i < to; i++ {
				if data[i] == ',' {
					c++
				}
			}
			if got := Count(s, from, to); got != c {
				t.Fatalf("Count(%d, %d) = %d, want %d", from, to, got, c)
			}
		}
	}
}

// BenchmarkMasks builds the masks of 128 KiB.
func BenchmarkMasks(b *testing.B) {
	data := randomText(rand.New(rand.NewPCG(1, 1)), 128<<10)
	var s, l, q []uint64
	b.SetBytes(int64(len(data)))
	for i := 0; i < b.N; i++ {
		s, l, q, _ = Masks(data, ',', '"', s[:0], l[:0], q[:0])
	}
}

// BenchmarkMasksPortable is the same without vector instructions.
func BenchmarkMasksPortable(b *testing.B) {
	data := randomText(rand.New(rand.NewPCG(1, 1)), 128<<10)
	s, l, q := make([]uint64, len(data)/64), make([]uint64, len(data)/64), make([]uint64, len(data)/64)
	b.SetBytes(int64(len(data)))
	for i := 0; i < b.N; i++ {
		masksPortable(data, ',', '"', s, l, q)
	}
}

// TestMasksSeeOneWatchByte puts a single '"' at every position of texts
// that hold none otherwise.
func TestMasksSeeOneWatchByte(t *testing.T) {
	r := rand.New(rand.NewPCG(9, 10))
	for _, n := range []int{1, 63, 64, 65, 200, 511} {
		data := bytes.ReplaceAll(randomText(r, n), []byte{'"'}, []byte{'x'})
		if _, _, _, seen := Masks(data, ',', '"', nil, nil, nil); seen {
			t.Fatalf("n=%d: seen without a quote", n)
		}
		for p := 0; p < n; p++ {
			old := data[p]
			data[p] = '"'
			if _, _, _, seen := Masks(data, ',', '"', nil, nil, nil); !seen {
				t.Fatalf("n=%d: the quote at %d was not seen", n, p)
			}
			data[p] = old
		}
	}
}

// TestOutsideQuotes compares OutsideQuotes with a walk that toggles the
// quote state at every quote character.
func TestOutsideQuotes(t *testing.T) {
	r := rand.New(rand.NewPCG(13, 14))
	alphabet := []byte("a,\"\n")
	for trial := 0; trial < 3000; trial++ {
		data := make([]byte, r.IntN(400))
		for i := range data {
			data[i] = alphabet[r.IntN(len(alphabet))]
		}
		s, l, q, _ := Masks(data, ',', '"', nil, nil, nil)
		OutsideQuotes(q, s, l)
		in := false
		for i, c := range data {
			if c == '"' {
				in = !in
			}
			bit := uint64(1) << uint(i%64)
			wantSep := c == ',' && !in
			wantNL := c == '\n' && !in
			if (s[i/64]&bit != 0) != wantSep || (l[i/64]&bit != 0) != wantNL {
				t.Fatalf("%q: byte %d (%q) misjudged", data, i, c)
			}
		}
	}
}
