package sampling

import (
	"bytes"
	"errors"
	"fmt"
	"io"

	"probity/plan/inputerr"
	"probity/plan/inputfile"
)

// readError turns a read failure into an InputError (a truncated gzip
// stream, most often).
func (s *scanner) readError(err error, lines int64) *inputerr.Error {
	where := ""
	if lines > 0 {
		where = fmt.Sprintf(" after line %d", lines)
	}
	if errors.Is(err, io.ErrUnexpectedEOF) {
		e := inputErrorf(s.spec.Name, 0, "", "the compressed data ends early%s: the file is truncated", where)
		e.Err = err
		e.Hint = "the file was cut short while copying or compressing; fetch it again"
		return e
	}
	e := inputErrorf(s.spec.Name, 0, "", "cannot read the log%s: %v", where, err)
	e.Err = err
	return e
}

// readMore appends to buf from r until buf holds size bytes or r ends.
func readMore(r io.Reader, buf []byte, size int) ([]byte, error) {
	if cap(buf) < size {
		nb := make([]byte, len(buf), size)
		copy(nb, buf)
		buf = nb
	}
	for len(buf) < cap(buf) {
		n, err := r.Read(buf[len(buf):cap(buf)])
		buf = buf[:len(buf)+n]
		if err != nil {
			return buf, err
		}
	}
	return buf, nil
}

// recordEnd returns the end (past the '\n') of the last complete record in
// buf, or 0 when there is none; at EOF the rest of buf is a record.
// For CSV a newline inside a quoted field does not end a record.
func (s *scanner) recordEnd(buf []byte, eof bool) int {
	if eof {
		return len(buf)
	}
	if s.format != FormatCSV && s.format != "" || bytes.IndexByte(buf, '"') < 0 {
		return bytes.LastIndexByte(buf, '\n') + 1
	}
	// A newline is outside quotes when an even number of quote characters
	// precedes it (buf starts outside quotes). Try the last newline first,
	// then the ones before it, counting the quotes between them.
	p := bytes.LastIndexByte(buf, '\n')
	if p < 0 {
		return 0
	}
	odd := bytes.Count(buf[:p], []byte{'"'})%2 == 1
	for odd {
		q := bytes.LastIndexByte(buf[:p], '\n')
		if q < 0 {
			return 0
		}
		odd = odd != (bytes.Count(buf[q:p], []byte{'"'})%2 == 1)
		p = q
	}
	return p + 1
}

// firstRecordEnd returns the end (past the '\n') of the first record in
// buf, 0 when it is incomplete; at EOF the whole of buf may be it.
func (s *scanner) firstRecordEnd(buf []byte, eof bool) int {
	in := false
	for i, c := range buf {
		switch {
		case c == '"' && s.format == FormatCSV:
			in = !in
		case c == '\n' && !in:
			return i + 1
		}
	}
	if eof {
		return len(buf)
	}
	return 0
}

// growTo is the size of the next read buffer when a record does not end
// within n bytes: twice as large, but no larger than is needed to see
// that a record runs past MaxLine (its line end, up to 2 bytes, aside).
func (s *scanner) growTo(n int) int {
	return max(n+1, int(min(2*int64(n), s.spec.MaxLine+2)))
}

// checkLines refuses a line of data, whose first line is line number
// first, that is longer than MaxLine (its line end excluded).
func (s *scanner) checkLines(first int64, data []byte) *inputerr.Error {
	for n := first; len(data) > 0; n++ {
		i := bytes.IndexByte(data, '\n')
		if i < 0 {
			i = len(data)
		}
		if l := trimEOL(data[:i]); int64(len(l)) > s.spec.MaxLine {
			return s.longRecordError(n, l)
		}
		data = data[min(i+1, len(data)):]
	}
	return nil
}

