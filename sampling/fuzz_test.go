package sampling

import (
	"bytes"
	"fmt"
	"probity/plan/inputerr"
	"sort"
	"strings"
	"testing"
	"unicode/utf8"
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
			ie, ok := err.(*inputerr.Error)
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

// FuzzScanQuoteFreeMatchesReference compares Scan on quote-free CSV with
// a byte-by-byte reference written here: lines split at '\n' with one
// trailing '\r' dropped, blank lines skipped, fields split at ','. When
// the reference finds no bad row and no repeated id, Scan must succeed
// with the same strata, counts and kept rows (the smallest keys by
// SHA-256, from crypto/sha256 through Key); when the reference finds a
// ragged row or an empty id, Scan must fail on the same line.
func FuzzScanQuoteFreeMatchesReference(f *testing.F) {
	f.Add([]byte("record_id,g,score\na,x,0.1\nb,y,0.9\r\nc,x,0.3\n\nd,y,0.2"), uint8(2), uint16(7))
	f.Add([]byte("record_id,g,score\na,x\n"), uint8(1), uint16(64))
	f.Add([]byte("g,record_id,score\nx,a,1\nx,,2\n"), uint8(3), uint16(3))
	f.Add([]byte("record_id,g,score\n"+strings.Repeat("r1,x,1\nr2,yy,2\nr3,x,3\nr4,zz,\n", 9)), uint8(2), uint16(100))
	f.Fuzz(func(t *testing.T, data []byte, capacity uint8, chunk uint16) {
		data = bytes.ReplaceAll(data, []byte{'"'}, nil)
		data = bytes.TrimPrefix(data, []byte("\xef\xbb\xbf"))
		if len(data) > 1 && data[0] == 0x1f && data[1] == 0x8b {
			return
		}
		lines := strings.Split(string(data), "\n")
		if strings.Contains(strings.TrimSuffix(lines[0], "\r"), "\r") {
			return // carriage returns alone as line ends have their own tests (layout_test.go)
		}
		header := strings.Split(strings.TrimSuffix(lines[0], "\r"), ",")
		idCol, gCol := -1, -1
		for i, h := range header {
			if h == "record_id" && idCol < 0 {
				idCol = i
			}
			if h == "g" && gCol < 0 {
				gCol = i
			}
		}
		seen := map[string]bool{}
		for _, h := range header {
			if seen[h] {
				return // refused for a repeated column name; not compared
			}
			seen[h] = true
		}
		if idCol < 0 || gCol < 0 {
			return
		}
		spec := ScanSpec{Name: "ref.csv", Format: FormatCSV, Seed: "s", StrataColumns: []string{"g"},
			Capacity: int(capacity%6) + 1, ChunkSize: int(chunk%300) + 1, Workers: 2}
		type kept struct{ key, id string }
		strata := map[string][]kept{}
		ids := map[string]bool{}
		badLine := 0
		rows := 0
		for i, l := range lines[1:] {
			l = strings.TrimSuffix(l, "\r")
			if l == "" {
				continue
			}
			f := strings.Split(l, ",")
			// ids and stratum values are bytes that must be valid UTF-8
			if len(f) != len(header) || f[idCol] == "" || !utf8.ValidString(f[idCol]) || !utf8.ValidString(f[gCol]) {
				badLine = i + 2
				break
			}
			if ids[f[idCol]] || strings.Contains(f[gCol], "|") {
				return // repeats and separator values have their own tests
			}
			ids[f[idCol]] = true
			rows++
			strata[f[gCol]] = append(strata[f[gCol]], kept{Key("s", f[idCol]), f[idCol]})
		}
		res, err := Scan(bytes.NewReader(data), spec)
		if badLine > 0 {
			ie, ok := err.(*inputerr.Error)
			if !ok || ie.Line != badLine {
				t.Fatalf("reference: bad row on line %d; Scan: %v", badLine, err)
			}
			return
		}
		if rows == 0 || len(strata) > 10000 {
			return
		}
		if err != nil {
			t.Fatalf("reference reads %d rows; Scan: %v", rows, err)
		}
		if len(res.Strata) != len(strata) || res.Rows != int64(rows) {
			t.Fatalf("%d strata and %d rows, reference %d and %d", len(res.Strata), res.Rows, len(strata), rows)
		}
		for _, st := range res.Strata {
			want := strata[st.Label]
			sort.Slice(want, func(i, j int) bool { return want[i].key < want[j].key })
			if st.Count != int64(len(want)) {
				t.Fatalf("stratum %q: count %d, reference %d", st.Label, st.Count, len(want))
			}
			want = want[:min(len(want), spec.Capacity)]
			if len(st.Rows) != len(want) {
				t.Fatalf("stratum %q: %d rows kept, reference %d", st.Label, len(st.Rows), len(want))
			}
			for i := range want {
				if st.Rows[i].ID != want[i].id || st.Rows[i].KeyHex() != want[i].key {
					t.Fatalf("stratum %q row %d: %s, reference %s", st.Label, i, st.Rows[i].ID, want[i].id)
				}
			}
		}
	})
}

// scanBoth scans data with CSV chunks holding quotes read through the
// delimiter masks and through the general line-by-line reader.
func scanBoth(data []byte, capacity, chunk int) (masked, general *ScanResult, errM, errG error) {
	spec := ScanSpec{Name: "q.csv", Format: FormatCSV, Seed: "s", StrataColumns: []string{"g"}, Keep: []string{"score", "text"},
		Capacity: capacity, ChunkSize: chunk, Workers: 2}
	masked, errM = Scan(bytes.NewReader(data), spec)
	spec.lineByLine = true
	general, errG = Scan(bytes.NewReader(data), spec)
	return
}

// sameScan reports how two scan outcomes differ ("" when they do not).
func sameScan(a, b *ScanResult, ea, eb error) string {
	if (ea == nil) != (eb == nil) {
		return fmt.Sprintf("errors %v and %v", ea, eb)
	}
	if ea != nil {
		if ea.Error() != eb.Error() {
			return fmt.Sprintf("errors %q and %q", ea, eb)
		}
		return ""
	}
	if a.Rows != b.Rows || a.InScope != b.InScope || len(a.Strata) != len(b.Strata) || len(a.Duplicates) != len(b.Duplicates) {
		return fmt.Sprintf("rows %d/%d, in scope %d/%d, strata %d/%d, repeats %d/%d", a.Rows, b.Rows, a.InScope, b.InScope, len(a.Strata), len(b.Strata), len(a.Duplicates), len(b.Duplicates))
	}
	for i := range a.Strata {
		x, y := a.Strata[i], b.Strata[i]
		if x.Label != y.Label || x.Count != y.Count || len(x.Rows) != len(y.Rows) {
			return fmt.Sprintf("stratum %q/%q: count %d/%d, kept %d/%d", x.Label, y.Label, x.Count, y.Count, len(x.Rows), len(y.Rows))
		}
		for j := range x.Rows {
			if fmt.Sprint(x.Rows[j]) != fmt.Sprint(y.Rows[j]) {
				return fmt.Sprintf("stratum %q row %d: %v and %v", x.Label, j, x.Rows[j], y.Rows[j])
			}
		}
	}
	return ""
}

// FuzzQuotedCSVMaskedMatchesLineByLine: on CSV with quotes, reading
// through the delimiter masks gives the same result — rows, strata, kept
// rows with their values, repeats, or the same error — as the general
// line-by-line reader.
func FuzzQuotedCSVMaskedMatchesLineByLine(f *testing.F) {
	for _, s := range []string{
		"record_id,g,score,text\na,x,0.1,\"one, two\"\nb,y,0.9,\"say \"\"hi\"\"\"\n\"c\",\"x\",0.3,\"multi\nline\"\r\nd,y,,plain\n",
		"record_id,g,score,text\na,x,0.1,\"open\nb,y,0.2,t\n",
		"record_id,g,score,text\na,x,0.1,bare\"quote\nb,y,0.2,t\n",
		"record_id,g,score,text\na,x,0.1,\"closed\"junk\nb,y,0.2,t\n",
		"record_id,g,score,text\n\"a\"\"1\",x,0.1,t\n\"b\",\"y\"\"z\",0.2,\"\"\n",
		"record_id,g,score,text\na,x,0.1,\"t\"\na,x,0.1,\"t\"\n",
		"record_id,g,score,text\n\"\",x,1,t\n",
	} {
		f.Add([]byte(s), uint8(3), uint16(16))
	}
	f.Fuzz(func(t *testing.T, data []byte, capacity uint8, chunk uint16) {
		m, g, em, eg := scanBoth(data, int(capacity%8)+1, int(chunk%300)+1)
		if d := sameScan(m, g, em, eg); d != "" {
			t.Fatalf("%q: %s", data, d)
		}
	})
}

// TestQuotedCSVMaskedMatchesLineByLine runs the comparison on a generated
// log of 20 000 rows whose text column is quoted, with doubled quotes,
// embedded separators and line ends, at several chunk sizes.
func TestQuotedCSVMaskedMatchesLineByLine(t *testing.T) {
	var b strings.Builder
	b.WriteString("record_id,g,score,text\n")
	for i := 0; i < 20000; i++ {
		id := fmt.Sprintf("r%05d", i)
		if i%97 == 0 {
			id = fmt.Sprintf("\"r%05d\"", i)
		}
		text := fmt.Sprintf("\"note %d, with a comma\"", i)
		switch i % 7 {
		case 1:
			text = fmt.Sprintf("\"said \"\"%d\"\"\"", i)
		case 2:
			text = fmt.Sprintf("\"two\nlines %d\"", i)
		case 3:
			text = "plain"
		}
		fmt.Fprintf(&b, "%s,%s,0.%d,%s\n", id, []string{"x", "\"y\"", "z"}[i%3], i%10, text)
	}
	data := []byte(b.String())
	for _, chunk := range []int{100, 4096, 128 << 10} {
		m, g, em, eg := scanBoth(data, 50, chunk)
		if em != nil {
			t.Fatalf("chunk %d: %v", chunk, em)
		}
		if d := sameScan(m, g, em, eg); d != "" {
			t.Fatalf("chunk %d: %s", chunk, d)
		}
		if m.Rows != 20000 || len(m.Strata) != 3 {
			t.Fatalf("chunk %d: %d rows in %d strata", chunk, m.Rows, len(m.Strata))
		}
	}
}
