package sampling

import (
	"bytes"
	"os"
	"path/filepath"
	"testing"
)

// FuzzScan feeds arbitrary bytes to the log reader: it must never panic,
// every error must be an InputError naming the log, and a successful scan
// must account for its rows (kept rows within capacity, in key order,
// strata counts summing to the rows in scope).
func FuzzScan(f *testing.F) {
	seeds := []string{
		"record_id,g,score\na,x,0.1\nb,y,0.9\n",
		"record_id,g,score\r\n\"a,1\",x,0.1\r\n\"b\"\"q\",\"multi\nline\",0.5\r\n",
		"record_id\tg\tscore\na\tx\t0.2\n",
		`{"record_id":"a","g":"x","score":0.1}` + "\n" + `{"record_id":"b","g":"y","score":"0.7"}` + "\n",
		"record_id,g,score\na,x\n",
		"record_id,g,score\n,x,0.1\n",
		"\x1f\x8b\x08\x00",
		"",
		"record_id,g,score\na,x,0.1\na,x,0.1\n",
	}
	for _, s := range seeds {
		f.Add([]byte(s), uint8(3), uint16(16))
	}
	f.Fuzz(func(t *testing.T, data []byte, capacity uint8, chunk uint16) {
		spec := ScanSpec{Name: "fuzz.log", Seed: "s", StrataColumns: []string{"g"}, Keep: []string{"score"},
			Capacity: int(capacity%20) + 1, ChunkSize: int(chunk%512) + 1, Workers: 2, Dedupe: capacity%2 == 0}
		res, err := Scan(bytes.NewReader(data), spec)
		if err != nil {
			ie, ok := err.(*InputError)
			if !ok {
				t.Fatalf("error %T %v is not an InputError", err, err)
			}
			if ie.File != "fuzz.log" {
				t.Fatalf("error names %q", ie.File)
			}
			return
		}
		var sum int64
		for _, st := range res.Strata {
			sum += st.Count
			if len(st.Rows) > spec.Capacity || int64(len(st.Rows)) > st.Count {
				t.Fatalf("stratum %q keeps %d rows of %d (capacity %d)", st.Label, len(st.Rows), st.Count, spec.Capacity)
			}
			for i := 1; i < len(st.Rows); i++ {
				if !keyLess(&st.Rows[i-1].Key, &st.Rows[i].Key) {
					t.Fatalf("stratum %q rows not in ascending key order", st.Label)
				}
			}
		}
		if sum != res.InScope || res.InScope > res.Rows {
			t.Fatalf("counts %d, in scope %d, rows %d", sum, res.InScope, res.Rows)
		}
	})
}

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
			if _, ok := err.(*InputError); !ok {
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
