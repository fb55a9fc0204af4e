package drawfolder

import (
	"bytes"
	"errors"
	"os"
	"path/filepath"
	"probity/plan/inputerr"
	"probity/sampling/safewrite"
	"reflect"
	"strings"
	"testing"
)

func sampleFolder() *Content {
	key := strings.Repeat("ab", 32)
	return &Content{
		Manifest: &Manifest{
			Format: ManifestFormat, ToolVersion: "test", PlanFingerprint: "pf",
			Seed: "s", SelectionSeed: "s", KeyDefinition: "k",
			Log:           LogInfo{Path: "log.csv", SHA256: "x", Bytes: 10, Rows: 3, Format: "csv", Compression: "none"},
			IDColumn:      "record_id",
			Allocation:    AllocationInfo{Rule: "proportional"},
			Strata:        []StratumInfo{{Label: "a|<b>", Population: 3, Sample: 2, Spare: 0, Weight: 1.5}},
			SampleSize:    2,
			StrataColumns: []string{"region"},
		},
		Candidates: []string{"m1", "m2"},
		Show:       []string{"text"},
		Ledger: []LedgerRow{
			{Item: 1, RecordID: "r1", Stratum: "a|<b>", StratumSize: 3, StratumSample: 2, Weight: 1.5, Key: key, Predictions: []string{"yes", "no"}, Double: true},
			{Item: 2, RecordID: "r,2", Stratum: "a|<b>", StratumSize: 3, StratumSample: 2, Weight: 1.5, Key: key, Spare: true, Predictions: []string{"no", "no"}},
		},
		Worksheet: []WorksheetRow{
			{Item: 1, RecordID: "r1", Show: []string{"hello \"world\""}},
			{Item: 2, RecordID: "r,2", Show: []string{"line\nbreak"}},
		},
		Second: []WorksheetRow{{Item: 1, RecordID: "r1", Show: []string{"hello \"world\""}}},
	}
}

func TestFolderRoundTrip(t *testing.T) {
	dir := filepath.Join(t.TempDir(), "draw")
	f := sampleFolder()
	if err := Write(dir, f, safewrite.FolderOptions{}); err != nil {
		t.Fatal(err)
	}
	names, _ := filepath.Glob(filepath.Join(dir, "*"))
	if len(names) != 4 {
		t.Fatalf("folder holds %v, want 4 files and no temporaries", names)
	}
	ledger, err := ReadLedger(filepath.Join(dir, LedgerFile), f.Candidates)
	if err != nil {
		t.Fatal(err)
	}
	if !reflect.DeepEqual(ledger, f.Ledger) {
		t.Fatalf("ledger round trip:\n got %+v\nwant %+v", ledger, f.Ledger)
	}
	h, ws, err := ReadWorksheet(filepath.Join(dir, WorksheetFile))
	if err != nil {
		t.Fatal(err)
	}
	if want := []string{"item (draw: seed s)", "record_id", "text", "label", "note", "labeler"}; !reflect.DeepEqual(h, want) {
		t.Fatalf("header %v, want %v", h, want)
	}
	if len(ws) != 2 || ws[1].RecordID != "r,2" || ws[1].Show[0] != "line\nbreak" || ws[0].Line != 2 || ws[1].Line != 3 {
		t.Fatalf("worksheet rows %+v", ws)
	}
	m, raw, err := ReadManifest(filepath.Join(dir, ManifestFile))
	if err != nil {
		t.Fatal(err)
	}
	wsBytes, _ := os.ReadFile(filepath.Join(dir, WorksheetFile))
	if m.Files[WorksheetFile] != SHA256Hex(wsBytes) {
		t.Fatalf("manifest worksheet hash %s does not match the file", m.Files[WorksheetFile])
	}
	if _, ok := m.Files[WorksheetSecondFile]; !ok {
		t.Fatal("manifest lacks the second worksheet's hash")
	}
	// Deterministic bytes: two-space indent, no HTML escaping, trailing newline,
	// [] for empty lists.
	if !bytes.HasSuffix(raw, []byte("}\n")) || !bytes.Contains(raw, []byte("\n  \"format\": 1,")) ||
		!bytes.Contains(raw, []byte(`"a|<b>"`)) || !bytes.Contains(raw, []byte(`"bands": []`)) {
		t.Fatalf("manifest bytes not in the expected shape:\n%s", raw)
	}
	again, _ := MarshalManifest(m)
	if !bytes.Equal(again, raw) {
		t.Fatal("manifest does not re-encode to the same bytes")
	}
	// A second write is refused without force, allowed with it.
	err = Write(dir, sampleFolder(), safewrite.FolderOptions{})
	if !errors.Is(err, safewrite.ErrNotEmpty) {
		t.Fatalf("second write: %v, want safewrite.ErrNotEmpty", err)
	}
	g := sampleFolder()
	g.Second = nil
	if err := Write(dir, g, safewrite.FolderOptions{Replace: true}); err != nil {
		t.Fatal(err)
	}
	if _, err := os.Stat(filepath.Join(dir, WorksheetSecondFile)); !errors.Is(err, os.ErrNotExist) {
		t.Fatal("forced rewrite without doubles left a stale worksheet-second.csv")
	}
}

