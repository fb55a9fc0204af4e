package sampling

import (
	"bytes"
	"compress/gzip"
	"errors"
	"io"
	"strconv"
	"strings"
	"testing"
)

// endless yields fill bytes without end (like /dev/zero) and counts them.
type endless struct {
	fill byte
	n    int64
}

func (e *endless) Read(p []byte) (int, error) {
	for i := range p {
		p[i] = e.fill
	}
	e.n += int64(len(p))
	return len(p), nil
}

// TestLogWithoutLineEnds (issue 16, item 6): a log that never ends a line
// (a link to /dev/zero, a file of one huge line) is refused once the line
// passes the limit, having read a bounded amount; before, the reader grew
// its buffer until memory ran out.
func TestLogWithoutLineEnds(t *testing.T) {
	const limit = 1 << 20
	for _, c := range []struct {
		name string
		src  *endless
		want string
	}{
		{"zeros", &endless{fill: 0}, "log.csv line 1: the line is longer than 1 MiB and holds NUL bytes: this is not a text log"},
		{"text", &endless{fill: 'a'}, "log.csv line 1: the line is longer than 1 MiB"},
	} {
		_, err := Scan(c.src, ScanSpec{Name: "log.csv", Seed: "s", Capacity: 10, MaxLine: limit})
		if err == nil || err.Error() != c.want {
			t.Fatalf("%s: error %v, want %s", c.name, err, c.want)
		}
		if c.src.n > 4*limit {
			t.Errorf("%s: read %d bytes before refusing a line over %d", c.name, c.src.n, limit)
		}
	}
	// Gzip-compressed zeros: the limit applies to the decompressed line.
	var z bytes.Buffer
	zw := gzip.NewWriter(&z)
	zw.Write(make([]byte, 8<<20))
	zw.Close()
	_, err := Scan(&z, ScanSpec{Name: "log.csv.gz", Seed: "s", Capacity: 10, MaxLine: limit})
	if err == nil || !strings.HasPrefix(err.Error(), "log.csv.gz line 1: the line is longer than 1 MiB") {
		t.Fatalf("gzip of zeros: %v", err)
	}
}

// TestLongLineFoundWhateverTheChunks: a line over the limit in the middle
// of a log is refused with its line number whatever the read size, a
// line at the limit is read, and a larger limit reads the long line.
func TestLongLineFoundWhateverTheChunks(t *testing.T) {
	const limit = 4096
	var b strings.Builder
	b.WriteString("record_id,model_a,score,text\n")
	for i := 0; i < 300; i++ {
		text := "t"
		switch i {
		case 100:
			text = strings.Repeat("x", limit-len("r100,ok,0.1,")) // exactly the limit
		case 200:
			text = strings.Repeat("y", limit) // over it
		}
		b.WriteString("r" + strconv.Itoa(i) + ",ok,0.1," + text + "\r\n")
	}
	log := b.String()
	for _, chunk := range []int{512, 1000, 4096, 5000, 1 << 17} {
		_, err := Scan(strings.NewReader(log), ScanSpec{Name: "log.csv", Seed: "s", Capacity: 10, MaxLine: limit, ChunkSize: chunk, Workers: 2})
		want := "log.csv line 202: the line is longer than 4 KiB"
		if err == nil || err.Error() != want || !errors.Is(err, ErrLineTooLong) {
			t.Fatalf("chunk %d: error %v, want %s", chunk, err, want)
		}
		res, err := Scan(strings.NewReader(log), ScanSpec{Name: "log.csv", Seed: "s", Capacity: 10, MaxLine: 2 * limit, ChunkSize: chunk, Workers: 2})
		if err != nil || res.Rows != 300 {
			t.Fatalf("chunk %d, larger limit: %v", chunk, err)
		}
	}
}

// TestQuoteNeverClosed: a CSV quote that is never closed makes one
// record of the rest of the log; it is refused once past the limit, with
// the line where it starts.
func TestQuoteNeverClosed(t *testing.T) {
	var b strings.Builder
	b.WriteString("record_id,model_a,score,text\nr1,ok,0.1,\"open\n")
	for i := 0; i < 2000; i++ {
		b.WriteString("r,ok,0.1,t\n")
	}
	_, err := Scan(strings.NewReader(b.String()), ScanSpec{Name: "log.csv", Seed: "s", Capacity: 10, MaxLine: 4096, ChunkSize: 1024})
	want := "log.csv line 2: the record starting on this line runs past 4 KiB without ending: a quoted field that is never closed?"
	if err == nil || err.Error() != want {
		t.Fatalf("error %v, want %s", err, want)
	}
}

// TestMessagesCutLongValues: a message quotes at most the start of a
// value from the log (a 1 MiB header name, a long band value).
func TestMessagesCutLongValues(t *testing.T) {
	long := strings.Repeat("h", 1<<20)
	_, err := Scan(strings.NewReader(long+",b\nx,y\n"), ScanSpec{Name: "log.csv", Seed: "s", Capacity: 1})
	if err == nil || len(err.Error()) > 400 || !strings.Contains(err.Error(), "… (1048576 bytes)") {
		t.Fatalf("message of %d bytes: %.300s", len(fmtErr(err)), fmtErr(err))
	}
}

func fmtErr(err error) string {
	if err == nil {
		return "<nil>"
	}
	return err.Error()
}

var _ io.Reader = (*endless)(nil)
