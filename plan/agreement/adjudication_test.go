package agreement

import (
	"errors"
	"path/filepath"
	"strings"
	"testing"

	"probity/plan/inputerr"
)

var classes = []string{"defect", "ok"}

func TestReadAdjudicationsFile(t *testing.T) {
	path := filepath.Join("..", "..", "testdata", "agreement", "adjudication.csv")
	got, err := ReadAdjudications(path, classes)
	if err != nil {
		t.Fatal(err)
	}
	want := []Adjudication{
		{Item: 2, RecordID: "w-0002", FinalLabel: "defect", DecidedBy: "Dana Reyes", Note: "crack visible at 4x, see note", Line: 2},
		{Item: 5, RecordID: "w-0005", FinalLabel: "ok", DecidedBy: "Dana Reyes", Note: "", Line: 3},
		{Item: 7, RecordID: "w-0007", FinalLabel: "ok", DecidedBy: "Lee Okafor", Note: "glare, not porosity;\nrechecked under side light", Line: 4},
	}
	if len(got) != len(want) {
		t.Fatalf("got %d rows, want %d: %+v", len(got), len(want), got)
	}
	for i := range want {
		if got[i] != want[i] {
			t.Errorf("row %d = %+v, want %+v", i, got[i], want[i])
		}
	}
}

func TestParseAdjudicationsHeaderOnly(t *testing.T) {
	got, err := ParseAdjudications([]byte("\xef\xbb\xbfitem,record_id,final_label,decided_by,note\r\n"), "adj.csv", classes)
	if err != nil || got == nil || len(got) != 0 {
		t.Fatalf("header-only file: %v, %v; want an empty, non-nil list", got, err)
	}
}

func TestParseAdjudicationsErrors(t *testing.T) {
	const h = "item,record_id,final_label,decided_by,note\n"
	cases := []struct {
		name, data string
		line       int
		column     string
		msg        string
	}{
		{"empty", "", 0, "", "the file is empty"},
		{"wrong header", "item,label\n1,ok\n", 1, "", "header is item,label"},
		{"reordered header", "record_id,item,final_label,decided_by,note\n", 1, "", "an adjudication file's columns are item,record_id,final_label,decided_by,note"},
		{"short row", h + "1,w-1,ok,ann\n", 2, "", "4 fields, but the header has 5"},
		{"bad item", h + "x,w-1,ok,ann,\n", 2, "item", `"x" is not a positive whole number`},
		{"zero item", h + "0,w-1,ok,ann,\n", 2, "item", `"0" is not a positive whole number`},
		{"empty id", h + "1,,ok,ann,\n", 2, "record_id", "record_id is empty"},
		{"empty label", h + "1,w-1,,ann,\n", 2, "final_label", "final_label is empty"},
		{"unsure label", h + "1,w-1,unsure,ann,\n", 2, "final_label", `final_label "unsure" is not one of the classes (defect, ok)`},
		{"other label", h + "1,w-1,OK,ann,\n", 2, "final_label", `final_label "OK" is not one of the classes`},
		{"no decider", h + "1,w-1,ok,  ,\n", 2, "decided_by", "decided_by is empty"},
		{"item twice", h + "1,w-1,ok,ann,\n1,w-2,ok,ann,\n", 3, "item", "item 1 is adjudicated twice (lines 2 and 3)"},
		{"id twice", h + "1,w-1,ok,ann,\n2,w-1,ok,ann,\n", 3, "record_id", `record_id "w-1" is adjudicated twice`},
		{"bad quote", h + "1,\"w-1,ok,ann,\n", 2, "", "quote"},
	}
	for _, c := range cases {
		_, err := ParseAdjudications([]byte(c.data), "adj.csv", classes)
		var ie *inputerr.Error
		if !errors.As(err, &ie) {
			t.Errorf("%s: error %v is not an *inputerr.Error", c.name, err)
			continue
		}
		if ie.File != "adj.csv" || ie.Line != c.line || ie.Field != c.column || !strings.Contains(ie.Msg, c.msg) {
			t.Errorf("%s: got file %q line %d column %q msg %q; want line %d column %q msg containing %q",
				c.name, ie.File, ie.Line, ie.Field, ie.Msg, c.line, c.column, c.msg)
		}
	}
}

func FuzzParseAdjudications(f *testing.F) {
	f.Add([]byte("item,record_id,final_label,decided_by,note\n1,w-1,ok,ann,fine\n"))
	f.Add([]byte("item,record_id,final_label,decided_by,note\n2,\"w,2\",defect,\"b\"\"o\",\"multi\nline\"\n"))
	f.Add([]byte("\xef\xbb\xbfitem,record_id,final_label,decided_by,note\r\n3,w-3,unsure,x,\r\n"))
	f.Add([]byte(""))
	f.Fuzz(func(t *testing.T, data []byte) {
		rows, err := ParseAdjudications(data, "fuzz.csv", classes)
		if err != nil {
			var ie *inputerr.Error
			if !errors.As(err, &ie) || ie.File != "fuzz.csv" {
				t.Fatalf("error %v is not an input error naming the file", err)
			}
			return
		}
		seen := map[int]bool{}
		for _, r := range rows {
			if r.Item < 1 || r.RecordID == "" || r.DecidedBy == "" || (r.FinalLabel != "defect" && r.FinalLabel != "ok") || seen[r.Item] {
				t.Fatalf("accepted a bad row: %+v", r)
			}
			seen[r.Item] = true
		}
	})
}
