package trend

import (
	"encoding/json"
	"errors"
	"os"
	"path/filepath"
	"probity/plan/inputerr"
	"strings"
	"testing"
)

func TestLoadFilesAndFolders(t *testing.T) {
	dir := t.TempDir()
	rs := yearRecords()
	// Three months as folders holding record.json (next to a manifest
	// that must be skipped), one as a loose file.
	for _, r := range rs[:3] {
		writeRecord(t, dir, filepath.Join("audits", r.Period, "record.json"), r)
		if err := os.WriteFile(filepath.Join(dir, "audits", r.Period, "manifest.json"), []byte(`{"format":1,"seed":"x"}`), 0o644); err != nil {
			t.Fatal(err)
		}
	}
	loose := writeRecord(t, dir, "dec.json", rs[11])
	// The same file named twice (directly and through its folder) is read once.
	again := filepath.Join(dir, "audits", rs[0].Period, "record.json")
	got, err := Load([]string{filepath.Join(dir, "audits"), loose, again})
	if err != nil {
		t.Fatal(err)
	}
	if len(got.Entries) != 4 {
		t.Fatalf("read %d records, want 4", len(got.Entries))
	}
	if len(got.Skipped) != 3 || !strings.HasSuffix(got.Skipped[0], "manifest.json") {
		t.Fatalf("skipped %v, want the 3 manifests", got.Skipped)
	}
	wantOrder := []string{"2026-01", "2026-02", "2026-03", "2026-12"}
	for i, e := range got.Entries {
		if e.Record.Period != wantOrder[i] {
			t.Errorf("entry %d is %s, want %s", i, e.Record.Period, wantOrder[i])
		}
	}
	if got.Entries[0].Record.Candidates[1].Name != "router-b" || got.Entries[3].Record.Candidates[1].Errors != 7 {
		t.Errorf("decoded candidates wrong: %+v", got.Entries[3].Record.Candidates)
	}
}

// badCase is a record file that must be refused: the error must name the
// file, and, where given, the line and field.
type badCase struct {
	name    string
	edit    func(m map[string]any)
	raw     string // used instead of edit when set
	field   string
	line    int // 0: do not check
	msgPart string
}

func TestLoadRefusesBadRecords(t *testing.T) {
	cases := []badCase{
		{name: "not json", raw: "{\n  \"format\": 1,\n  oops\n}", line: 3, msgPart: "not valid JSON"},
		{name: "empty file", raw: " \n", msgPart: "is empty"},
		{name: "a list", raw: "[1, 2]", msgPart: "not a record"},
		{name: "missing period", edit: func(m map[string]any) { delete(m, "period") }, field: "period", msgPart: "missing"},
		{name: "missing ceiling", edit: func(m map[string]any) { delete(m["plan"].(map[string]any), "ceiling") }, field: "plan.ceiling", msgPart: "missing"},
		{name: "missing errors", edit: func(m map[string]any) {
			delete(m["candidates"].([]any)[1].(map[string]any), "errors")
		}, field: "candidates[1].errors", msgPart: "missing"},
		{name: "errors as text", edit: func(m map[string]any) {
			m["candidates"].([]any)[2].(map[string]any)["errors"] = "three"
		}, field: "candidates.errors", msgPart: "where a number belongs"},
		{name: "errors above labeled", edit: func(m map[string]any) {
			m["candidates"].([]any)[0].(map[string]any)["errors"] = 700
		}, field: "candidates[0].errors", msgPart: "outside [0, labeled = 613]"},
		{name: "bad verdict", edit: func(m map[string]any) {
			m["candidates"].([]any)[0].(map[string]any)["verdict"] = "PASS"
		}, field: "candidates[0].verdict", msgPart: "neither ACCEPT nor REJECT"},
		{name: "empty period", edit: func(m map[string]any) { m["period"] = "" }, field: "period", msgPart: "drawn for a period"},
		{name: "period with space", edit: func(m map[string]any) { m["period"] = "2026 11" }, field: "period", msgPart: "character"},
		{name: "bad date", edit: func(m map[string]any) { m["date"] = "28/12/2026" }, field: "date", msgPart: "YYYY-MM-DD"},
		{name: "future format", edit: func(m map[string]any) { m["format"] = 9 }, field: "format", msgPart: "not a record format"},
		{name: "ceiling out of range", edit: func(m map[string]any) { m["plan"].(map[string]any)["ceiling"] = 2 }, field: "plan.ceiling", msgPart: "outside (0, 1)"},
		{name: "no candidates", edit: func(m map[string]any) { m["candidates"] = []any{} }, field: "candidates", msgPart: "empty"},
		{name: "duplicate candidate", edit: func(m map[string]any) {
			m["candidates"].([]any)[2].(map[string]any)["name"] = "router-a"
		}, field: "candidates[2].name", msgPart: "repeats candidates[0]"},
		{name: "bad overall verdict", edit: func(m map[string]any) { m["overall_verdict"] = "" }, field: "overall_verdict", msgPart: "neither"},
		{name: "unknown multiplicity", edit: func(m map[string]any) { m["plan"].(map[string]any)["multiplicity"] = "sidak" },
			field: "plan.multiplicity", msgPart: `"sidak": must be one of bonferroni, holm, fixed-sequence`},
		{name: "unknown bound", edit: func(m map[string]any) { m["method"].(map[string]any)["bound"] = "wilson" },
			field: "method.bound", msgPart: `"wilson": must be one of clopper-pearson,`},
		{name: "multiplicity as a number", edit: func(m map[string]any) { m["plan"].(map[string]any)["multiplicity"] = 2 },
			field: "plan.multiplicity", msgPart: "a JSON number where a string belongs"},
	}
	base, err := json.MarshalIndent(yearRecords()[0], "", "  ")
	if err != nil {
		t.Fatal(err)
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			data := []byte(c.raw)
			if c.edit != nil {
				var m map[string]any
				if err := json.Unmarshal(base, &m); err != nil {
					t.Fatal(err)
				}
				c.edit(m)
				data, _ = json.MarshalIndent(m, "", "  ")
			}
			path := filepath.Join(t.TempDir(), "record.json")
			if err := os.WriteFile(path, data, 0o644); err != nil {
				t.Fatal(err)
			}
			_, err := Load([]string{path})
			var ie *inputerr.Error
			if !errors.As(err, &ie) || !errors.Is(err, ErrNotRecord) {
				t.Fatalf("err = %v, want an input error", err)
			}
			if ie.File != path || !strings.HasPrefix(err.Error(), path) {
				t.Errorf("error %q does not name the file %s", err, path)
			}
			if ie.Field != c.field {
				t.Errorf("field = %q, want %q (%v)", ie.Field, c.field, err)
			}
			if c.line != 0 && ie.Line != c.line {
				t.Errorf("line = %d, want %d (%v)", ie.Line, c.line, err)
			}
			if c.field != "" && ie.Line == 0 && c.msgPart != "missing" {
				t.Errorf("no line for field %s: %v", c.field, err)
			}
			if !strings.Contains(err.Error(), c.msgPart) {
				t.Errorf("error %q lacks %q", err, c.msgPart)
			}
		})
	}
}

