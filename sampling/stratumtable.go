package sampling

import "hash/maphash"

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