func TestLedgerWithoutDoubleColumn(t *testing.T) {
	p := filepath.Join(t.TempDir(), "ledger.csv")
	key := strings.Repeat("0", 64)
	os.WriteFile(p, []byte("item,record_id,stratum,stratum_size,stratum_sample,weight,key,spare,m1\n1,r1,all,10,2,5,"+key+",false,yes\n"), 0o644)
	rows, err := ReadLedger(p, []string{"m1"})
	if err != nil {
		t.Fatal(err)
	}
	if len(rows) != 1 || rows[0].Double || rows[0].Predictions[0] != "yes" || rows[0].Weight != 5 {
		t.Fatalf("rows %+v", rows)
	}
}

func TestReadErrors(t *testing.T) {
	key := strings.Repeat("0", 64)
	lh := "item,record_id,stratum,stratum_size,stratum_sample,weight,key,spare,double,m1\n"
	cases := []struct {
		name, file, content, want string
	}{
		{"ledger header", "ledger.csv", "item,record_id\n", `ledger.csv line 1: header has 2 columns, expected 10: item, record_id, stratum, stratum_size, stratum_sample, weight, key, spare, double, m1`},
		{"ledger candidate order", "ledger.csv", strings.Replace(lh, "m1", "m2", 1), `ledger.csv line 1: header column 10 is "m2", expected "m1"`},
		{"ledger key", "ledger.csv", lh + "1,r1,all,10,2,5,XYZ,false,false,yes\n", `ledger.csv line 2, field key: "XYZ" is not 64 lowercase hex digits`},
		{"ledger ragged", "ledger.csv", lh + "1,r1,all\n", `ledger.csv line 2: 3 fields, but the header has 10`},
		{"ledger dup", "ledger.csv", lh + "1,r1,all,10,2,5," + key + ",false,false,yes\n2,r1,all,10,2,5," + key + ",false,false,yes\n", `ledger.csv line 3, field record_id: record_id "r1" appears twice (lines 2 and 3)`},
		{"ledger spare", "ledger.csv", lh + "1,r1,all,10,2,5," + key + ",yes,false,yes\n", `ledger.csv line 2, field spare: "yes" is neither true nor false`},
		{"ledger weight", "ledger.csv", lh + "1,r1,all,10,2,NaN," + key + ",false,false,yes\n", `ledger.csv line 2, field weight: "NaN" is not a non-negative number`},
		{"worksheet header", "worksheet.csv", "item,label\n", `worksheet.csv line 1: header is item, label; a worksheet's columns are`},
		{"worksheet item", "worksheet.csv", "item,record_id,label,note\nx,r1,,\n", `worksheet.csv line 2, field item: "x" is not a positive whole number`},
		{"worksheet empty id", "worksheet.csv", "item,record_id,label,note,labeler\n1,,yes,,ann\n", `worksheet.csv line 2, field record_id: record_id is empty`},
		{"worksheet quote", "worksheet.csv", "item,record_id,label,note\n1,r1,yes,\"open\n", `worksheet.csv line 2: extraneous or missing " in quoted-field`},
		{"worksheet empty", "worksheet.csv", "", `worksheet.csv: the file is empty (no header line)`},
		{"manifest json", "manifest.json", "{\n  \"format\": 1,\n  \"seed\": \n}\n", `manifest.json line 4: not a valid manifest: invalid character`},
		{"manifest format", "manifest.json", `{"format": 9, "selection_seed": "s"}`, `manifest.json, field format: format 9 is not supported`},
		{"manifest unknown", "manifest.json", `{"format": 1, "colour": "s"}`, `unknown field "colour"`},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			dir := t.TempDir()
			p := filepath.Join(dir, c.file)
			os.WriteFile(p, []byte(c.content), 0o644)
			var err error
			switch c.file {
			case "ledger.csv":
				_, err = ReadLedger(p, []string{"m1"})
			case "worksheet.csv":
				_, _, err = ReadWorksheet(p)
			default:
				_, _, err = ReadManifest(p)
			}
			if err == nil {
				t.Fatal("no error")
			}
			if !inputerr.Is(err) {
				t.Errorf("error %v is not an input error", err)
			}
			msg := strings.ReplaceAll(err.Error(), dir+string(filepath.Separator), "")
			if !strings.Contains(msg, c.want) {
				t.Errorf("error\n %s\nwant it to contain\n %s", msg, c.want)
			}
		})
	}
}

