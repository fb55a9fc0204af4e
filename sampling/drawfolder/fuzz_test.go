package drawfolder

import (
	"bytes"
	"os"
	"path/filepath"
	"testing"

	"probity/plan/inputerr"
)

// FuzzReadWorksheet: the worksheet reader never panics; what it accepts
// has unique positive items and non-empty ids, and writes back readably.
func FuzzReadWorksheet(f *testing.F) {
	f.Add([]byte("item,record_id,label,note\n1,a,yes,\n2,b,,x\n"))
	f.Add([]byte("item,record_id,text,label,note,labeler\n1,a,\"hi, there\",no,,ann\n"))
	f.Add([]byte("\xef\xbb\xbfitem,record_id,label,note\r\n1,a,,\r\n"))
	f.Add([]byte("item,record_id,label,note\n1,a,yes\n"))
	f.Add([]byte("item,label\n"))
	f.Fuzz(func(t *testing.T, data []byte) {
		p := filepath.Join(t.TempDir(), "worksheet.csv")
		if err := os.WriteFile(p, data, 0o644); err != nil {
			t.Fatal(err)
		}
		h, rows, err := ReadWorksheet(p)
		if err != nil {
			if _, ok := err.(*inputerr.Error); !ok {
				t.Fatalf("error %T %v is not an InputError", err, err)
			}
			return
		}
		seen := map[int]bool{}
		for _, r := range rows {
			if r.Item < 1 || seen[r.Item] || r.RecordID == "" {
				t.Fatalf("accepted row %+v", r)
			}
			seen[r.Item] = true
		}
		nShow := len(h) - 4
		if h[len(h)-1] == "labeler" {
			nShow--
		}
		var buf bytes.Buffer
		if err := WriteWorksheet(&buf, h[2:2+nShow], rows); err != nil {
			t.Fatal(err)
		}
		q := filepath.Join(t.TempDir(), "again.csv")
		os.WriteFile(q, buf.Bytes(), 0o644)
		_, again, err := ReadWorksheet(q)
		if err != nil || len(again) != len(rows) {
			t.Fatalf("rewritten worksheet does not read back: %v", err)
		}
		for i := range rows {
			if again[i].RecordID != rows[i].RecordID || again[i].Label != rows[i].Label || again[i].Note != rows[i].Note {
				t.Fatalf("row %d changed on rewrite: %+v vs %+v", i, again[i], rows[i])
			}
		}
	})
}
