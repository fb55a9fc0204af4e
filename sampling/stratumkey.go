package sampling

// Finding a row's stratum without building its label: each strata
// column's values are interned to small numbers, and the numbers (with
// the band indexes) packed into one uint64 that indexes the worker's
// strata. Up to four strata columns and bands, each with fewer than 65 535
// values, take this path; other draws build the label and look it up.

// maxPacked is the number of strata columns and bands that fit a packed key.
const maxPacked = 4

// internTable maps a column's values to small numbers (open addressing on
// an FNV-1a hash of the bytes).
type internTable struct {
	keys  []internEntry
	count int
}

type internEntry struct {
	hash uint64
	val  string
	id   int32
	used bool
}

func fnv1a(v []byte) uint64 {
	h := uint64(14695981039346656037)
	for _, c := range v {
		h ^= uint64(c)
		h *= 1099511628211
	}
	return h
}

// find returns the number of v, adding v when new; ok is false once the
// column holds too many values to pack.
func (t *internTable) find(v []byte) (id int32, ok bool) {
	if t.keys == nil {
		t.keys = make([]internEntry, 16)
	}
	h := fnv1a(v)
	mask := uint64(len(t.keys) - 1)
	for i := h & mask; ; i = (i + 1) & mask {
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
		i := e.hash & mask
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
