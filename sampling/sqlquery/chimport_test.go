package sqlquery

import (
	"bytes"
	"encoding/csv"
	"os"
	"path/filepath"
	"sort"
	"strconv"
	"strings"
	"testing"

	"probity/plan"
	"probity/plan/inputerr"
	"probity/sampling"
	"probity/sampling/drawfolder"
)

// synthCH writes, without a server, the two results a ClickHouse draw of
// rows (id, region, model_a, score) stratified by region gives: the counts
// result, and a function that writes the selection result for the counts
// file's SHA-256. Every field is quoted, as clickhouse-client's
// CSVWithNames writes strings.
func synthCH(t testing.TB, s *Spec, rows [][4]string) (counts []byte, selection func(countsSHA string) []byte) {
	t.Helper()
	type row struct{ id, key, model, score string }
	by := map[string][]row{}
	for _, r := range rows {
		by[r[1]] = append(by[r[1]], row{r[0], sampling.Key(s.SelectionSeed, r[0]), r[2], r[3]})
	}
	var sc []sampling.StratumCount
	for l, rs := range by {
		sc = append(sc, sampling.StratumCount{Label: l, Population: int64(len(rs))})
		sort.Slice(rs, func(i, j int) bool { return rs[i].key < rs[j].key })
	}
	sort.Slice(sc, func(i, j int) bool { return sc[i].Label < sc[j].Label })
	alloc, err := sampling.Allocate(sc, s.SampleSize, sampling.AllocOptions{Rule: s.Allocation, MinPerStratum: s.MinPerStratum, Spare: s.Spare})
	if err != nil {
		t.Fatal(err)
	}
	write := func(recs [][]string) []byte {
		var b bytes.Buffer
		for _, r := range recs {
			for i, f := range r {
				if i > 0 {
					b.WriteByte(',')
				}
				b.WriteString(csvQuote(f))
			}
			b.WriteByte('\n')
		}
		return b.Bytes()
	}
	it := strconv.Itoa
	n := it(len(rows))
	detail, err := s.MarshalDetail()
	if err != nil {
		t.Fatal(err)
	}
	recs := [][]string{ResultHeader(2),
		{KindCounts, "", "", n, "", "", "", "", string(detail), "", ""},
		{KindInScope, "", "", n, "", "", "", "", "", "", ""},
		{KindEmptyIDs, "", "", "0", "", "", "", "", "", "", ""},
		{KindRepeatedRows, "", "", "0", "", "", "", "", "", "", ""}}
	for _, a := range sc {
		recs = append(recs, []string{KindStratum, "", a.Label, strconv.FormatInt(a.Population, 10), "", "", "", "", "", "", ""})
	}
	counts = write(recs)
	selection = func(countsSHA string) []byte {
		detail, err := s.marshalDetail(countsSHA)
		if err != nil {
			t.Fatal(err)
		}
		sum, spares := 0, 0
		for _, a := range alloc {
			sum, spares = sum+a.Sample, spares+a.Spare
		}
		recs := [][]string{ResultHeader(2), {KindDraw, "", "", n, it(sum), it(spares), "", "", string(detail), "", ""}}
		for _, a := range alloc {
			recs = append(recs, []string{KindStratum, "", a.Label, strconv.FormatInt(a.Population, 10), it(a.Sample), it(a.Spare), "", "", "", "", ""})
		}
		for _, a := range alloc {
			for _, r := range by[a.Label][:a.Sample+a.Spare] {
				recs = append(recs, []string{KindItem, r.id, a.Label, strconv.FormatInt(a.Population, 10), it(a.Sample), it(a.Spare), "", r.key, "", r.model, r.score})
			}
		}
		return write(recs)
	}
	return counts, selection
}

