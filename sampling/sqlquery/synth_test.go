package sqlquery

import (
	"bytes"
	"encoding/csv"
	"errors"
	"os"
	"path/filepath"
	"sort"
	"strconv"
	"strings"
	"testing"

	"probity/plan"
	"probity/plan/inputerr"
	"probity/sampling"
)

// synthResult writes, without any database, the result the query gives
// on a table of rows (id, region, model_a, score) stratified by region:
// every key hashed, each stratum sorted by key, sampling.Allocate on the
// counts. It lets the import be tested (and fuzzed) where no engine runs.
func synthResult(t testing.TB, s *Spec, rows [][4]string) []byte {
	t.Helper()
	type row struct {
		id, stratum, key string
		vals             []string
	}
	by := map[string][]row{}
	for _, r := range rows {
		by[r[1]] = append(by[r[1]], row{r[0], r[1], sampling.Key(s.SelectionSeed, r[0]), []string{r[2], r[3]}})
	}
	var counts []sampling.StratumCount
	for l, rs := range by {
		counts = append(counts, sampling.StratumCount{Label: l, Population: int64(len(rs))})
		sort.Slice(rs, func(i, j int) bool { return rs[i].key < rs[j].key })
	}
	alloc, err := sampling.Allocate(counts, s.SampleSize, sampling.AllocOptions{Rule: s.Allocation, MinPerStratum: s.MinPerStratum, Spare: s.Spare})
	if err != nil {
		t.Fatal(err)
	}
	detail, err := s.MarshalDetail()
	if err != nil {
		t.Fatal(err)
	}
	var buf bytes.Buffer
	w := csv.NewWriter(&buf)
	w.Write(ResultHeader(2))
	n, sp := 0, 0
	for _, a := range alloc {
		n, sp = n+a.Sample, sp+a.Spare
	}
	it := strconv.Itoa
	w.Write([]string{KindDraw, "", "", it(len(rows)), it(n), it(sp), "", "", string(detail), "", ""})
	w.Write([]string{KindInScope, "", "", it(len(rows)), "", "", "", "", "", "", ""})
	w.Write([]string{KindEmptyIDs, "", "", "0", "", "", "", "", "", "", ""})
	w.Write([]string{KindDuplicateIDs, "", "", "0", "", "", "", "", "", "", ""})
	for _, a := range alloc {
		w.Write([]string{KindStratum, "", a.Label, strconv.FormatInt(a.Population, 10), it(a.Sample), it(a.Spare), "", "", "", "", ""})
	}
	var items [][]string
	for _, a := range alloc {
		for j, r := range by[a.Label][:a.Sample+a.Spare] {
			items = append(items, []string{KindItem, r.id, a.Label, strconv.FormatInt(a.Population, 10), it(a.Sample), it(a.Spare), it(j + 1), r.key, "", r.vals[0], r.vals[1]})
		}
	}
	sort.Slice(items, func(i, j int) bool { return items[i][7] < items[j][7] })
	w.WriteAll(items)
	w.Flush()
	return buf.Bytes()
}

// synthCase is a plan, a spec and a table for the synthetic tests.
func synthCase() (*plan.File, *Spec, [][4]string) {
	th := 0.5
	p := &plan.File{Format: plan.FileFormat, Seed: "synth", Rule: plan.Rule{SampleSize: 12},
		Candidates: []plan.Candidate{{Name: "a", Column: "model_a"}, {Name: "t", ScoreColumn: "score", Threshold: &th, Positive: "fraud", Negative: "ok"}}}
	s := &Spec{Format: QueryFormat, ToolVersion: "test", Dialect: Postgres, PlanFingerprint: "fp", Seed: p.Seed, SelectionSeed: p.Seed,
		Table: "t", IDColumn: "record_id", Strata: []string{"region"}, Candidates: p.Candidates, SampleSize: 12,
		Allocation: "proportional", MinPerStratum: 2, Spare: 1, Double: 3}
	var rows [][4]string
	for i := 0; i < 90; i++ {
		region := []string{"north", "south", "tiny"}[min(i%7, 2)]
		if region == "tiny" && i > 20 {
			region = "north"
		}
		rows = append(rows, [4]string{"id" + strconv.Itoa(i), region, []string{"ok", "fraud"}[i%2], "0." + strconv.Itoa(i%10)})
	}
	return p, s, rows
}

