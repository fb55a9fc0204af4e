package drawfolder

import (
	"probity/plan/inputerr"
	"strings"
	"testing"
)

// TestCSVLayouts (issue 16, item 11): a labeled worksheet saved by a
// spreadsheet with carriage returns alone as line ends, or with ';'
// between fields, is refused saying so, with the fix as the hint.
func TestCSVLayouts(t *testing.T) {
	ws := "item,record_id,label,note,labeler\n1,a,ok,,\n2,b,neg,,\n"
	cases := map[string]struct{ data, want, hint string }{
		"cr only": {strings.ReplaceAll(ws, "\n", "\r"), `labels.csv: its line ends are carriage returns alone (\r, as in old Mac files), so it reads as one line`,
			"save it as CSV with Unix (LF) or Windows (CRLF) line ends"},
		"semicolons": {strings.ReplaceAll(ws, ",", ";"), "labels.csv line 1: its fields are separated by ';', not ','",
			"save it as CSV with ',' as the field separator (in the spreadsheet's CSV export options)"},
	}
	for name, c := range cases {
		_, err := ParseCSVTable([]byte(c.data), "labels.csv")
		if err == nil || err.Error() != c.want || !strings.Contains(inputerr.HintOf(err), c.hint) {
			t.Errorf("%s: %v (hint %q), want %s", name, err, inputerr.HintOf(err), c.want)
		}
	}
	if _, err := ParseCSVTable([]byte(strings.ReplaceAll(ws, "\n", "\r\n")), "labels.csv"); err != nil {
		t.Errorf("CRLF: %v", err)
	}
}
