package sampling

import (
	"bytes"
	"crypto/sha256"
	"encoding/binary"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"runtime"
	"sort"
	"strconv"
	"sync"
	"sync/atomic"
	"unsafe"
)

// ScanSpec says what Scan reads from a log and how it selects.
type ScanSpec struct {
	// Name names the log in messages ("stdin" for -).
	Name string
	// Format is csv, tsv or jsonl; "" decides from Name, then content.
	Format string
	// Seed is the selection seed: key = SHA-256("<Seed>:<id>").
	Seed string
	// IDColumn holds the record id.
	IDColumn string
	// StrataColumns and Bands define the strata (label: values joined
	// with "|", strata columns first, then bands, in the order given).
	StrataColumns []string
	Bands         []Band
	// Where keeps only the rows matching every filter (the scope).
	Where []Filter
	// Keep lists the columns whose values are kept for selected rows;
	// KeepRoles, if set, names their roles in messages ("shown",
	// "candidate NAME").
	Keep      []string
	KeepRoles []string
	// Capacity is how many rows with the smallest keys are kept per
	// stratum; it must be at least the largest n_h + spares any
	// allocation can give (n + spare is always enough).
	Capacity int
	// Dedupe keeps the first occurrence of a repeated id instead of
	// reporting an error.
	Dedupe bool
	// Workers is the number of parsing and hashing goroutines (0: one per
	// CPU).
	Workers int
	// ChunkSize is the read size in bytes (0: 1 MiB).
	ChunkSize int
	// MaxStrata bounds the number of strata (0: 10 000).
	MaxStrata int
	// Progress, if set, is called from the reading goroutine after each
	// chunk with the bytes read so far (of the raw, possibly compressed
	// file) and the lines.
	Progress func(Progress)
}

// Progress is a progress report of Scan.
type Progress struct {
	Bytes int64
	Lines int64
}

// Duplicate is an id found on more than one row among the rows that could
// be drawn.
type Duplicate struct {
	ID        string
	Stratum   string
	FirstLine int64 // the copy kept under --dedupe first
	Line      int64 // the later copy
}

// StratumScan is one stratum after the pass: its population and its rows
// with the smallest keys, ascending (at most Capacity).
type StratumScan struct {
	Label string
	Count int64
	Rows  []Row
}

// ScanResult is what Scan read.
type ScanResult struct {
	Header      []string
	Format      string
	Compression string
	SHA256      string
	Bytes       int64
	// Rows counts data rows; InScope those matching the filters (after
	// dropping detected repeats under Dedupe).
	Rows    int64
	InScope int64
	Strata  []StratumScan
	// Duplicates are the repeated ids detected, by line.
	Duplicates []Duplicate
}

// ErrDuplicateIDs is wrapped by the error for repeated ids without Dedupe.
var ErrDuplicateIDs = errors.New("duplicate record ids")

// Scan reads a prediction log in one pass and keeps, per stratum, the
// Capacity rows with the smallest keys, with bounded memory: reading,
// splitting and SHA-256 hashing run on Workers goroutines over chunks of
// the file, each keeping its own heaps, merged at the end.
//
// A repeated id has the same key on every row, so every repeat whose key
// is among the kept rows of its stratum is detected exactly: without
// Dedupe it is an error naming the first few and their lines; with Dedupe
// the first occurrence is kept and the stratum count excludes the
// repeats. (Repeats whose key is larger than every kept key cannot change
// the sample and are not seen in one bounded pass.)
func Scan(src io.Reader, spec ScanSpec) (*ScanResult, error) {
	if spec.Name == "" {
		spec.Name = "log"
	}
	if spec.Workers <= 0 {
		spec.Workers = runtime.GOMAXPROCS(0)
	}
	if spec.ChunkSize <= 0 {
		spec.ChunkSize = 1 << 20
	}
	if spec.MaxStrata <= 0 {
		spec.MaxStrata = 10000
	}
	if spec.IDColumn == "" {
		spec.IDColumn = "record_id"
	}
	ol, err := openLog(src)
	if err != nil {
		return nil, inputErrorf(spec.Name, 0, "", "cannot read the gzip header: %v", err)
	}
	s := &scanner{spec: spec, ol: ol}
	return s.run()
}

