package sampling

import (
	"bufio"
	"bytes"
	"crypto/sha256"
	"hash"
	"io"
	"path/filepath"
	"strings"

	"github.com/klauspost/compress/gzip"
)

// Log formats.
const (
	FormatCSV   = "csv"
	FormatTSV   = "tsv"
	FormatJSONL = "jsonl"
)

// Compression of a log, as detected from its first bytes.
const (
	CompressionNone = "none"
	CompressionGzip = "gzip"
)

// FormatFromName guesses a log's format from its file name (a .gz suffix
// is ignored): .csv, .tsv/.tab, .jsonl/.ndjson/.json. It returns "" when
// the name says nothing; the content then decides (see sniffFormat).
func FormatFromName(name string) string {
	n := strings.ToLower(name)
	n = strings.TrimSuffix(n, ".gz")
	switch filepath.Ext(n) {
	case ".csv":
		return FormatCSV
	case ".tsv", ".tab":
		return FormatTSV
	case ".jsonl", ".ndjson", ".json":
		return FormatJSONL
	}
	return ""
}

// sniffFormat decides a log's format from its first line: an object
// ('{') is JSON Lines, a line with tabs and no commas TSV, else CSV.
func sniffFormat(first []byte) string {
	t := bytes.TrimLeft(first, " \t\r\n\xef\xbb\xbf")
	if len(t) > 0 && t[0] == '{' {
		return FormatJSONL
	}
	line := t
	if i := bytes.IndexByte(line, '\n'); i >= 0 {
		line = line[:i]
	}
	if bytes.IndexByte(line, '\t') >= 0 && bytes.IndexByte(line, ',') < 0 {
		return FormatTSV
	}
	return FormatCSV
}

// countingHasher hashes and counts the raw bytes of a log as they are read.
type countingHasher struct {
	r io.Reader
	h hash.Hash
	n int64
}

func (c *countingHasher) Read(p []byte) (int, error) {
	n, err := c.r.Read(p)
	if n > 0 {
		c.h.Write(p[:n])
		c.n += int64(n)
	}
	return n, err
}

// openedLog is a log stream ready for the chunker: decompressed if it was
// gzip, with the raw bytes hashed and counted underneath, and the
// decompressed bytes hashed too (content; nil when the log is not
// compressed, its content being its raw bytes).
type openedLog struct {
	raw         *countingHasher
	content     *countingHasher
	r           io.Reader
	compression string
}

// openLog wraps src: the raw bytes are hashed (SHA-256) and counted, and
// gzip is detected by its magic bytes 1f 8b.
func openLog(src io.Reader) (*openedLog, error) {
	raw := &countingHasher{r: src, h: sha256.New()}
	br := bufio.NewReaderSize(raw, 1<<16)
	magic, _ := br.Peek(2)
	if len(magic) == 2 && magic[0] == 0x1f && magic[1] == 0x8b {
		zr, err := gzip.NewReader(br)
		if err != nil {
			return nil, err
		}
		content := &countingHasher{r: zr, h: sha256.New()}
		return &openedLog{raw: raw, content: content, r: content, compression: CompressionGzip}, nil
	}
	return &openedLog{raw: raw, r: br, compression: CompressionNone}, nil
}

// finish drains what is left of the raw stream (so the hash covers the
// whole file, e.g. bytes after a gzip member) and returns its hash and
// size, and the hash of its content (the decompressed bytes).
func (o *openedLog) finish() (sum string, n int64, content string, err error) {
	if _, err := io.Copy(io.Discard, o.raw); err != nil {
		return "", 0, "", err
	}
	sum = hexSum(o.raw.h)
	content = sum
	if o.content != nil {
		content = hexSum(o.content.h)
	}
	return sum, o.raw.n, content, nil
}

func hexSum(h hash.Hash) string {
	const digits = "0123456789abcdef"
	s := h.Sum(nil)
	out := make([]byte, 2*len(s))
	for i, b := range s {
		out[2*i] = digits[b>>4]
		out[2*i+1] = digits[b&15]
	}
	return string(out)
}