func TestWorksheetBOMAndCRLF(t *testing.T) {
	p := filepath.Join(t.TempDir(), "worksheet.csv")
	os.WriteFile(p, []byte("\xef\xbb\xbfitem,record_id,text,label,note\r\n1,r1,hi,yes,\r\n"), 0o644)
	h, rows, err := ReadWorksheet(p)
	if err != nil {
		t.Fatal(err)
	}
	if h[0] != "item" || len(rows) != 1 || rows[0].Label != "yes" || rows[0].Show[0] != "hi" || rows[0].Labeler != "" {
		t.Fatalf("header %q rows %+v", h, rows)
	}
}

// TestLabelerNamesAreCleaned: a labeler's name with a control, zero-width
// or direction-overriding character is refused with its line; a name
// written with a combining accent is read in NFC, trimmed.
func TestLabelerNamesAreCleaned(t *testing.T) {
	dir := t.TempDir()
	for name, c := range map[string]struct{ labeler, want string }{
		"zero-width": {"an\u200bn", "line 3, field labeler: labeler of item 2: invalid name: character 3 is U+200B (a zero-width space)"},
		"override":   {"\u202enna", "line 3, field labeler: labeler of item 2: invalid name: character 1 is U+202E (a right-to-left override)"},
		"nul":        {"a\x00", "line 3, field labeler: labeler of item 2: invalid name: character 2 is U+0000 (NUL)"},
	} {
		p := filepath.Join(dir, name+".csv")
		os.WriteFile(p, []byte("item,record_id,label,note,labeler\n1,r1,yes,,ann\n2,r2,no,,"+c.labeler+"\n"), 0o644)
		_, _, err := ReadWorksheet(p)
		if err == nil || !strings.Contains(err.Error(), p+" "+c.want) {
			t.Errorf("%s: got %v, want %q", name, err, c.want)
		}
	}
	p := filepath.Join(dir, "nfc.csv")
	os.WriteFile(p, []byte("item,record_id,label,note,labeler\n1,r1,yes,, Jo\u0308rg \n"), 0o644)
	_, rows, err := ReadWorksheet(p)
	if err != nil || rows[0].Labeler != "Jörg" {
		t.Fatalf("%v %+v", err, rows)
	}
}