// scanner holds one Scan's shared state.
type scanner struct {
	spec ScanSpec
	ol   *openedLog

	format string
	header []string
	// slots: one per distinct column read.
	slotCols    []string
	need        []int
	idSlot      int
	strataSlots []int
	bandSlots   []int
	filters     []compiledFilter
	keepSlots   []int
	bandLabels  [][]string
	dataLine    int64 // line number of the first data line

	errSeq atomic.Int64 // lowest chunk seq that failed
	mu     sync.Mutex
	errs   []*InputError
}

type compiledFilter struct {
	slot int
	set  map[string]struct{}
}

type chunk struct {
	seq  int64
	line int64 // line number of the chunk's first line
	data []byte
	buf  *[]byte
}

func (s *scanner) fail(seq int64, e *InputError) {
	s.mu.Lock()
	s.errs = append(s.errs, e)
	s.mu.Unlock()
	for {
		cur := s.errSeq.Load()
		if seq >= cur || s.errSeq.CompareAndSwap(cur, seq) {
			return
		}
	}
}

func (s *scanner) run() (*ScanResult, error) {
	s.errSeq.Store(1 << 62)
	br := s.ol.r
	first := make([]byte, 0, s.spec.ChunkSize)
	first, rerr := readMore(br, first, s.spec.ChunkSize)
	first = bytes.TrimPrefix(first, []byte("\xef\xbb\xbf"))
	if len(bytes.TrimSpace(first)) == 0 && rerr != nil {
		if rerr != io.EOF {
			return nil, s.readError(rerr, 0)
		}
		return nil, inputErrorf(s.spec.Name, 0, "", "the log is empty")
	}
	s.format = s.spec.Format
	if s.format == "" {
		s.format = FormatFromName(s.spec.Name)
	}
	if s.format == "" {
		s.format = sniffFormat(first)
	}
	// The header: the first record (CSV/TSV), or the first object's keys.
	var headerEnd int
	for {
		headerEnd = s.firstRecordEnd(first, rerr != nil)
		if headerEnd > 0 || rerr != nil {
			break
		}
		first, rerr = readMore(br, first, 2*cap(first))
	}
	if headerEnd <= 0 {
		headerEnd = len(first)
	}
	headRec := trimEOL(first[:headerEnd])
	var err error
	switch s.format {
	case FormatJSONL:
		s.header, err = jsonKeys(headRec)
		s.dataLine = 1
	case FormatTSV:
		s.header, err = splitAll(headRec, '\t', false)
		s.dataLine = 2
	default:
		s.header, err = splitAll(headRec, ',', true)
		s.dataLine = 2
	}
	if err != nil {
		return nil, inputErrorf(s.spec.Name, 1, "", "cannot read the header: %v", err)
	}
	if err := s.compile(); err != nil {
		return nil, err
	}
	rest := first
	if s.format != FormatJSONL {
		rest = first[headerEnd:]
	}

	chunks := make(chan chunk, 2*s.spec.Workers)
	// A fixed set of read buffers, recycled: nothing is allocated per
	// chunk, so the garbage collector has next to nothing to do.
	// (allocated as needed, at most cap(pool) of them).
	pool := make(chan *[]byte, 2*s.spec.Workers+2)
	workers := make([]*worker, s.spec.Workers)
	var wg sync.WaitGroup
	for i := range workers {
		workers[i] = s.newWorker()
		wg.Add(1)
		go func(w *worker) {
			defer wg.Done()
			for c := range chunks {
				if c.seq <= s.errSeq.Load() {
					w.chunk(c)
				}
				*c.buf = (*c.buf)[:0]
				pool <- c.buf
			}
		}(workers[i])
	}
	lines, readErr := s.feed(br, rest, rerr, chunks, pool)
	close(chunks)
	wg.Wait()
	if len(s.errs) > 0 {
		// The first bad row in file order; errors about the whole log
		// (line 0) after those about a row.
		sort.SliceStable(s.errs, func(i, j int) bool {
			a, b := s.errs[i].Line, s.errs[j].Line
			if (a == 0) != (b == 0) {
				return b == 0
			}
			return a < b
		})
		return nil, s.errs[0]
	}
	if readErr != nil {
		return nil, readErr
	}
	sum, n, err := s.ol.finish()
	if err != nil {
		return nil, s.readError(err, lines)
	}
	res, err := s.merge(workers)
	if err != nil {
		return nil, err
	}
	res.Header, res.Format, res.Compression, res.SHA256, res.Bytes = s.header, s.format, s.ol.compression, sum, n
	if res.Rows == 0 {
		return nil, inputErrorf(s.spec.Name, 0, "", "the log has a header but no rows")
	}
	if res.InScope == 0 {
		e := inputErrorf(s.spec.Name, 0, "", "no row of the %d in the log matches the filter %s", res.Rows, filterList(s.spec.Where))
		e.Hint = "check the --where values against the log (values are compared exactly, case included)"
		return nil, e
	}
	return res, nil
}

