package sampling

import (
	"bytes"
	"encoding/binary"
	"encoding/hex"
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

// retainer keeps the rows with the smallest keys of one stratum, at most
// cap of them, in a max-heap on the key. A key equal to one already held
// is a repeated id (SHA-256 collisions aside) and is reported, not kept
// twice.
type retainer struct {
	cap   int
	heap  []*Row
	byKey map[[32]byte]*Row
	// maxHead is the first 8 key bytes of heap[0] when full, for a fast
	// rejection of most rows.
	maxHead uint64
	// evicted is true once a row has been pushed out: from then on the
	// heap holds exactly the rows with keys ≤ its maximum.
	evicted bool
}

func newRetainer(capacity int) *retainer {
	return &retainer{cap: capacity, byKey: map[[32]byte]*Row{}}
}

// wants reports whether a key could enter (cheap test on the first 8
// bytes; offer makes the exact decision).
func (r *retainer) wants(head uint64) bool {
	return len(r.heap) < r.cap || head <= r.maxHead
}

// offer considers a row. It returns the row already held with the same
// key (a repeated id), if any; the caller decides which copy stays. make
// builds the row only when it is kept.
func (r *retainer) offer(key *[32]byte, make func() *Row) (dup *Row) {
	if d, ok := r.byKey[*key]; ok {
		return d
	}
	if r.cap == 0 {
		r.evicted = true
		return nil
	}
	if len(r.heap) < r.cap {
		row := make()
		r.byKey[row.Key] = row
		r.heap = append(r.heap, row)
		r.up(len(r.heap) - 1)
		r.refresh()
		return nil
	}
	if !keyLess(key, &r.heap[0].Key) {
		return nil
	}
	delete(r.byKey, r.heap[0].Key)
	row := make()
	r.byKey[row.Key] = row
	r.heap[0] = row
	r.down(0)
	r.evicted = true
	r.refresh()
	return nil
}

func (r *retainer) refresh() {
	if len(r.heap) == r.cap && r.cap > 0 {
		r.maxHead = binary.BigEndian.Uint64(r.heap[0].Key[:8])
	}
}

func (r *retainer) up(i int) {
	h := r.heap
	for i > 0 {
		p := (i - 1) / 2
		if !keyLess(&h[p].Key, &h[i].Key) {
			break
		}
		h[p], h[i] = h[i], h[p]
		i = p
	}
}

func (r *retainer) down(i int) {
	h := r.heap
	n := len(h)
	for {
		l := 2*i + 1
		if l >= n {
			return
		}
		big := l
		if rr := l + 1; rr < n && keyLess(&h[l].Key, &h[rr].Key) {
			big = rr
		}
		if !keyLess(&h[i].Key, &h[big].Key) {
			return
		}
		h[i], h[big] = h[big], h[i]
		i = big
	}
}

// max returns the largest key held (nil when empty).
func (r *retainer) max() *[32]byte {
	if len(r.heap) == 0 {
		return nil
	}
	return &r.heap[0].Key
}