// longRecordError refuses the line (or CSV record) starting at line
// number line, of which data is the start, for being longer than MaxLine.
// Only a line of text that is merely long wraps ErrLineTooLong (raising the
// limit is its fix); a quoted field never closed and a file of NUL bytes
// are not logs with long lines.
func (s *scanner) longRecordError(line int64, data []byte) *inputerr.Error {
	var e *inputerr.Error
	switch {
	case bytes.IndexByte(data, '\n') < 0 && bytes.Count(data[:min(len(data), 1<<16)], []byte{'\r'}) > 1:
		return s.crOnlyError()
	case bytes.IndexByte(data, '\n') >= 0:
		e = inputErrorf(s.spec.Name, int(line), "", "the record starting on this line runs past %s without ending: a quoted field that is never closed?", inputfile.Size(s.spec.MaxLine))
		e.Hint = "a \" opens a quoted field in CSV, which runs to the next \" (line ends included)"
	case bytes.Count(data[:min(len(data), 4096)], []byte{0}) > 64:
		e = inputErrorf(s.spec.Name, int(line), "", "the line is longer than %s and holds NUL bytes: this is not a text log", inputfile.Size(s.spec.MaxLine))
		e.Hint = "give a CSV, TSV or JSON Lines file, optionally gzip-compressed"
	default:
		e = inputErrorf(s.spec.Name, int(line), "", "the line is longer than %s", inputfile.Size(s.spec.MaxLine))
		e.Hint = "a log holds one record per line; if its lines really are this long, raise the limit"
		e.Err = ErrLineTooLong
	}
	return e
}

// trimEOL removes a final "\n" or "\r\n".
func trimEOL(b []byte) []byte {
	b = bytes.TrimSuffix(b, []byte("\n"))
	return bytes.TrimSuffix(b, []byte("\r"))
}

// feed cuts the stream into chunks that end on record boundaries and
// sends them to the workers. It returns the number of lines read.
func (s *scanner) feed(r io.Reader, rest []byte, rerr error, out chan<- chunk, pool chan *[]byte) (int64, *inputerr.Error) {
	line := s.dataLine
	var seq int64
	carry := append([]byte(nil), rest...)
	allocated := 0
	eof := rerr != nil
	if rerr != nil && rerr != io.EOF {
		return line - 1, s.readError(rerr, line-1)
	}
	for {
		if seq > s.errSeq.Load() {
			return line - 1, nil
		}
		var bp *[]byte
		select {
		case bp = <-pool:
		default:
			if allocated < cap(pool) {
				b := make([]byte, 0, s.spec.ChunkSize)
				bp = &b
				allocated++
			} else {
				bp = <-pool
			}
		}
		buf := append((*bp)[:0], carry...)
		var err error
		size := s.spec.ChunkSize
		if len(buf) >= size {
			size = s.growTo(len(buf))
		}
		if !eof {
			buf, err = readMore(r, buf, size)
			if err != nil {
				if err != io.EOF {
					return line - 1, s.readError(err, line-1)
				}
				eof = true
			}
		}
		if len(buf) == 0 {
			pool <- bp
			break
		}
		end := s.recordEnd(buf, eof)
		if end == 0 {
			// No record ends in this buffer: read a bigger one, up to
			// the longest record allowed.
			if int64(len(buf)) > s.spec.MaxLine {
				pool <- bp
				return line - 1, s.longRecordError(line, buf)
			}
			carry = append(carry[:0], buf...)
			*bp = buf[:0]
			pool <- bp
			continue
		}
		if len(buf) > s.spec.ChunkSize || int64(s.spec.ChunkSize) > s.spec.MaxLine {
			// The buffer grew for a long record (or could hold a line
			// over the limit): check its lines.
			if err := s.checkLines(line, buf[:end]); err != nil {
				pool <- bp
				return line - 1, err
			}
		}
		carry = append(carry[:0], buf[end:]...)
		data := buf[:end]
		*bp = buf
		out <- chunk{seq: seq, line: line, data: data, buf: bp}
		seq++
		line += int64(bytes.Count(data, []byte{'\n'}))
		if s.spec.Progress != nil {
			s.spec.Progress(Progress{Bytes: s.ol.raw.n, Lines: line - 1})
		}
		if eof && len(carry) == 0 {
			break
		}
	}
	return line - 1, nil
}
