package sampling

import (
	"bytes"
	"errors"
	"io"
	"runtime"
	"sort"
	"sync"
	"sync/atomic"

	"probity/plan/chrono"
	"probity/plan/inputerr"
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
	// TimeColumn, if set, is read on every row in scope as a time
	// (chrono.ParseTimestamp; a value that is not one is an error naming
	// its line), and the result holds the rows per day (ScanResult.Times).
	TimeColumn string
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
	// reporting an error; every stratum then counts distinct ids (the
	// stratum of an id is that of its first row in scope), which needs an
	// entry per distinct id (see distinctSet).
	Dedupe bool
	// MaxDistinct bounds the distinct ids a scan under Dedupe counts (0:
	// DefaultMaxDistinct); a log with more is refused.
	MaxDistinct int64
	// Workers is the number of parsing and hashing goroutines (0: one per
	// CPU).
	Workers int
	// ChunkSize is the read size in bytes (0: 128 KiB, which keeps a chunk
	// in the cache between the reader and the worker that takes it).
	ChunkSize int
	// MaxStrata bounds the number of strata (0: 10 000).
	MaxStrata int
	// MaxLine bounds the bytes of one line of the log, and of one record
	// (a CSV record may span lines inside quotes), line end excluded (0:
	// DefaultMaxLine): memory stays bounded by the sample even for a log
	// without line ends. A longer line is refused (ErrLineTooLong).
	MaxLine int64
	// lineByLine sends CSV chunks holding quotes through the general
	// line-by-line reader instead of the delimiter masks (tests compare
	// the two).
	lineByLine bool
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
	// ContentSHA256 is the SHA-256 of the log's content: its decompressed
	// bytes (SHA256 itself when the log is not compressed), which
	// compressing it again does not change.
	ContentSHA256 string
	// Rows counts data rows; InScope those matching the filters (under
	// Dedupe: the distinct ids among them).
	Rows    int64
	InScope int64
	// Repeats is, under Dedupe, the number of rows in scope dropped as
	// later rows of an id already seen.
	Repeats int64
	Strata  []StratumScan
	// Duplicates are the repeated ids detected, by line.
	Duplicates []Duplicate
	// Times counts the rows in scope by the day of their TimeColumn (nil
	// without one).
	Times *chrono.DayCounter
}

// ErrDuplicateIDs is wrapped by the error for repeated ids without Dedupe.
var ErrDuplicateIDs = errors.New("duplicate record ids")

// DefaultMaxLine is the longest line a log may have unless told
// otherwise.
const DefaultMaxLine = 16 << 20

// ErrLineTooLong is wrapped by the error about a line of text longer than
// ScanSpec.MaxLine.
var ErrLineTooLong = errors.New("a line of the log is longer than the limit")

// ErrIDColumn is the cause of the error about a log without the id column
// the draw was told to use.
var ErrIDColumn = errors.New("the id column is not in the log")

// Scan reads a prediction log in one pass and keeps, per stratum, the
// Capacity rows with the smallest keys, with bounded memory: reading,
// splitting and SHA-256 hashing run on Workers goroutines over chunks of
// the file, each keeping its own candidates, merged at the end.
//
// A repeated id has the same key on every row, so every repeat whose key
// is among the kept rows of its stratum is detected exactly: without
// Dedupe it is an error naming the first few and their lines. (Repeats
// whose key is larger than every kept key cannot change the sample and
// are not seen in one bounded pass.) With Dedupe the first row of each id
// is kept and the others dropped; the stratum counts are then exact
// counts of distinct ids, which costs memory per distinct id (at most
// MaxDistinct of them).
func Scan(src io.Reader, spec ScanSpec) (*ScanResult, error) {
	if spec.Name == "" {
		spec.Name = "log"
	}
	if spec.Workers <= 0 {
		spec.Workers = runtime.GOMAXPROCS(0)
	}
	if spec.ChunkSize <= 0 {
		spec.ChunkSize = 128 << 10
	}
	if spec.MaxStrata <= 0 {
		spec.MaxStrata = 10000
	}
	if spec.IDColumn == "" {
		spec.IDColumn = "record_id"
	}
	if spec.MaxLine <= 0 {
		spec.MaxLine = DefaultMaxLine
	}
	ol, err := openLog(src)
	if err != nil {
		return nil, inputErrorf(spec.Name, 0, "", "cannot read the gzip header: %v", err)
	}
	s := &scanner{spec: spec, ol: ol}
	if spec.Dedupe {
		s.distinct = newDistinctSet(spec.MaxDistinct)
		s.spec.MaxStrata = min(s.spec.MaxStrata, maxDistinctStrata)
	}
	return s.run()
}

// scanner holds one Scan's shared state.
type scanner struct {
	spec ScanSpec
	ol   *openedLog

	format string
	header []string
	// slots: one per distinct column read.
	slotCols []string
	need     []int
	// hotNeed has only the columns every row needs (id, strata, bands,
	// filters); keepNeed only the kept ones, read again from the record
	// bytes for the few rows that are kept.
	hotNeed, keepNeed []int
	idSlot            int
	strataSlots       []int
	bandSlots         []int
	filters           []compiledFilter
	keepSlots         []int
	bandLabels        [][]string
	timeSlot          int   // the TimeColumn's slot, −1 without one
	dataLine          int64 // line number of the first data line

	errSeq atomic.Int64 // lowest chunk seq that failed
	mu     sync.Mutex
	errs   []*inputerr.Error

	// distinct holds every distinct id in scope under Dedupe (else nil);
	// stratumNums numbers the strata for it, by label.
	distinct    *distinctSet
	numMu       sync.Mutex
	stratumNums map[string]int
	numLabels   []string
}

