package sampling

import (
	"bytes"
	"reflect"
	"strings"
	"testing"

	"probity/plan/chrono"
	"probity/sampling/loggen"
)

// A log of November 2026 with no rows on the 17th and 18th, drawn for the
// period 2026-11 with its time column: the manifest states the first and
// last time and the two empty days; drawn with a declared range, the
// rows outside it are counted; the draw's options repeat from the
// manifest. The same in every format.
func TestDrawRecordsCompleteness(t *testing.T) {
	for _, format := range []string{"csv", "tsv", "jsonl"} {
		log := genLog(t, loggen.Config{Rows: 3000, Seed: 5, Format: format, Month: "2026-11", SkipDays: []int{17, 18}})
		in := DrawInput{Plan: testPlan("seed", 40), LogPath: "log." + format, Log: bytes.NewReader(log), Format: format,
			Period: "2026-11", TimeColumn: loggen.TimeColumn, Alloc: AllocOptions{Rule: Proportional}, Workers: 2, ChunkSize: 4096}
		f, err := Draw(in)
		if err != nil {
			t.Fatalf("%s: %v", format, err)
		}
		c := f.Manifest.Completeness
		if c == nil || c.TimeColumn != loggen.TimeColumn || c.Rows != 3000 || c.From != "2026-11-01" || c.To != "2026-11-30" ||
			c.RangeOf != chrono.RangePeriod || c.Days != 30 || c.EmptyDayCount != 2 || !reflect.DeepEqual(c.EmptyDays, []string{"2026-11-17/2026-11-18"}) ||
			c.RowsBefore != 0 || c.RowsAfter != 0 || c.First.Format("2006-01") != "2026-11" || c.Last.Format("2006-01") != "2026-11" {
			t.Errorf("%s: %+v", format, c)
		}
		// the scan's count agrees with a plain count of the log's days
		days := map[string]int{}
		for _, line := range strings.Split(string(log), "\n")[1:] {
			if i := strings.Index(line, "2026-11-"); i >= 0 {
				days[line[i:i+10]]++
			}
		}
		if format != "jsonl" && len(days) != 28 {
			t.Errorf("%s: the log has rows on %d days, want 28", format, len(days))
		}
		again, err := DrawInputFromManifest(f.Manifest)
		if err != nil || again.TimeColumn != loggen.TimeColumn || !again.Days.From.IsZero() {
			t.Errorf("%s: from the manifest: %+v %v", format, again, err)
		}
	}
	log := genLog(t, loggen.Config{Rows: 3000, Seed: 5, Month: "2026-11"})
	d, _ := chrono.ParseDayRange("2026-11-05/2026-11-25")
	f, err := Draw(DrawInput{Plan: testPlan("seed", 40), LogPath: "log.csv", Log: bytes.NewReader(log), TimeColumn: loggen.TimeColumn, Days: d,
		Alloc: AllocOptions{Rule: Proportional}})
	if err != nil {
		t.Fatal(err)
	}
	c := f.Manifest.Completeness
	if c.RangeOf != chrono.RangeDeclared || c.Days != 21 || c.EmptyDayCount != 0 || c.RowsBefore == 0 || c.RowsAfter == 0 || c.Complete() {
		t.Errorf("declared: %+v", c)
	}
	if again, err := DrawInputFromManifest(f.Manifest); err != nil || again.Days != d {
		t.Errorf("declared range from the manifest: %+v %v", again.Days, err)
	}
}

// A time that is not one is refused with the file, its line and the
// column; a row out of scope (--where) is not read.
func TestDrawRefusesBadTimes(t *testing.T) {
	log := "record_id,model_a,score,at,region\n" +
		"r1,ok,0.1,2026-11-01T10:00:00Z,north\n" +
		"r2,ok,0.2,yesterday,south\n" +
		"r3,fraud,0.9,2026-11-02,north\n"
	in := DrawInput{Plan: testPlan("seed", 2), LogPath: "log.csv", Log: strings.NewReader(log), TimeColumn: "at", Alloc: AllocOptions{Rule: Proportional}}
	_, err := Draw(in)
	if err == nil || err.Error() != `log.csv line 3, field at: the time "yesterday" is not a date or time` {
		t.Errorf("bad time: %v", err)
	}
	where, _ := ParseFilter("region=north")
	in.Log, in.Where = strings.NewReader(log), []Filter{where}
	f, err := Draw(in)
	if err != nil || f.Manifest.Completeness.Rows != 2 || f.Manifest.Completeness.RangeOf != chrono.RangeRows || f.Manifest.Completeness.Days != 2 {
		t.Errorf("out-of-scope bad time: %v %+v", err, f)
	}
	in.Log, in.Where, in.TimeColumn = strings.NewReader(log), nil, "when"
	if _, err := Draw(in); err == nil || !strings.Contains(err.Error(), `the time column "when" is not in the log`) {
		t.Errorf("missing column: %v", err)
	}
}
