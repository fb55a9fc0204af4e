package sampling

import (
	"hash/maphash"

	"probity/sampling/delimscan"
)

// chunkPlain processes a chunk of delimited records that holds no quote
// character (every TSV chunk; CSV chunks without '"'), whose masks of the
// separators and line ends (delimscan) are in w.seps and w.nls. Records
// and the needed fields are cut with bit arithmetic,
// and the separators after the last needed field are only counted — the
// same records and fields as splitting each line.
func (w *worker) chunkPlain(c chunk) {
	data := c.data
	n := len(data)
	seps, nls := w.seps, w.nls
	need := w.s.hotNeed
	last := w.hotLast
	vals := w.vals
	idSlot := w.s.idSlot
	pair := w.keys.pair
	line := c.line
	// A row waiting for a second one, so that both are hashed together;
	// its id and record stay in the chunk until the chunk is done.
	var pst *wstratum
	var pid, prec []byte
	var pline int64
	defer func() {
		if pst != nil {
			k := w.keys.key(pid)
			w.consider(pst, &k, pid, pline, prec)
		}
	}()
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
					// Every needed field is read: count the rest.
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
				rec, id := data[recStart:end], vals[idSlot]
				switch {
				case !pair:
					k := w.keys.key(id)
					w.consider(st, &k, id, line, rec)
				case pst == nil:
					pst, pid, pline, prec = st, id, line, rec
				default:
					ka, kb := w.keys.key2(pid, id)
					w.consider(pst, &ka, pid, pline, prec)
					w.consider(st, &kb, id, line, rec)
					pst = nil
				}
			}
			if c.seq > w.s.errSeq.Load() {
				return
			}
		}
		recStart = nl + 1
	}
}

// stratumTable finds a worker's stratum by label bytes without building a
// string: open addressing on a maphash of the label.
type stratumTable struct {
	seed  maphash.Seed
	slots []*wstratum
	n     int
}

func newStratumTable() stratumTable {
	return stratumTable{seed: maphash.MakeSeed(), slots: make([]*wstratum, 64)}
}

func (t *stratumTable) find(label []byte) *wstratum {
	h := maphash.Bytes(t.seed, label)
	mask := uint64(len(t.slots) - 1)
	for i := h & mask; ; i = (i + 1) & mask {
		e := t.slots[i]
		if e == nil {
			return nil
		}
		if e.hash == h && e.label == string(label) {
			return e
		}
	}
}

func (t *stratumTable) insert(st *wstratum) {
	if 2*(t.n+1) > len(t.slots) {
		old := t.slots
		t.slots = make([]*wstratum, 2*len(old))
		t.n = 0
		for _, e := range old {
			if e != nil {
				t.place(e)
			}
		}
	}
	st.hash = maphash.String(t.seed, st.label)
	t.place(st)
}

func (t *stratumTable) place(st *wstratum) {
	mask := uint64(len(t.slots) - 1)
	i := st.hash & mask
	for t.slots[i] != nil {
		i = (i + 1) & mask
	}
	t.slots[i] = st
	t.n++
}