func filterList(fs []Filter) string {
	var b bytes.Buffer
	for i, f := range fs {
		if i > 0 {
			b.WriteString(" and ")
		}
		b.WriteString(f.String())
	}
	return b.String()
}

// readError turns a read failure into an InputError (a truncated gzip
// stream, most often).
func (s *scanner) readError(err error, lines int64) *InputError {
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
	in := false
	last := 0
	for i, c := range buf {
		switch c {
		case '"':
			in = !in
		case '\n':
			if !in {
				last = i + 1
			}
		}
	}
	return last
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

// trimEOL removes a final "\n" or "\r\n".
func trimEOL(b []byte) []byte {
	b = bytes.TrimSuffix(b, []byte("\n"))
	return bytes.TrimSuffix(b, []byte("\r"))
}

// feed cuts the stream into chunks that end on record boundaries and
// sends them to the workers. It returns the number of lines read.
func (s *scanner) feed(r io.Reader, rest []byte, rerr error, out chan<- chunk, pool chan *[]byte) (int64, *InputError) {
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
			size = 2 * len(buf)
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
			// No record ends in this buffer: read a bigger one.
			carry = append(carry[:0], buf...)
			*bp = buf[:0]
			pool <- bp
			continue
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

// compile resolves the spec's columns against the header.
func (s *scanner) compile() error {
	seen := map[string]int{}
	for i, h := range s.header {
		if _, dup := seen[h]; dup {
			return inputErrorf(s.spec.Name, 1, h, "the header names column %q twice (column %d)", h, i+1)
		}
		seen[h] = i
	}
	s.need = make([]int, len(s.header))
	for i := range s.need {
		s.need[i] = -1
	}
	slot := func(col, role string) (int, error) {
		c, ok := seen[col]
		if !ok {
			e := inputErrorf(s.spec.Name, 1, col, "the %s column %q is not in the log; its columns are: %s", role, col, columnList(s.header))
			return 0, e
		}
		if s.need[c] < 0 {
			s.need[c] = len(s.slotCols)
			s.slotCols = append(s.slotCols, col)
		}
		return s.need[c], nil
	}
	var err error
	if s.idSlot, err = slot(s.spec.IDColumn, "id"); err != nil {
		err.(*InputError).Hint = "name the id column with --id COLUMN"
		return err
	}
	for _, c := range s.spec.StrataColumns {
		sl, err := slot(c, "strata")
		if err != nil {
			return err
		}
		s.strataSlots = append(s.strataSlots, sl)
	}
	for _, b := range s.spec.Bands {
		sl, err := slot(b.Column, "band")
		if err != nil {
			return err
		}
		s.bandSlots = append(s.bandSlots, sl)
		s.bandLabels = append(s.bandLabels, b.Labels())
	}
	for _, f := range s.spec.Where {
		sl, err := slot(f.Column, "filter")
		if err != nil {
			return err
		}
		cf := compiledFilter{slot: sl, set: map[string]struct{}{}}
		for _, v := range f.Values {
			cf.set[v] = struct{}{}
		}
		s.filters = append(s.filters, cf)
	}
	for i, c := range s.spec.Keep {
		role := "kept"
		if i < len(s.spec.KeepRoles) {
			role = s.spec.KeepRoles[i]
		}
		sl, err := slot(c, role)
		if err != nil {
			return err
		}
		s.keepSlots = append(s.keepSlots, sl)
	}
	return nil
}

// worker parses, hashes and retains the rows of the chunks it is given.
type worker struct {
	s       *scanner
	split   fieldSplitter
	json    jsonFields
	vals    [][]byte
	hbuf    []byte
	plen    int
	label   []byte
	strata  map[string]*wstratum
	table   stratumTable
	single  *wstratum
	rows    int64
	dups    []dupEvent
	seq     int64
	tooMany bool
}

type wstratum struct {
	hash  uint64
	label string
	count int64
	ret   *retainer
}

type dupEvent struct {
	key     [32]byte
	stratum string
	id      string
	kept    int64
	other   int64
}

func (s *scanner) newWorker() *worker {
	w := &worker{s: s, strata: map[string]*wstratum{}, table: newStratumTable()}
	w.vals = make([][]byte, len(s.slotCols))
	switch s.format {
	case FormatJSONL:
		w.json = jsonFields{names: s.slotCols, vals: w.vals, obj: map[string]json.RawMessage{}}
	case FormatTSV:
		w.split = fieldSplitter{sep: '\t', vals: w.vals}
		w.split.setNeed(s.need)
	default:
		w.split = fieldSplitter{sep: ',', quoted: true, vals: w.vals}
		w.split.setNeed(s.need)
	}
	w.hbuf = append([]byte(s.spec.Seed), ':')
	w.plen = len(w.hbuf)
	if len(s.strataSlots) == 0 && len(s.bandSlots) == 0 {
		w.single = w.newStratum(AllStratum)
	}
	return w
}

// newStratum starts a stratum's count and retainer; repeats the
// retainer finds become the worker's repeat events.
func (w *worker) newStratum(label string) *wstratum {
	st := &wstratum{label: label, ret: newRetainer(w.s.spec.Capacity)}
	st.ret.onDup = func(k *hkey, id []byte, kept, other int64) {
		w.dups = append(w.dups, dupEvent{key: k.bytes(), stratum: label, id: string(id), kept: kept, other: other})
	}
	w.strata[label] = st
	w.table.insert(st)
	return st
}

// chunk processes one chunk of records.
func (w *worker) chunk(c chunk) {
	w.seq = c.seq
	data := c.data
	line := c.line
	quotes := w.s.format == FormatCSV && bytes.IndexByte(data, '"') >= 0
	if w.s.format != FormatJSONL && !quotes {
		w.chunkPlain(c)
		return
	}
	w.split.noQuotes = !quotes
	for len(data) > 0 {
		nl := bytes.IndexByte(data, '\n')
		var rec []byte
		phys := int64(1)
		if nl < 0 {
			rec, data = data, nil
		} else {
			rec, data = data[:nl], data[nl+1:]
		}
		if quotes && bytes.IndexByte(rec, '"') >= 0 {
			// A quoted field may hold newlines: extend the record.
			for quotesOpen(rec) && len(data) > 0 {
				nl2 := bytes.IndexByte(data, '\n')
				if nl2 < 0 {
					nl2 = len(data)
				}
				rec = rec[:len(rec)+1+nl2]
				phys++
				if nl2 == len(data) {
					data = nil
				} else {
					data = data[nl2+1:]
				}
			}
		}
		if n := len(rec); n > 0 && rec[n-1] == '\r' {
			rec = rec[:n-1]
		}
		if len(rec) > 0 {
			if err := w.record(line, rec); err != nil {
				w.s.fail(c.seq, err)
				return
			}
		}
		line += phys
		if c.seq > w.s.errSeq.Load() {
			return
		}
	}
}

// record handles one data record.
func (w *worker) record(line int64, rec []byte) *InputError {
	s := w.s
	name := s.spec.Name
	switch s.format {
	case FormatJSONL:
		if err := w.json.parse(rec); err != nil {
			col := ""
			var ve *jsonValueError
			if errors.As(err, &ve) {
				col = ve.key
			}
			return inputErrorf(name, int(line), col, "%v", err)
		}
	default:
		nf, err := w.split.split(rec)
		if err != nil {
			return inputErrorf(name, int(line), fieldName(s.header, nf), "%v", err)
		}
		return w.process(line, nf)
	}
	return w.process(line, -1)
}

// process handles one data record whose needed fields are in w.vals; nf
// is its number of fields (−1 for JSON Lines, where keys are checked by
// the parser).
func (w *worker) process(line int64, nf int) *InputError {
	s := w.s
	name := s.spec.Name
	if nf >= 0 && nf != len(s.header) {
		return inputErrorf(name, int(line), "", "%d fields, but the header has %d (%s)", nf, len(s.header), columnList(s.header))
	}
	w.rows++
	id := w.vals[s.idSlot]
	if len(id) == 0 {
		return inputErrorf(name, int(line), s.spec.IDColumn, "the record id is empty")
	}
	for _, f := range s.filters {
		if _, ok := f.set[string(w.vals[f.slot])]; !ok {
			return nil
		}
	}
	st := w.single
	if st == nil {
		w.label = w.label[:0]
		for i, sl := range s.strataSlots {
			v := w.vals[sl]
			if i > 0 {
				w.label = append(w.label, '|')
			}
			w.label = append(w.label, v...)
		}
		for i, sl := range s.bandSlots {
			v := w.vals[sl]
			f, err := parseScore(v)
			b := s.spec.Bands[i]
			idx := -1
			if err == nil {
				idx = b.Index(f)
			}
			if idx < 0 {
				what := "is not a number"
				if err == nil {
					what = "is outside [0, 1], the range a band splits"
				}
				return inputErrorf(name, int(line), b.Column, "the band value %q %s", v, what)
			}
			if len(s.strataSlots) > 0 || i > 0 {
				w.label = append(w.label, '|')
			}
			w.label = append(w.label, s.bandLabels[i][idx]...)
		}
		st = w.table.find(w.label)
		if st == nil {
			// A new stratum: its values must not hold the separator, or
			// two different value lists could share a label.
			for i, sl := range s.strataSlots {
				if v := w.vals[sl]; bytes.IndexByte(v, '|') >= 0 {
					return inputErrorf(name, int(line), s.spec.StrataColumns[i], "the value %q holds a |, which separates stratum values in labels", v)
				}
			}
			if len(w.strata) >= s.spec.MaxStrata {
				e := inputErrorf(name, 0, "", "more than %d strata: the strata columns have too many distinct values to stratify by", s.spec.MaxStrata)
				e.Hint = "stratify by columns with a few categories, or by score bands (--band)"
				return e
			}
			st = w.newStratum(string(w.label))
		}
	}
	st.count++
	w.hbuf = append(w.hbuf[:w.plen], id...)
	key := sha256.Sum256(w.hbuf)
	if !st.ret.wants(binary.BigEndian.Uint64(key[:8])) {
		return nil
	}
	if r := st.ret; r.admit(&key, line) {
		a := appendPart(r.arena, id)
		for _, sl := range s.keepSlots {
			a = appendPart(a, w.vals[sl])
		}
		r.arena = a
		r.seal()
	}
	return nil
}

// parseScore parses a band value without allocating.
func parseScore(v []byte) (float64, error) {
	v = bytes.TrimSpace(v)
	if len(v) == 0 {
		return 0, strconv.ErrSyntax
	}
	return strconv.ParseFloat(unsafe.String(&v[0], len(v)), 64)
}

// fieldName names the column at index i of the header, or "".
func fieldName(h []string, i int) string {
	if i >= 0 && i < len(h) {
		return h[i]
	}
	return ""
}