// TestImportSynthetic imports a result computed without a database and
// compares the folder with the draw from the same rows as a CSV log.
func TestImportSynthetic(t *testing.T) {
	p, s, rows := synthCase()
	dir := t.TempDir()
	path := filepath.Join(dir, "result.csv")
	os.WriteFile(path, synthResult(t, s, rows), 0o644)
	res, err := Import(path, nil, p, "fp")
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
	if got.Manifest.Engine == nil || got.Manifest.Engine.Table != "t" || got.Manifest.LotSize != 90 {
		t.Errorf("manifest: engine %+v, lot %d", got.Manifest.Engine, got.Manifest.LotSize)
	}
	// Read from stdin as well.
	data, _ := os.ReadFile(path)
	if _, err := Import("-", bytes.NewReader(data), p, "fp"); err != nil {
		t.Errorf("from stdin: %v", err)
	}
}

// FuzzImport feeds mutated results to Import: it must never panic, and a
// result it accepts must turn into a folder.
func FuzzImport(f *testing.F) {
	p, s, rows := synthCase()
	f.Add(synthResult(f, s, rows))
	f.Add([]byte("kind,record_id\n"))
	f.Add([]byte(""))
	dir := f.TempDir()
	f.Fuzz(func(t *testing.T, data []byte) {
		path := filepath.Join(dir, "r.csv")
		if err := os.WriteFile(path, data, 0o644); err != nil {
			t.Fatal(err)
		}
		res, err := Import(path, nil, p, "fp")
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

// FuzzParseTableName checks that a parsed name quotes back to parts that
// parse again to the same parts.
func FuzzParseTableName(f *testing.F) {
	for _, s := range []string{"t", "a.b", `"x.y".z`, `s."say ""hi"""`, "a..b", `"`} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, s string) {
		parts, err := ParseTableName(s)
		if err != nil {
			return
		}
		var q []string
		for _, p := range parts {
			q = append(q, quotePart(p))
		}
		again, err := ParseTableName(strings.Join(q, "."))
		if err != nil || strings.Join(again, "\x00") != strings.Join(parts, "\x00") {
			t.Fatalf("%q → %q → %q, %v", s, parts, again, err)
		}
	})
}

func asInputError(err error, target **inputerr.Error) bool {
	return errors.As(err, target)
}

// TestImportRefusesOtherPlanOrSeed edits the draw row's description and
// the rows of a good result and checks each is refused with its reason.
func TestImportRefusesOtherPlanOrSeed(t *testing.T) {
	p, s, rows := synthCase()
	good := string(synthResult(t, s, rows))
	cases := []struct {
		name, old, new, fingerprint, want string
	}{
		{"another plan", "", "", "other", "the result was made for another plan (fingerprint fp), not this one (other)"},
		{"another seed", `""seed"":""synth""`, `""seed"":""synthetic""`, "fp", `the result was made with seed "synthetic", but the plan's seed is "synth"`},
		{"selection seed not from the seed", `""selection_seed"":""synth""`, `""selection_seed"":""x""`, "fp", `the selection seed "x" does not follow from the plan's seed`},
		{"another sample size", `""sample_size"":12`, `""sample_size"":13`, "fp", "the result was made for a sample of 13, but the plan's is 12"},
		{"newer query format", `""format"":1`, `""format"":2`, "fp", "the result was made by a query of format 2; this probity reads format 1"},
		{"table rows do not add up", "draw,,,90,", "draw,,,89,", "fp", "the table has 89 rows but 90 are in scope"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			data := good
			if c.old != "" {
				if !strings.Contains(data, c.old) {
					t.Fatalf("the result lacks %q", c.old)
				}
				data = strings.Replace(data, c.old, c.new, 1)
			}
			path := filepath.Join(t.TempDir(), "result.csv")
			os.WriteFile(path, []byte(data), 0o644)
			_, err := Import(path, nil, p, c.fingerprint)
			if err == nil || !strings.Contains(err.Error(), c.want) || !strings.HasPrefix(err.Error(), path+" line ") {
				t.Errorf("Import: %v\nwant %q with the file and line", err, c.want)
			}
		})
	}
}
