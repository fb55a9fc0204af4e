package sampling

import (
	"bytes"
	"fmt"
	"math/rand/v2"
	"strings"
	"testing"

	"probity/sampling/drawfolder"

	"probity/sampling/loggen"
)

// repeatRows returns the log with the rows whose line satisfies pick
// written again copies more times, the copies spread at random positions
// after their original (a seeded shuffle); edit, if set, changes a copy
// (e.g. its stratum). It also returns the number of copies written.
func repeatRows(t *testing.T, log []byte, copies int, pick func(fields []string) bool, edit func(fields []string, copy int) []string, seed uint64) ([]byte, int) {
	t.Helper()
	lines := strings.Split(strings.TrimSuffix(string(log), "\n"), "\n")
	header, rows := lines[0], lines[1:]
	// after[p] are the copies written after rows[p-1] (p ≥ 1).
	after := make([][]string, len(rows)+1)
	added := 0
	r := rand.New(rand.NewPCG(seed, 1))
	for i, row := range rows {
		f := strings.Split(row, ",")
		if !pick(f) {
			continue
		}
		for c := 0; c < copies; c++ {
			g := append([]string{}, f...)
			if edit != nil {
				g = edit(g, c)
			}
			p := i + 1 + r.IntN(len(rows)-i)
			after[p] = append(after[p], strings.Join(g, ","))
			added++
		}
	}
	var out []string
	for i, row := range rows {
		out = append(append(out, after[i]...), row)
	}
	out = append(out, after[len(rows)]...)
	return []byte(header + "\n" + strings.Join(out, "\n") + "\n"), added
}

// TestDedupeCountsDistinctIDs: under --dedupe first every stratum's N_h
// counts distinct ids, so a log with one region's rows written three
// times draws exactly what the log without the repeats draws (same
// strata, sizes, weights, ledger and worksheet), and the manifest counts
// every dropped row. Before, N_h counted the repeats: the tripled region
// got about three times its share of the sample and the record took the
// biased sample as self-weighting.
func TestDedupeCountsDistinctIDs(t *testing.T) {
	clean := genLog(t, loggen.Config{Rows: 6000, Seed: 16})
	north := func(f []string) bool { return f[1] == "north" }
	tripled, added := repeatRows(t, clean, 2, north, nil, 7)
	strata := []string{"region"}
	draw := func(log []byte, dedupe bool, chunk int) *drawfolder.Content {
		t.Helper()
		f, err := Draw(DrawInput{Plan: testPlan("dedupe", 300), LogPath: "log.csv", Log: bytes.NewReader(log),
			StrataColumns: strata, Show: []string{"text"}, Alloc: AllocOptions{Spare: 2}, Dedupe: dedupe, ChunkSize: chunk, Workers: 2})
		if err != nil {
			t.Fatal(err)
		}
		return f
	}
	want := draw(clean, false, 0)
	wantFiles := renderMap(t, want)
	for _, chunk := range []int{0, 4096, 777} {
		got := draw(tripled, true, chunk)
		if fmt.Sprint(got.Manifest.Strata) != fmt.Sprint(want.Manifest.Strata) {
			t.Fatalf("chunk %d: strata\n %+v\nwant (the log without repeats)\n %+v", chunk, got.Manifest.Strata, want.Manifest.Strata)
		}
		if got.Manifest.DuplicatesDropped != added || got.Manifest.LotSize != want.Manifest.LotSize {
			t.Fatalf("chunk %d: %d repeats dropped, lot %d; want %d and %d", chunk, got.Manifest.DuplicatesDropped, got.Manifest.LotSize, added, want.Manifest.LotSize)
		}
		files := renderMap(t, got)
		for _, name := range []string{drawfolder.LedgerFile, drawfolder.WorksheetFile} {
			if !bytes.Equal(files[name], wantFiles[name]) {
				t.Fatalf("chunk %d: %s differs from the draw of the log without repeats", chunk, name)
			}
		}
	}
}

// TestDedupeAcrossStrata: an id whose later rows lie in other strata
// belongs to the stratum of its first row, counted once there, and is
// never drawn from another stratum.
func TestDedupeAcrossStrata(t *testing.T) {
	clean := genLog(t, loggen.Config{Rows: 4000, Seed: 17})
	other := map[string]string{"north": "south", "south": "east", "east": "west", "west": "north"}
	// Every third row is repeated twice, once in another region.
	n := 0
	pick := func(f []string) bool { n++; return n%3 == 0 }
	moved, _ := repeatRows(t, clean, 2, pick, func(f []string, c int) []string {
		if c == 1 {
			f[1] = other[f[1]]
		}
		return f
	}, 8)
	want, err := Draw(DrawInput{Plan: testPlan("across", 200), LogPath: "log.csv", Log: bytes.NewReader(clean), StrataColumns: []string{"region"}})
	if err != nil {
		t.Fatal(err)
	}
	got, err := Draw(DrawInput{Plan: testPlan("across", 200), LogPath: "log.csv", Log: bytes.NewReader(moved), StrataColumns: []string{"region"}, Dedupe: true, ChunkSize: 1000, Workers: 2})
	if err != nil {
		t.Fatal(err)
	}
	if fmt.Sprint(got.Manifest.Strata) != fmt.Sprint(want.Manifest.Strata) {
		t.Fatalf("strata\n %+v\nwant\n %+v", got.Manifest.Strata, want.Manifest.Strata)
	}
	if !bytes.Equal(renderMap(t, got)[drawfolder.LedgerFile], renderMap(t, want)[drawfolder.LedgerFile]) {
		t.Fatal("the ledger differs from the draw of the log without repeats")
	}
}

// TestDedupeRefusesTooManyIDs: counting distinct ids has a memory bound,
// and a log beyond it is refused with one line, never counted wrong.
func TestDedupeRefusesTooManyIDs(t *testing.T) {
	log := genLog(t, loggen.Config{Rows: 500, Seed: 18})
	_, err := Scan(bytes.NewReader(log), ScanSpec{Name: "log.csv", Seed: "s", Capacity: 10, Dedupe: true, MaxDistinct: 100, Workers: 2, ChunkSize: 512})
	want := "log.csv: more than 100 distinct record ids are in scope"
	if err == nil || !strings.HasPrefix(err.Error(), want) {
		t.Fatalf("error %v, want %s…", err, want)
	}
}
