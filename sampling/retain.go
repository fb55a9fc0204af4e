package sampling

import (
	"bytes"
	"encoding/binary"
	"encoding/hex"
	"slices"
)

// Row is a log row kept by the selection: its key, where it was read, its
// id, its stratum and the values of the columns the draw keeps (the shown
// columns and the candidates' columns).
type Row struct {
	Key     [32]byte
	Line    int64
	ID      string
	Stratum string
	Values  []string
}

// KeyHex is the row's key as 64 lowercase hex digits.
func (r *Row) KeyHex() string { return hex.EncodeToString(r.Key[:]) }

// keyLess orders keys as unsigned big-endian numbers, which is the same
// as ordering their hex strings.
func keyLess(a, b *[32]byte) bool { return bytes.Compare(a[:], b[:]) < 0 }

// hkey is a key as four big-endian words, compared word by word.
type hkey [4]uint64

func toHKey(k *[32]byte) hkey {
	return hkey{binary.BigEndian.Uint64(k[0:]), binary.BigEndian.Uint64(k[8:]),
		binary.BigEndian.Uint64(k[16:]), binary.BigEndian.Uint64(k[24:])}
}

func (h *hkey) bytes() [32]byte {
	var k [32]byte
	for i, w := range h {
		binary.BigEndian.PutUint64(k[8*i:], w)
	}
	return k
}

func (h *hkey) less(o *hkey) bool {
	if h[0] != o[0] {
		return h[0] < o[0]
	}
	if h[1] != o[1] {
		return h[1] < o[1]
	}
	if h[2] != o[2] {
		return h[2] < o[2]
	}
	return h[3] < o[3]
}

// slotData holds one kept row's bytes: the id then each kept value,
// ends[i] being the end of part i. Its buffers are reused when the row is
// pushed out, so keeping rows allocates nothing once the heap is full and
// the buffers have grown to the longest row.
type slotData struct {
	line int64
	data []byte
	ends []int32
}

func (s *slotData) part(i int) []byte {
	start := int32(0)
	if i > 0 {
		start = s.ends[i-1]
	}
	return s.data[start:s.ends[i]]
}

// bentry is a candidate: the key inline and the slot holding the row.
type bentry struct {
	k    hkey
	slot int32
}

func (h *hkey) cmp(o *hkey) int {
	for i := range h {
		if h[i] != o[i] {
			if h[i] < o[i] {
				return -1
			}
			return 1
		}
	}
	return 0
}

// retainer keeps the rows with the smallest keys of one stratum, at most
// cap of them. Rows whose key is at most the current threshold (the
// cap-th smallest key at the last compaction) are appended to a buffer;
// when it holds 2·cap rows it is sorted, repeated keys are resolved, and
// only the cap smallest are kept. Each row costs an append (amortised
// O(1), memory read in order) instead of a heap sift; a row's buffers are
// reused once it is dropped, so keeping rows allocates nothing in the
// steady state.
//
// A key equal to another is a repeated id (SHA-256 collisions aside): the
// copy on the earlier line is kept and the repeat reported, so repeats
// never take the place of other rows.
type retainer struct {
	cap   int
	buf   []bentry
	slots []slotData
	free  []int32
	// thr is the threshold once full is set.
	thr  hkey
	full bool
	// evicted is true once a row has been dropped or refused: from then on
	// the kept rows are exactly those with keys ≤ the largest kept.
	evicted bool
	// onDup receives each repeat found (set by the owner).
	onDup func(k *hkey, kept, other *slotData)
}

func newRetainer(capacity int) *retainer {
	return &retainer{cap: capacity}
}

// wants reports whether a key with first word head could enter (admit
// makes the exact decision).
func (r *retainer) wants(head uint64) bool {
	return !r.full || head <= r.thr[0]
}

// admit returns the slot the caller must fill with the row of key, or nil
// when the key is above the threshold. The caller calls settle after
// filling.
func (r *retainer) admit(key *[32]byte) *slotData {
	k := toHKey(key)
	if r.cap == 0 || (r.full && r.thr.less(&k)) {
		r.evicted = true
		return nil
	}
	var slot int32
	if n := len(r.free); n > 0 {
		slot = r.free[n-1]
		r.free = r.free[:n-1]
	} else {
		slot = int32(len(r.slots))
		r.slots = append(r.slots, slotData{})
	}
	r.buf = append(r.buf, bentry{k, slot})
	return &r.slots[slot]
}

// settle compacts the buffer when it has reached twice the capacity.
func (r *retainer) settle() {
	if len(r.buf) >= 2*r.cap {
		r.compact()
	}
}

// compact sorts the buffer, resolves repeated keys (the earlier line is
// kept) and keeps the cap smallest keys.
func (r *retainer) compact() {
	b := r.buf
	slices.SortFunc(b, func(x, y bentry) int {
		if c := x.k.cmp(&y.k); c != 0 {
			return c
		}
		return cmpInt64(r.slots[x.slot].line, r.slots[y.slot].line)
	})
	out := b[:0]
	for i := range b {
		if len(out) > 0 && out[len(out)-1].k == b[i].k {
			if r.onDup != nil {
				r.onDup(&b[i].k, &r.slots[out[len(out)-1].slot], &r.slots[b[i].slot])
			}
			r.free = append(r.free, b[i].slot)
			continue
		}
		out = append(out, b[i])
	}
	if len(out) > r.cap {
		for _, e := range out[r.cap:] {
			r.free = append(r.free, e.slot)
		}
		out = out[:r.cap]
		r.evicted = true
	}
	r.buf = out
	if len(out) == r.cap && r.cap > 0 {
		r.thr = out[len(out)-1].k
		r.full = true
	}
}

func cmpInt64(a, b int64) int {
	switch {
	case a < b:
		return -1
	case a > b:
		return 1
	}
	return 0
}

// rows compacts and returns the kept rows, ascending by key, as Rows of
// the stratum.
func (r *retainer) rows(stratum string) []Row {
	r.compact()
	out := make([]Row, len(r.buf))
	for i, e := range r.buf {
		s := &r.slots[e.slot]
		row := Row{Key: e.k.bytes(), Line: s.line, ID: string(s.part(0)), Stratum: stratum, Values: make([]string, len(s.ends)-1)}
		for j := range row.Values {
			row.Values[j] = string(s.part(j + 1))
		}
		out[i] = row
	}
	return out
}
