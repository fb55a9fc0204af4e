package sampling

import (
	"bytes"
	"encoding/json"
	"errors"
	"strconv"
	"unicode/utf8"
	"unsafe"

	"probity/plan/chrono"
	"probity/plan/inputerr"
	"probity/sampling/delimscan"
)

// worker parses, hashes and retains the rows of the chunks it is given.
type worker struct {
	s     *scanner
	split fieldSplitter
	// keepSplit reads the kept columns of a quote-free record that is
	// kept; hotLast is the last column every row needs.
	keepSplit fieldSplitter
	hotLast   int
	json      jsonFields
	vals      [][]byte
	keys      *keyHasher
	label     []byte
	strata    map[string]*wstratum
	table     stratumTable
	// packOK: strata are found by packed value numbers (stratumkey.go).
	packOK  bool
	interns []internTable
	packed  packedTable
	single  *wstratum
	// bandCache remembers the interval of short band values, per band.
	bandCache [][1 << bandCacheBits]shortEntry
	// held is each stratum's kept rows after the pass (finish).
	held map[string][]Row
	// merge is the compaction scratch of the worker's retainers.
	merge []bentry
	// seps, nls and quotes are the delimiter masks of the current chunk;
	// sepS and nlS those outside quoted fields.
	seps, nls, quotes []uint64
	sepS, nlS         []uint64
	// keepQuoted reads the kept columns of a kept record holding quotes.
	keepQuoted fieldSplitter
	rows       int64
	times      chrono.DayCounter
	dups       []dupEvent
	seq        int64
	// tooMany is set once the distinct ids overflowed (reported once).
	tooMany bool
}

type wstratum struct {
	hash  uint64
	label string
	count int64
	ret   *retainer
	// num is the stratum's number in the distinct-id table (Dedupe).
	num int
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
	w.keepSplit = fieldSplitter{sep: w.split.sep, vals: w.vals, noQuotes: true}
	w.keepSplit.setNeed(s.keepNeed)
	w.keepQuoted = fieldSplitter{sep: w.split.sep, quoted: true, vals: w.vals}
	w.keepQuoted.setNeed(s.keepNeed)
	w.hotLast = -1
	for c, sl := range s.hotNeed {
		if sl >= 0 {
			w.hotLast = c
		}
	}
	w.keys = newKeyHasher(s.spec.Seed)
	if len(s.strataSlots) == 0 && len(s.bandSlots) == 0 {
		w.single = w.newStratum(AllStratum)
	}
	w.packOK = len(s.strataSlots)+len(s.bandSlots) <= maxPacked
	w.interns = make([]internTable, len(s.strataSlots))
	return w
}

// finish compacts every retainer of the worker for the last time (which
// reports the last repeats it holds) and keeps their rows, ascending by
// key, in held.
func (w *worker) finish() {
	w.held = make(map[string][]Row, len(w.strata))
	for l, ws := range w.strata {
		w.held[l] = ws.ret.rows(l)
	}
}

// newStratum starts a stratum's count and retainer; repeats the
// retainer finds become the worker's repeat events.
func (w *worker) newStratum(label string) *wstratum {
	st := &wstratum{label: label, ret: newRetainer(w.s.spec.Capacity, &w.merge)}
	if w.s.distinct != nil {
		st.num = w.s.stratumNumber(label)
	}
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
	quotes := false
	if w.s.format != FormatJSONL {
		var seen bool
		w.seps, w.nls, w.quotes, seen = delimscan.Masks(data, w.split.sep, '"', w.seps[:0], w.nls[:0], w.quotes[:0])
		quotes = seen && w.s.format == FormatCSV
		switch {
		case !quotes:
			w.chunkPlain(c)
			return
		case !w.s.spec.lineByLine:
			w.chunkQuoted(c)
			return
		}
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
func (w *worker) record(line int64, rec []byte) *inputerr.Error {
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
		return w.processNow(line, nf)
	}
	return w.processNow(line, -1)
}

// processNow classifies a record whose fields are in w.vals and offers
// it to its stratum at once.
func (w *worker) processNow(line int64, nf int) *inputerr.Error {
	st, err := w.classify(line, nf)
	if st != nil {
		id := w.vals[w.s.idSlot]
		k := w.keys.key(id)
		w.consider(st, &k, id, line, nil, false)
	}
	return err
}

// classify checks one data record whose needed fields are in w.vals, nf
// its number of fields (−1 for JSON Lines, where keys are checked by the
// parser), counts it and returns its stratum, or nil when the record is
// outside the scope (--where).
func (w *worker) classify(line int64, nf int) (*wstratum, *inputerr.Error) {
	s := w.s
	name := s.spec.Name
	if nf >= 0 && nf != len(s.header) {
		return nil, inputErrorf(name, int(line), "", "%d fields, but the header has %d (%s)", nf, len(s.header), columnList(s.header))
	}
	w.rows++
	id := w.vals[s.idSlot]
	if len(id) == 0 {
		return nil, inputErrorf(name, int(line), s.spec.IDColumn, "the record id is empty")
	}
	if !utf8.Valid(id) {
		return nil, notUTF8(name, line, s.spec.IDColumn, "the record id", id)
	}
	for _, f := range s.filters {
		if _, ok := f.set[string(w.vals[f.slot])]; !ok {
			return nil, nil
		}
	}
	if s.timeSlot >= 0 {
		v := w.vals[s.timeSlot]
		sec, ok := chrono.ParseTimestamp(v)
		if !ok {
			e := inputErrorf(name, int(line), s.spec.TimeColumn, "the time %q is not a date or time", v)
			e.Hint = "write times as RFC 3339 (2026-11-30T23:59:07Z), YYYY-MM-DD HH:MM:SS (read as UTC), YYYY-MM-DD or Unix seconds"
			return nil, e
		}
		w.times.Add(sec)
	}
	st := w.single
	var packed uint64
	if st == nil && w.packOK {
		// The fast path: interned values and band indexes, packed.
		for i, sl := range s.strataSlots {
			id, ok := w.interns[i].lookup(w.vals[sl])
			if !ok {
				w.packOK = false
				break
			}
			packed = packed<<16 | uint64(id+1)
		}
		if w.packOK {
			for i, sl := range s.bandSlots {
				idx, err := w.bandIndex(line, i, sl)
				if err != nil {
					return nil, err
				}
				packed = packed<<16 | uint64(idx+1)
			}
			st = w.packed.find(packed)
		}
	}
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
			idx, err := w.bandIndex(line, i, sl)
			if err != nil {
				return nil, err
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
					return nil, inputErrorf(name, int(line), s.spec.StrataColumns[i], "the value %s holds a |, which separates stratum values in labels", quote(v))
				} else if !utf8.Valid(v) {
					return nil, notUTF8(name, line, s.spec.StrataColumns[i], "the stratum value", v)
				}
			}
			if len(w.strata) >= s.spec.MaxStrata {
				e := inputErrorf(name, 0, "", "more than %d strata: the strata columns have too many distinct values to stratify by", s.spec.MaxStrata)
				e.Hint = "stratify by columns with a few categories, or by score bands"
				return nil, e
			}
			st = w.newStratum(string(w.label))
		}
		if w.packOK {
			w.packed.insert(packed, st)
		}
	}
	st.count++
	return st, nil
}

