package sampling

import "encoding/binary"

// Finding a row's stratum without building its label: each strata
// column's values are interned to small numbers, and the numbers (with
// the band indexes) packed into one uint64 that indexes the worker's
// strata. Up to four strata columns and bands, each with fewer than 65 535
// values, take this path; other draws build the label and look it up.

// maxPacked is the number of strata columns and bands that fit a packed key.
const maxPacked = 4

// internTable maps a column's values to small numbers (open addressing on
// valueHash).
type internTable struct {
	keys  []internEntry
	count int
	// short caches the numbers of values of 1 to 7 bytes by shortWord,
	// direct-mapped: a hit costs one load and one comparison.
	short [64]shortEntry
}

type shortEntry struct {
	word uint64 // 0: empty (a shortWord is never 0)
	id   int32
}

// shortWord packs a value of 1 to 7 bytes and its length into one word,
// distinct for distinct values; ok is false for other lengths and when
// fewer than 8 bytes can be loaded from v's array. The bytes past len(v)
// are masked out.
func shortWord(v []byte) (w uint64, ok bool) {
	n := len(v)
	if n == 0 || n > 7 || cap(v) < 8 {
		return 0, false
	}
	x := binary.LittleEndian.Uint64(v[:8:8])
	return x&(1<<(8*uint(n))-1) | uint64(n)<<56, true
}

// lookup is find with the short-value cache in front.
func (t *internTable) lookup(v []byte) (id int32, ok bool) {
	w, short := shortWord(v)
	if !short {
		return t.find(v)
	}
	e := &t.short[(w*0x9E3779B97F4A7C15)>>58]
	if e.word == w {
		return e.id, true
	}
	id, ok = t.find(v)
	if ok {
		*e = shortEntry{word: w, id: id}
	}
	return id, ok
}

type internEntry struct {
	hash uint64
	val  string
	id   int32
	used bool
}

// valueHash is a cheap hash of a category value: its length and its first,
// middle and last bytes. Values that share them only cost a comparison.
func valueHash(v []byte) uint64 {
	n := len(v)
	if n == 0 {
		return 0x9E3779B97F4A7C15
	}
	h := uint64(n) | uint64(v[0])<<16 | uint64(v[n/2])<<24 | uint64(v[n-1])<<32
	return h * 0x9E3779B97F4A7C15
}

// find returns the number of v, adding v when new; ok is false once the
// column holds too many values to pack.
func (t *internTable) find(v []byte) (id int32, ok bool) {
	if t.keys == nil {
		t.keys = make([]internEntry, 16)
	}
	h := valueHash(v)
	mask := uint64(len(t.keys) - 1)
	for i := h >> 40 & mask; ; i = (i + 1) & mask {
		e := &t.keys[i]
		if !e.used {
			if t.count >= 0xfffe {
				return 0, false
			}
			*e = internEntry{hash: h, val: string(v), id: int32(t.count), used: true}
			t.count++
			if 2*t.count > len(t.keys) {
				t.grow()
			}
			return int32(t.count - 1), true
		}
		if e.hash == h && e.val == string(v) {
			return e.id, true
		}
	}
}

func (t *internTable) grow() {
	old := t.keys
	t.keys = make([]internEntry, 2*len(old))
	mask := uint64(len(t.keys) - 1)
	for _, e := range old {
		if !e.used {
			continue
		}
		i := e.hash >> 40 & mask
		for t.keys[i].used {
			i = (i + 1) & mask
		}
		t.keys[i] = e
	}
}

// packedTable maps packed stratum keys to strata.
type packedTable struct {
	keys  []uint64 // 0 = empty (packed keys are never 0)
	vals  []*wstratum
	count int
}

func (t *packedTable) find(k uint64) *wstratum {
	if t.keys == nil {
		return nil
	}
	mask := uint64(len(t.keys) - 1)
	for i := (k * 0x9E3779B97F4A7C15) >> 32 & mask; ; i = (i + 1) & mask {
		switch t.keys[i] {
		case k:
			return t.vals[i]
		case 0:
			return nil
		}
	}
}

func (t *packedTable) insert(k uint64, st *wstratum) {
	if t.keys == nil || 2*(t.count+1) > len(t.keys) {
		oldK, oldV := t.keys, t.vals
		n := 64
		if oldK != nil {
			n = 2 * len(oldK)
		}
		t.keys, t.vals, t.count = make([]uint64, n), make([]*wstratum, n), 0
		for i, ok := range oldK {
			if ok != 0 {
				t.insert(ok, oldV[i])
			}
		}
	}
	mask := uint64(len(t.keys) - 1)
	i := (k * 0x9E3779B97F4A7C15) >> 32 & mask
	for t.keys[i] != 0 && t.keys[i] != k {
		i = (i + 1) & mask
	}
	if t.keys[i] == 0 {
		t.count++
	}
	t.keys[i], t.vals[i] = k, st
}
