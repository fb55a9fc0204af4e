package sampling

import (
	"bytes"
	"crypto/sha256"
	"fmt"
	"os"
	"runtime"
	"sync"
	"testing"

	"probity/sampling/loggen"
)

// benchLog returns the log at $PROBITY_BENCH_LOG (e.g. a 10-million-row
// file from probity-genlog), or generates 1 million rows in memory.
func benchLog(b *testing.B) []byte {
	b.Helper()
	if p := os.Getenv("PROBITY_BENCH_LOG"); p != "" {
		data, err := os.ReadFile(p)
		if err != nil {
			b.Fatal(err)
		}
		return data
	}
	return genLog(b, loggen.Config{Rows: 1_000_000, Seed: 1})
}

// BenchmarkDraw draws 2000 items over 12 strata (region × channel) from
// the benchmark log in one pass. Report rows/s with -benchmem.
func BenchmarkDraw(b *testing.B) {
	log := benchLog(b)
	p := testPlan("bench-seed", 2000)
	b.SetBytes(int64(len(log)))
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		_, err := Draw(DrawInput{Plan: p, LogPath: "bench.csv", Log: bytes.NewReader(log), StrataColumns: []string{"region", "channel"}})
		if err != nil {
			b.Fatal(err)
		}
	}
}

// BenchmarkHashFloorPairs is the same floor for the draw's own key hasher:
// the prefix midstate and two rows per call on the SHA extensions where
// the processor has them (crypto/sha256 elsewhere).
func BenchmarkHashFloorPairs(b *testing.B) {
	log := benchLog(b)
	rows := bytes.Count(log, []byte{'\n'}) - 1
	ids := make([][]byte, rows)
	for i := range ids {
		ids[i] = []byte(fmt.Sprintf("rec%010d", i+1))
	}
	workers := runtime.GOMAXPROCS(0)
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		var wg sync.WaitGroup
		var sink [64]uint64
		for w := 0; w < workers; w++ {
			wg.Add(1)
			go func(w int) {
				defer wg.Done()
				k := newKeyHasher("bench-seed")
				var acc uint64
				for j := 2 * w; j+1 < rows; j += 2 * workers {
					ka, kb := k.key2(ids[j], ids[j+1])
					acc ^= ka[0] ^ kb[0]
				}
				sink[w] = acc
			}(w)
		}
		wg.Wait()
	}
}

// BenchmarkHashFloor is the floor of a draw: one SHA-256 of
// "<seed>:<id>" per row of the benchmark log, hashed the way the draw does
// (one reused digest per goroutine), on every CPU, with nothing else (the
// ids are prepared before timing).
func BenchmarkHashFloor(b *testing.B) {
	log := benchLog(b)
	rows := bytes.Count(log, []byte{'\n'}) - 1
	ids := make([][]byte, rows)
	for i := range ids {
		ids[i] = []byte(fmt.Sprintf("bench-seed:rec%010d", i+1))
	}
	workers := runtime.GOMAXPROCS(0)
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		var wg sync.WaitGroup
		var sink [64]byte
		for w := 0; w < workers; w++ {
			wg.Add(1)
			go func(w int) {
				defer wg.Done()
				var acc byte
				h := sha256.New()
				var sum []byte
				for j := w; j < rows; j += workers {
					h.Reset()
					h.Write(ids[j])
					sum = h.Sum(sum[:0])
					acc ^= sum[0]
				}
				sink[w] = acc
			}(w)
		}
		wg.Wait()
	}
}
