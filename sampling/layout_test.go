package sampling

import (
	"strings"
	"testing"
)

// TestSpreadsheetLayouts (issue 16, item 11): a log saved with carriage
// returns alone as line ends, or with ';' between fields, is refused
// saying so (before: "the header names column … twice" or a missing id
// column whose name was the whole line).
func TestSpreadsheetLayouts(t *testing.T) {
	rows := "record_id,model_a,score\na,ok,0.1\nb,ok,0.2\n"
	cases := map[string]struct{ log, want string }{
		"cr only": {strings.ReplaceAll(rows, "\n", "\r"), `log.csv: its line ends are carriage returns alone (\r, as in old Mac files), so it reads as one line`},
		"cr only, long": {strings.Repeat(strings.ReplaceAll("r,ok,0.1\n", "\n", "\r"), 40000),
			`log.csv: its line ends are carriage returns alone (\r, as in old Mac files), so it reads as one line`},
		"semicolons": {strings.ReplaceAll(rows, ",", ";"), "log.csv line 1: its fields are separated by ';', not ','"},
	}
	for name, c := range cases {
		_, err := Scan(strings.NewReader(c.log), ScanSpec{Name: "log.csv", Seed: "s", Capacity: 5, MaxLine: 1 << 16})
		if err == nil || err.Error() != c.want {
			t.Errorf("%s: %v, want %s", name, err, c.want)
		}
	}
	// CRLF line ends and a CSV with a few semicolons inside fields read.
	ok := "record_id,model_a,score,text\r\na,ok,0.1,x;y;z\r\n"
	if _, err := Scan(strings.NewReader(ok), ScanSpec{Name: "log.csv", Seed: "s", Capacity: 5}); err != nil {
		t.Errorf("CRLF log: %v", err)
	}
}
