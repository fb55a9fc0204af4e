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

// appendPart appends one field to a row record: a 4-byte little-endian
// length, then the bytes.
func appendPart(a []byte, v []byte) []byte {
	a = binary.LittleEndian.AppendUint32(a, uint32(len(v)))
	return append(a, v...)
}

// rowParts splits a row record into its fields (id first).
func rowParts(rec []byte) [][]byte {
	var out [][]byte
	for len(rec) >= 4 {
		n := binary.LittleEndian.Uint32(rec)
		out = append(out, rec[4:4+n])
		rec = rec[4+n:]
	}
	return out
}

// bentry is a candidate row: its key inline, its line, and where its
// record lies in the retainer's arena.
type bentry struct {
	k    hkey
	line int64
	off  int32
	n    int32
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
// cap of them. A row whose key is at most the threshold (the cap-th
// smallest key at the last compaction) is appended — its entry to buf, its
// fields to arena, both written in order, so memory is touched
// sequentially. When buf holds 2·cap rows it is sorted, repeated keys are
// resolved, only the cap smallest are kept and the arena is rewritten
// into its spare twin. Nothing is allocated once both have grown.
//
// A key equal to another is a repeated id (SHA-256 collisions aside): the
// copy on the earlier line is kept and the repeat reported, so repeats
// never take the place of other rows.
type retainer struct {
	cap int
	// buf holds the candidates: the first sorted of them in (key, line)
	// order (those kept by the last compaction), then those admitted
	// since; merged is the compaction's scratch, shared by the retainers
	// of one goroutine.
	buf          []bentry
	sorted       int
	merged       *[]bentry
	arena, spare []byte
	// thr is the threshold once full is set.
	thr  hkey
	full bool
	// evicted is true once a row has been dropped or refused: from then on
	// the kept rows are exactly those with keys ≤ the largest kept.
	evicted bool
	// onDup receives each repeat found: the id and the kept and the
	// repeated lines (set by the owner).
	onDup func(k *hkey, id []byte, kept, other int64)
}

// newRetainer returns a retainer for capacity rows; scratch (nil: its
// own) is the merge buffer, which retainers used by one goroutine may
// share.
func newRetainer(capacity int, scratch *[]bentry) *retainer {
	if scratch == nil {
		scratch = new([]bentry)
	}
	return &retainer{cap: capacity, merged: scratch}
}

// wants reports whether a key with first word head could enter (admit
// makes the exact decision).
func (r *retainer) wants(head uint64) bool {
	return !r.full || head <= r.thr[0]
}

// admit records a candidate with this key and line and reports whether
// it was taken; if so the caller appends its fields to r.arena with
// appendPart and then calls seal.
func (r *retainer) admit(k *hkey, line int64) bool {
	if r.cap == 0 || (r.full && r.thr.less(k)) {
		r.evicted = true
		return false
	}
	r.buf = append(r.buf, bentry{k: *k, line: line, off: int32(len(r.arena))})
	return true
}

// seal closes the record of the last admitted row and compacts when the
// buffer has reached twice the capacity.
func (r *retainer) seal() {
	e := &r.buf[len(r.buf)-1]
	e.n = int32(len(r.arena)) - e.off
	if len(r.buf) >= 2*r.cap {
		r.compact()
	}
}

// compact sorts the buffer, resolves repeated keys (the earlier line is
// kept) and keeps the cap smallest keys. The rows kept by the last
// compaction are still sorted, so only the rows admitted since are sorted
// and the two runs merged: the result is the full sort by (key, line).
func (r *retainer) compact() {
	old, added := r.buf[:r.sorted], r.buf[r.sorted:]
	slices.SortFunc(added, cmpEntry)
	m := (*r.merged)[:0]
	for len(old) > 0 && len(added) > 0 {
		if cmpEntry(old[0], added[0]) <= 0 {
			m = append(m, old[0])
			old = old[1:]
		} else {
			m = append(m, added[0])
			added = added[1:]
		}
	}
	m = append(append(m, old...), added...)
	out := r.buf[:0]
	for i := range m {
		if len(out) > 0 && out[len(out)-1].k == m[i].k {
			if r.onDup != nil {
				kept := &out[len(out)-1]
				id := rowParts(r.arena[kept.off : kept.off+kept.n])[0]
				r.onDup(&m[i].k, id, kept.line, m[i].line)
			}
			continue
		}
		out = append(out, m[i])
	}
	*r.merged = m
	if len(out) > r.cap {
		out = out[:r.cap]
		r.evicted = true
	}
	sp := r.spare[:0]
	for i := range out {
		e := &out[i]
		start := int32(len(sp))
		sp = append(sp, r.arena[e.off:e.off+e.n]...)
		e.off = start
	}
	r.spare, r.arena = r.arena[:0], sp
	r.buf = out
	r.sorted = len(out)
	if len(out) == r.cap && r.cap > 0 {
		r.thr = out[len(out)-1].k
		r.full = true
	}
}

// cmpEntry orders entries by key, then line.
func cmpEntry(x, y bentry) int {
	if c := x.k.cmp(&y.k); c != 0 {
		return c
	}
	return cmpInt64(x.line, y.line)
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
		parts := rowParts(r.arena[e.off : e.off+e.n])
		row := Row{Key: e.k.bytes(), Line: e.line, ID: string(parts[0]), Stratum: stratum, Values: make([]string, len(parts)-1)}
		for j := range row.Values {
			row.Values[j] = string(parts[j+1])
		}
		out[i] = row
	}
	return out
}