// TestLineOfCandidate: a field of the third candidate is reported at that
// candidate's line in an indented file.
func TestLineOfCandidate(t *testing.T) {
	data := []byte("{\n  \"a\": 1,\n  \"candidates\": [\n    {\"name\": \"x\"},\n    {\"name\": \"y\"},\n    {\n      \"name\": \"z\"\n    }\n  ]\n}\n")
	cases := []struct {
		path []any
		want int
	}{
		{[]any{"a"}, 2}, {[]any{"candidates"}, 3}, {[]any{"candidates", 0}, 4},
		{[]any{"candidates", 2}, 6}, {[]any{"candidates", 2, "name"}, 7}, {[]any{"candidates", 5}, 0}, {[]any{"zzz"}, 0},
	}
	for _, c := range cases {
		if got := lineOf(data, c.path); got != c.want {
			t.Errorf("lineOf(%v) = %d, want %d", c.path, got, c.want)
		}
	}
}

func TestLoadMissingAndEmpty(t *testing.T) {
	dir := t.TempDir()
	_, err := Load([]string{filepath.Join(dir, "nope.json")})
	if err == nil || !strings.Contains(err.Error(), "does not exist") {
		t.Errorf("missing file: %v", err)
	}
	if err := os.WriteFile(filepath.Join(dir, "manifest.json"), []byte(`{"seed": "x"}`), 0o644); err != nil {
		t.Fatal(err)
	}
	_, err = Load([]string{dir})
	var ie *inputerr.Error
	if !errors.As(err, &ie) || !strings.Contains(err.Error(), "holds no record.json") || ie.Hint == "" {
		t.Errorf("folder without records: %v", err)
	}
	// A broken *.json in a folder is not skipped silently.
	if err := os.WriteFile(filepath.Join(dir, "2026-01.json"), []byte(`{"record_id": `), 0o644); err != nil {
		t.Fatal(err)
	}
	_, err = Load([]string{dir})
	if err == nil || !strings.Contains(err.Error(), "2026-01.json") || !strings.Contains(err.Error(), "not valid JSON") {
		t.Errorf("broken json in folder: %v", err)
	}
}

// FuzzDecode: Decode never panics and every refusal is an input error naming
// the file.
func FuzzDecode(f *testing.F) {
	good, _ := json.Marshal(yearRecords()[3])
	f.Add(good)
	f.Add([]byte(`{"record_id":"x","candidates":[{}]}`))
	f.Add([]byte(`[]`))
	f.Add([]byte(`{"format":1,"record_id":"a","date":"","period":"2026-01","plan":{"fingerprint":"","method":"exact","model":"binomial","design":"fixed","multiplicity":"holm","ceiling":0.1,"confidence":0.9},"candidates":[{"name":"m","labeled":3,"errors":1,"estimate":0.3,"upper_bound":0.8,"verdict":"ACCEPT"}],"overall_verdict":"ACCEPT"}`))
	f.Fuzz(func(t *testing.T, data []byte) {
		r, err := Decode(data, "f.json")
		if err != nil {
			var ie *inputerr.Error
			if !errors.As(err, &ie) || ie.File != "f.json" {
				t.Fatalf("error %v is not an input error naming the file", err)
			}
			return
		}
		if r.Period == "" || len(r.Candidates) == 0 {
			t.Fatalf("accepted a record without period or candidates")
		}
	})
}