// stratumNumber returns the number of the stratum with this label in the
// distinct-id table, numbering it when new.
func (s *scanner) stratumNumber(label string) int {
	s.numMu.Lock()
	defer s.numMu.Unlock()
	if s.stratumNums == nil {
		s.stratumNums = map[string]int{}
	}
	n, ok := s.stratumNums[label]
	if !ok {
		n = len(s.numLabels)
		s.stratumNums[label] = n
		s.numLabels = append(s.numLabels, label)
	}
	return n
}

// tooManyDistinctError refuses a log with more distinct ids than a scan
// under Dedupe counts.
func (s *scanner) tooManyDistinctError() *inputerr.Error {
	e := inputErrorf(s.spec.Name, 0, "", "more than %d distinct record ids are in scope: removing repeated ids counts every distinct id, and a draw holds at most that many in memory", s.distinct.max)
	e.Err = ErrTooManyDistinct
	e.Hint = "remove the repeated rows before drawing (or draw from a smaller scope), and draw without removing repeats"
	return e
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

func (s *scanner) fail(seq int64, e *inputerr.Error) {
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
		if int64(len(first)) > s.spec.MaxLine {
			return nil, s.longRecordError(1, first)
		}
		first, rerr = readMore(br, first, s.growTo(cap(first)))
	}
	if headerEnd <= 0 {
		headerEnd = len(first)
	}
	if err := s.checkLines(1, first[:headerEnd]); err != nil {
		return nil, err
	}
	headRec := trimEOL(first[:headerEnd])
	if err := s.checkHeaderLine(headRec); err != nil {
		return nil, err
	}
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
				if cap(*c.buf) > 4*s.spec.ChunkSize {
					// Grown for a long record: let it go, so the
					// pool does not keep long buffers.
					*c.buf = make([]byte, 0, s.spec.ChunkSize)
				}
				pool <- c.buf
			}
			w.finish()
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
	sum, n, content, err := s.ol.finish()
	if err != nil {
		return nil, s.readError(err, lines)
	}
	res, err := s.merge(workers)
	if err != nil {
		return nil, err
	}
	res.Header, res.Format, res.Compression, res.SHA256, res.Bytes = s.header, s.format, s.ol.compression, sum, n
	res.ContentSHA256 = content
	if res.Rows == 0 {
		return nil, inputErrorf(s.spec.Name, 0, "", "the log has a header but no rows")
	}
	if res.InScope == 0 {
		e := inputErrorf(s.spec.Name, 0, "", "no row of the %d in the log matches the filter %s", res.Rows, filterList(s.spec.Where))
		e.Hint = "check the filter's values against the log (values are compared exactly, case included)"
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

// checkHeaderLine refuses two layouts a spreadsheet program may save a log
// in, which would otherwise read as one odd header: line ends that are
// carriage returns alone (old Mac files), and CSV fields separated by
// semicolons.
func (s *scanner) checkHeaderLine(h []byte) *inputerr.Error {
	if s.format != FormatJSONL && bytes.IndexByte(h, '\r') >= 0 && bytes.Count(h, []byte{'"'}) == 0 {
		return s.crOnlyError()
	}
	if semis := bytes.Count(h, []byte{';'}); s.format == FormatCSV && semis >= 2 && bytes.Count(h, []byte{','}) < semis {
		e := inputErrorf(s.spec.Name, 1, "", "its fields are separated by ';', not ','")
		e.Hint = "a log is CSV with ',' as the separator, TSV or JSON Lines: save or export it again with ',' (or tabs)"
		return e
	}
	return nil
}

// crOnlyError refuses a log whose line ends are carriage returns alone.
func (s *scanner) crOnlyError() *inputerr.Error {
	e := inputErrorf(s.spec.Name, 0, "", "its line ends are carriage returns alone (\\r, as in old Mac files), so it reads as one line")
	e.Hint = "save it with Unix (LF) or Windows (CRLF) line ends"
	return e
}

// compile resolves the spec's columns against the header.
func (s *scanner) compile() error {
	seen := map[string]int{}
	for i, h := range s.header {
		if _, dup := seen[h]; dup {
			return inputErrorf(s.spec.Name, 1, cut(h), "the header names column %s twice (column %d)", quote(h), i+1)
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
		ie := err.(*inputerr.Error)
		ie.Err, ie.Hint = ErrIDColumn, "name the log's id column"
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
	s.timeSlot = -1
	if s.spec.TimeColumn != "" {
		if s.timeSlot, err = slot(s.spec.TimeColumn, "time"); err != nil {
			return err
		}
	}
	defer s.splitNeeds()
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

// splitNeeds derives hotNeed and keepNeed from need.
func (s *scanner) splitNeeds() {
	hot := map[int]bool{s.idSlot: true}
	for _, sl := range s.strataSlots {
		hot[sl] = true
	}
	for _, sl := range s.bandSlots {
		hot[sl] = true
	}
	if s.timeSlot >= 0 {
		hot[s.timeSlot] = true
	}
	for _, f := range s.filters {
		hot[f.slot] = true
	}
	keep := map[int]bool{}
	for _, sl := range s.keepSlots {
		keep[sl] = true
	}
	s.hotNeed = make([]int, len(s.need))
	s.keepNeed = make([]int, len(s.need))
	for c, sl := range s.need {
		s.hotNeed[c], s.keepNeed[c] = -1, -1
		if sl >= 0 && hot[sl] {
			s.hotNeed[c] = sl
		}
		if sl >= 0 && keep[sl] {
			s.keepNeed[c] = sl
		}
	}
}