// synthCHCase is synthCase for ClickHouse, with the two result files
// written into a temporary folder.
func synthCHCase(t *testing.T) (p *plan.File, s *Spec, rows [][4]string, countsPath, selectedPath string) {
	p, s, rows = synthCase()
	s.Dialect = ClickHouse
	dir := t.TempDir()
	counts, selection := synthCH(t, s, rows)
	countsPath, selectedPath = filepath.Join(dir, "counts.csv"), filepath.Join(dir, "selected.csv")
	if err := os.WriteFile(countsPath, counts, 0o644); err != nil {
		t.Fatal(err)
	}
	if err := os.WriteFile(selectedPath, selection(drawfolder.SHA256Hex(counts)), 0o644); err != nil {
		t.Fatal(err)
	}
	return p, s, rows, countsPath, selectedPath
}

// TestImportSelectionSynthetic imports a ClickHouse draw computed without
// a server and compares the folder with the draw from the same rows as a
// CSV log.
func TestImportSelectionSynthetic(t *testing.T) {
	p, s, rows, countsPath, selectedPath := synthCHCase(t)
	counts, err := ReadCounts(countsPath, nil, p, "fp")
	if err != nil {
		t.Fatal(err)
	}
	res, err := ImportSelection(selectedPath, nil, p, "fp", counts)
	if err != nil {
		t.Fatal(err)
	}
	got, err := res.Folder("test")
	if err != nil {
		t.Fatal(err)
	}
	var log strings.Builder
	log.WriteString("record_id,region,model_a,score\n")
	for _, r := range rows {
		log.WriteString(strings.Join(r[:], ",") + "\n")
	}
	want, err := sampling.Draw(sampling.DrawInput{Plan: p, PlanFingerprint: "fp", LogPath: "log.csv", Log: strings.NewReader(log.String()),
		IDColumn: "record_id", StrataColumns: s.Strata, Double: s.Double, ToolVersion: "test",
		Alloc: sampling.AllocOptions{Rule: s.Allocation, MinPerStratum: s.MinPerStratum, Spare: s.Spare}})
	if err != nil {
		t.Fatal(err)
	}
	compareFolders(t, got, want)
	e := got.Manifest.Engine
	if e == nil || e.Dialect != "clickhouse" || e.CountsSHA256 != counts.SHA256 || e.CountsQuerySHA256 != drawfolder.SHA256Hex([]byte(counts.Query)) ||
		e.QuerySHA256 != drawfolder.SHA256Hex([]byte(res.Query)) {
		t.Errorf("manifest engine %+v", e)
	}
	// The one-query import refuses a two-step result and says why.
	if _, err := Import(selectedPath, nil, p, "fp"); err == nil || !strings.Contains(err.Error(), "checked against the counts it was made from") {
		t.Errorf("Import of a clickhouse selection: %v", err)
	}
}