// consider offers a row with this key to its stratum's retainer. rec, when
// not nil, is the record whose kept columns have not been read yet (quoted
// tells whether it holds quote characters); otherwise they are in w.vals.
func (w *worker) consider(st *wstratum, key *hkey, id []byte, line int64, rec []byte, quoted bool) {
	if d := w.s.distinct; d != nil && !d.add(key, line, st.num) && !w.tooMany {
		w.tooMany = true
		w.s.fail(w.seq, w.s.tooManyDistinctError())
		return
	}
	r := st.ret
	if !r.wants(key[0]) || !r.admit(key, line) {
		return
	}
	switch {
	case rec != nil && quoted:
		w.keepQuoted.split(rec)
	case rec != nil:
		w.keepSplit.split(rec)
	}
	a := appendPart(r.arena, id)
	for _, sl := range w.s.keepSlots {
		a = appendPart(a, w.vals[sl])
	}
	r.arena = a
	r.seal()
}

// bandCacheBits is log2 of the entries of each band's value cache.
const bandCacheBits = 15

// bandIndex returns the interval of band i holding the row's value.
// Values of 1 to 7 bytes (most scores as written) are remembered in a
// direct-mapped cache by their bytes, so a repeated value is not parsed
// again; the interval is a function of the bytes alone.
func (w *worker) bandIndex(line int64, i, sl int) (int, *inputerr.Error) {
	v := w.vals[sl]
	word, short := shortWord(v)
	var e *shortEntry
	if short {
		if w.bandCache == nil {
			w.bandCache = make([][1 << bandCacheBits]shortEntry, len(w.s.spec.Bands))
		}
		e = &w.bandCache[i][(word*0x9E3779B97F4A7C15)>>(64-bandCacheBits)]
		if e.word == word {
			return int(e.id), nil
		}
	}
	f, err := parseScore(v)
	b := w.s.spec.Bands[i]
	idx := -1
	if err == nil {
		idx = b.Index(f)
	}
	if idx < 0 {
		what := "is not a number"
		if err == nil {
			what = "is outside [0, 1], the range a band splits"
		}
		return 0, inputErrorf(w.s.spec.Name, int(line), b.Column, "the band value %s %s", quote(v), what)
	}
	if e != nil {
		*e = shortEntry{word: word, id: int32(idx)}
	}
	return idx, nil
}

// parseScore parses a band value without allocating.
func parseScore(v []byte) (float64, error) {
	v = bytes.TrimSpace(v)
	if len(v) == 0 {
		return 0, strconv.ErrSyntax
	}
	return strconv.ParseFloat(unsafe.String(&v[0], len(v)), 64)
}

// notUTF8 refuses a value that is not valid UTF-8: ids and stratum values
// are taken as bytes in every log format, and these bytes must reach the
// worksheet, the ledger and the manifest (JSON) exactly, which only UTF-8
// text can. The message names the first byte that is not.
func notUTF8(file string, line int64, column, what string, v []byte) *inputerr.Error {
	at := 0
	for at < len(v) {
		r, n := utf8.DecodeRune(v[at:])
		if r == utf8.RuneError && n <= 1 {
			break
		}
		at += n
	}
	e := inputErrorf(file, int(line), column, "%s %s is not valid UTF-8 (byte 0x%02x at byte %d)", what, quote(v), v[at], at+1)
	e.Hint = "ids and strata values are kept exactly as bytes; convert the log to UTF-8 (e.g. iconv -f latin1 -t utf-8), and take the ids from the converted log everywhere"
	return e
}

// fieldName names the column at index i of the header, or "".
func fieldName(h []string, i int) string {
	if i >= 0 && i < len(h) {
		return h[i]
	}
	return ""
}
