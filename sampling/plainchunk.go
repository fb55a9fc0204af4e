package sampling

import (
	"encoding/binary"
	"hash/maphash"
	"math/bits"
)

// SWAR constants: eight bytes handled at once in a uint64.
const (
	swarLow7 = 0x7f7f7f7f7f7f7f7f
	swarOnes = 0x0101010101010101
)

// zeroBytes sets the high bit of every byte of x that is zero, and only
// of those (no carry crosses bytes, unlike the shorter borrow trick).
func zeroBytes(x uint64) uint64 {
	return ^(((x & swarLow7) + swarLow7) | x | swarLow7)
}

// chunkPlain processes a chunk of delimited records that holds no quote
// character (every TSV chunk; CSV chunks without '"'). It finds
// separators and line ends eight bytes at a time and cuts fields and
// records in the same pass — the same records and fields as splitting
// each line, without a call per field.
func (w *worker) chunkPlain(c chunk) {
	data := c.data
	n := len(data)
	sep := w.split.sep
	sepMask := uint64(sep) * swarOnes
	const nlMask = uint64('\n') * swarOnes
	need := w.s.hotNeed
	last := w.hotLast
	vals := w.vals
	line := c.line
	recStart, fieldStart, nf := 0, 0, 0
	// skip: every needed field of the record is read; the rest of its
	// separators are only counted, a word at a time.
	skip := false
	for i := 0; i < n; {
		base := i
		var ms, mnl uint64
		if i+8 <= n {
			x := binary.LittleEndian.Uint64(data[i:])
			ms = zeroBytes(x ^ sepMask)
			mnl = zeroBytes(x ^ nlMask)
			i += 8
		} else {
			for j := i; j < n; j++ {
				switch data[j] {
				case '\n':
					mnl |= 0x80 << (8 * uint(j-i))
				case sep:
					ms |= 0x80 << (8 * uint(j-i))
				}
			}
			i = n
		}
		m := ms | mnl
		for m != 0 {
			if skip {
				nlm := mnl & m
				if nlm == 0 {
					nf += bits.OnesCount64(ms & m)
					break
				}
				nlbit := nlm & -nlm
				nf += bits.OnesCount64(ms & m & (nlbit - 1))
				m &^= nlbit | (nlbit - 1)
				pos := base + bits.TrailingZeros64(nlbit)>>3
				nf++ // the record's last field
				end := pos
				if data[end-1] == '\r' {
					end--
				}
				if err := w.process(line, nf, data[recStart:end]); err != nil {
					w.s.fail(c.seq, err)
					return
				}
				line++
				recStart, fieldStart, nf, skip = pos+1, pos+1, 0, false
				if c.seq > w.s.errSeq.Load() {
					return
				}
				continue
			}
			bit := m & -m
			pos := base + bits.TrailingZeros64(m)>>3
			m &^= bit
			end := pos
			nl := mnl&bit != 0
			if nl && end > fieldStart && data[end-1] == '\r' {
				end--
			}
			if nf < len(need) {
				if sl := need[nf]; sl >= 0 {
					vals[sl] = data[fieldStart:end]
				}
			}
			nf++
			fieldStart = pos + 1
			if !nl {
				skip = nf > last
				continue
			}
			if end > recStart {
				if err := w.process(line, nf, data[recStart:end]); err != nil {
					w.s.fail(c.seq, err)
					return
				}
			}
			line++
			recStart, nf = pos+1, 0
			if c.seq > w.s.errSeq.Load() {
				return
			}
		}
	}
	if recStart < n {
		// The last record of the log, without a line end.
		end := n
		if data[end-1] == '\r' {
			end--
		}
		if !skip && nf < len(need) {
			if sl := need[nf]; sl >= 0 {
				vals[sl] = data[fieldStart:max(end, fieldStart)]
			}
		}
		nf++
		if end > recStart {
			if err := w.process(line, nf, data[recStart:end]); err != nil {
				w.s.fail(c.seq, err)
			}
		}
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