// TestImportSelectionRefuses edits the counts and selection files of a
// good draw and checks each edit is refused with its reason and place.
func TestImportSelectionRefuses(t *testing.T) {
	p, _, _, countsPath, selectedPath := synthCHCase(t)
	goodCounts, _ := os.ReadFile(countsPath)
	goodSelected, _ := os.ReadFile(selectedPath)
	edit := func(data []byte, old, new string) []byte {
		if !bytes.Contains(data, []byte(old)) {
			t.Fatalf("the file lacks %q", old)
		}
		return bytes.Replace(data, []byte(old), []byte(new), 1)
	}
	firstItem := func(data []byte, col int, value string) []byte {
		recs, err := csv.NewReader(bytes.NewReader(data)).ReadAll()
		if err != nil {
			t.Fatal(err)
		}
		for _, r := range recs {
			if r[colKind] == KindItem {
				r[col] = value
				break
			}
		}
		var b bytes.Buffer
		w := csv.NewWriter(&b)
		w.WriteAll(recs)
		return b.Bytes()
	}
	dropLast := func(data []byte) []byte {
		lines := strings.SplitAfter(strings.TrimSuffix(string(data), "\n"), "\n")
		return []byte(strings.Join(lines[:len(lines)-1], ""))
	}
	cases := []struct {
		name             string
		counts, selected []byte
		want             string
	}{
		{"repeated ids", edit(goodCounts, `"repeated_rows","","","0"`, `"repeated_rows","","","2"`), nil, "2 rows in scope repeat the id of another row"},
		{"empty ids", edit(goodCounts, `"empty_ids","","","0"`, `"empty_ids","","","1"`), nil, "the table has 1 row whose id is NULL or empty"},
		{"counts row missing", edit(goodCounts, `"repeated_rows"`, `"in_scope"`), nil, "the repeated_rows row is missing"},
		{"selection given as counts", goodSelected, nil, "this is the result of a selection query, not of the counts query"},
		{"counts given as selection", nil, goodCounts, "this is the result of the counts query (step 1 of 2), not of the selection query"},
		{"table grew", nil, edit(goodSelected, `"draw","","","90"`, `"draw","","","91"`), "the selection query read 91 rows of t, but the counts query read 90"},
		{"stratum grew", nil, edit(goodSelected, `"stratum","","north","`, `"stratum","","north","1`), `has 1`},
		{"a new stratum", nil, edit(goodSelected, `"stratum","","north"`, `"stratum","","nort","1","0","0","","","","",""`+"\n"+`"stratum","","north"`), `stratum "nort" is not among the strata counted in`},
		{"an item left out", nil, dropLast(goodSelected), "rows in the result, but its"},
		{"a key edited", nil, firstItem(goodSelected, colKey, strings.Repeat("0", 64)), "is not SHA-256"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			dir := t.TempDir()
			cp, sp := countsPath, selectedPath
			if c.counts != nil {
				cp = filepath.Join(dir, "counts.csv")
				os.WriteFile(cp, c.counts, 0o644)
			}
			if c.selected != nil {
				sp = filepath.Join(dir, "selected.csv")
				os.WriteFile(sp, c.selected, 0o644)
			}
			counts, err := ReadCounts(cp, nil, p, "fp")
			if err == nil {
				_, err = ImportSelection(sp, nil, p, "fp", counts)
			}
			if err == nil || !strings.Contains(err.Error(), c.want) {
				t.Errorf("got %v\nwant %q", err, c.want)
			}
		})
	}
	// A selection made from other counts names the counts file.
	other := filepath.Join(t.TempDir(), "counts.csv")
	os.WriteFile(other, append(append([]byte{}, goodCounts...), '\n'), 0o644)
	counts, err := ReadCounts(other, nil, p, "fp")
	if err != nil {
		t.Fatal(err)
	}
	if _, err := ImportSelection(selectedPath, nil, p, "fp", counts); err == nil || !strings.Contains(err.Error(), "the result was made from the counts file with SHA-256") {
		t.Errorf("selection from other counts: %v", err)
	}
}

// FuzzImportSelection feeds mutated selection results to ImportSelection
// with fixed counts: it must never panic, and a result it accepts must
// turn into a folder.
func FuzzImportSelection(f *testing.F) {
	p, s, rows := synthCase()
	s.Dialect = ClickHouse
	countsData, selection := synthCH(f, s, rows)
	dir := f.TempDir()
	countsPath := filepath.Join(dir, "counts.csv")
	if err := os.WriteFile(countsPath, countsData, 0o644); err != nil {
		f.Fatal(err)
	}
	counts, err := ReadCounts(countsPath, nil, p, "fp")
	if err != nil {
		f.Fatal(err)
	}
	f.Add(selection(counts.SHA256))
	f.Add(countsData)
	f.Add([]byte(""))
	f.Fuzz(func(t *testing.T, data []byte) {
		path := filepath.Join(dir, "r.csv")
		if err := os.WriteFile(path, data, 0o644); err != nil {
			t.Fatal(err)
		}
		res, err := ImportSelection(path, nil, p, "fp", counts)
		if err != nil {
			return
		}
		if _, err := res.Folder("test"); err != nil {
			var ie *inputerr.Error
			if !asInputError(err, &ie) {
				t.Fatalf("accepted result gave a non-input error: %v", err)
			}
		}
	})
}
