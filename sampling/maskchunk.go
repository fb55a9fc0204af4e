package sampling

import (
	"bytes"

	"probity/sampling/delimscan"
)

// chunkPlain processes a chunk of delimited records that holds no quote
// character (every TSV chunk; CSV chunks without '"'), whose masks of
// separators and line ends (delimscan) are in w.seps and w.nls. Records
// and the needed fields are cut with bit arithmetic and the separators
// after the last needed field only counted — the same records and fields
// as splitting each line.
//
// This is the hot loop of every draw; chunkQuoted repeats its shape with
// the quote bookkeeping, which here would cost about 3 % of a draw.
func (w *worker) chunkPlain(c chunk) {
	data := c.data
	n := len(data)
	seps, nls := w.seps, w.nls
	need := w.s.hotNeed
	last := w.hotLast
	vals := w.vals
	idSlot := w.s.idSlot
	line := c.line
	for recStart := 0; recStart < n; line++ {
		nl := delimscan.Next(nls, recStart, n)
		end := nl
		if end > recStart && data[end-1] == '\r' {
			end--
		}
		if end > recStart {
			nf := 0
			for fs := recStart; ; {
				p := delimscan.Next(seps, fs, end)
				if nf < len(need) {
					if sl := need[nf]; sl >= 0 {
						vals[sl] = data[fs:p]
					}
				}
				nf++
				if p == end {
					break
				}
				fs = p + 1
				if nf > last {
					nf += delimscan.Count(seps, fs, end) + 1
					break
				}
			}
			st, err := w.classify(line, nf)
			if err != nil {
				w.s.fail(c.seq, err)
				return
			}
			if st != nil {
				id := vals[idSlot]
				k := w.keys.key(id)
				w.consider(st, &k, id, line, data[recStart:end], false)
			}
			if c.seq > w.s.errSeq.Load() {
				return
			}
		}
		recStart = nl + 1
	}
}

// chunkQuoted is chunkPlain for a CSV chunk holding quote characters:
// separators and line ends inside quoted fields are cleared from the masks
// first (delimscan.OutsideQuotes), so a record may span several lines; a
// record holding quotes has each quoted field checked (RFC 4180: "…" with
// inner quotes doubled) and its needed fields unquoted in place. A record
// this cannot take — a malformed field, or a needed field with doubled
// quotes to undo — goes to the general record reader, which also words
// its errors.
func (w *worker) chunkQuoted(c chunk) {
	data := c.data
	n := len(data)
	w.sepS = append(w.sepS[:0], w.seps...)
	w.nlS = append(w.nlS[:0], w.nls...)
	delimscan.OutsideQuotes(w.quotes, w.sepS, w.nlS)
	seps, nls := w.sepS, w.nlS
	w.split.noQuotes = false
	need := w.s.hotNeed
	last := w.hotLast
	vals := w.vals
	idSlot := w.s.idSlot
	line := c.line
	for recStart := 0; recStart < n; {
		nl := delimscan.Next(nls, recStart, n)
		end := nl
		if end > recStart && data[end-1] == '\r' {
			end--
		}
		phys := 1 + int64(delimscan.Count(w.nls, recStart, nl))
		if end > recStart {
			hasQuotes := delimscan.Count(w.quotes, recStart, end) > 0
			nf, ok := 0, true
			if hasQuotes {
				nf, ok = w.quotedFields(data, recStart, end)
			} else {
				for fs := recStart; ; {
					p := delimscan.Next(seps, fs, end)
					if nf < len(need) {
						if sl := need[nf]; sl >= 0 {
							vals[sl] = data[fs:p]
						}
					}
					nf++
					if p == end {
						break
					}
					fs = p + 1
					if nf > last {
						// Every needed field is read: count the rest.
						nf += delimscan.Count(seps, fs, end) + 1
						break
					}
				}
			}
			if !ok {
				if err := w.record(line, data[recStart:end]); err != nil {
					w.s.fail(c.seq, err)
					return
				}
			} else {
				st, err := w.classify(line, nf)
				if err != nil {
					w.s.fail(c.seq, err)
					return
				}
				if st != nil {
					id := vals[idSlot]
					k := w.keys.key(id)
					w.consider(st, &k, id, line, data[recStart:end], hasQuotes)
				}
			}
			if c.seq > w.s.errSeq.Load() {
				return
			}
		}
		line += phys
		recStart = nl + 1
	}
}

// quotedFields cuts the fields of the record data[recStart:end], which
// holds quote characters, at the separators outside quotes (w.sepS) and
// sets the needed ones every row reads; it returns the number of fields,
// or ok false when a field is not well formed or a needed field has
// doubled quotes to undo.
func (w *worker) quotedFields(data []byte, recStart, end int) (nf int, ok bool) {
	need := w.s.hotNeed
	for fs := recStart; ; {
		p := delimscan.Next(w.sepS, fs, end)
		val := data[fs:p]
		if delimscan.Count(w.quotes, fs, p) > 0 {
			if p-fs < 2 || data[fs] != '"' || data[p-1] != '"' {
				return 0, false
			}
			inner := data[fs+1 : p-1]
			doubled := false
			for i := 0; ; {
				j := bytes.IndexByte(inner[i:], '"')
				if j < 0 {
					break
				}
				if i+j+1 >= len(inner) || inner[i+j+1] != '"' {
					return 0, false
				}
				doubled = true
				i += j + 2
			}
			if doubled && nf < len(need) && need[nf] >= 0 {
				return 0, false
			}
			val = inner
		}
		if nf < len(need) {
			if sl := need[nf]; sl >= 0 {
				w.vals[sl] = val
			}
		}
		nf++
		if p == end {
			return nf, true
		}
		fs = p + 1
	}
}
