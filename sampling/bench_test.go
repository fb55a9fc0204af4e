package sampling

import (
	"bytes"
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

// BenchmarkHashFloor is the floor of a draw: the key of every row of the
// benchmark log, hashed by the draw's own key hasher (one reused
// crypto/sha256 digest per goroutine), on every CPU, with nothing else
// (the ids are prepared before timing).
func BenchmarkHashFloor(b *testing.B) {
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
				for j := w; j < rows; j += workers {
					acc ^= k.key(ids[j])[0]
				}
				sink[w] = acc
			}(w)
		}
		wg.Wait()
	}
}
