package sampling

import (
	"errors"
	"math/bits"
	"sync"
	"sync/atomic"
)

// Counting distinct ids for --dedupe first. A stratum's population N_h is
// the number of distinct ids whose first row in scope lies in it; the
// repeats of an id are not rows of the population. Only the rows that
// could be drawn are kept in one bounded pass, so repeats of the other
// rows cannot be recognised from them: the count needs every id. The
// draw therefore keeps, under Dedupe only, one entry per distinct id: the
// first 128 bits of its key, the line of its first row and that row's
// stratum. (Two different ids share 128 key bits with probability about
// m²/2¹²⁹ for m ids, below 10⁻²⁴ for ten million.)

// DefaultMaxDistinct is the number of distinct ids a draw under Dedupe
// counts before it refuses (each costs 32 to 48 bytes: a table of 24-byte
// entries kept between half and three quarters full).
const DefaultMaxDistinct = 10_000_000

// ErrTooManyDistinct is wrapped by the error about a log with more
// distinct ids than a draw under Dedupe can count.
var ErrTooManyDistinct = errors.New("too many distinct ids to remove repeats")

// distinctShards is the number of independently locked parts of the
// table (by the key's first byte), so workers rarely wait for each other
// and a part that grows copies 1/256 of the table.
const distinctShards = 256

// distinctSet maps ids (by key) to their first row: its line and stratum.
// It is safe for concurrent use.
type distinctSet struct {
	max    int64
	shards [distinctShards]distinctShard
	total  atomic.Int64
}

// distinctEntry is one id: key words 0 and 1, and the first row's line
// (upper 48 bits) and stratum number (lower 16 bits); 0 marks a free slot
// (lines start at 1).
type distinctEntry struct {
	k0, k1 uint64
	at     uint64
}

type distinctShard struct {
	mu    sync.Mutex
	slots []distinctEntry
	count int
}

// maxDistinctLine and maxDistinctStrata bound what an entry can hold.
const (
	maxDistinctLine   = 1<<48 - 1
	maxDistinctStrata = 1 << 16
)

func newDistinctSet(max int64) *distinctSet {
	if max <= 0 {
		max = DefaultMaxDistinct
	}
	return &distinctSet{max: max}
}

// add records a row in scope with this key, line and stratum number. It
// returns false when the id is new and the set already holds its maximum.
func (d *distinctSet) add(k *hkey, line int64, stratum int) bool {
	at := uint64(line)<<16 | uint64(stratum)
	sh := &d.shards[k[0]>>56]
	sh.mu.Lock()
	defer sh.mu.Unlock()
	if sh.slots == nil {
		sh.slots = make([]distinctEntry, 64)
	}
	e, found := sh.find(k[0], k[1])
	if found {
		e.at = min(e.at, at)
		return true
	}
	if d.total.Add(1) > d.max {
		return false
	}
	*e = distinctEntry{k0: k[0], k1: k[1], at: at}
	sh.count++
	if 4*sh.count > 3*len(sh.slots) {
		sh.grow()
	}
	return true
}

// find returns the slot holding the key, or the free slot where it
// belongs (linear probing from a position taken from the key's second
// word, which is uniform, scaled to the table's size).
func (sh *distinctShard) find(k0, k1 uint64) (*distinctEntry, bool) {
	n := uint64(len(sh.slots))
	i, _ := bits.Mul64(k1, n)
	for {
		e := &sh.slots[i]
		if e.at == 0 {
			return e, false
		}
		if e.k0 == k0 && e.k1 == k1 {
			return e, true
		}
		if i++; i == n {
			i = 0
		}
	}
}

// grow moves the shard to a table half as large again.
func (sh *distinctShard) grow() {
	old := sh.slots
	sh.slots = make([]distinctEntry, len(old)+len(old)/2)
	for _, e := range old {
		if e.at != 0 {
			slot, _ := sh.find(e.k0, e.k1)
			*slot = e
		}
	}
}

// first returns the line and stratum number of the first row of the id
// with this key; ok is false when the key was never added.
func (d *distinctSet) first(key *[32]byte) (line int64, stratum int, ok bool) {
	k := toHKey(key)
	sh := &d.shards[k[0]>>56]
	sh.mu.Lock()
	defer sh.mu.Unlock()
	if sh.slots == nil {
		return 0, 0, false
	}
	e, found := sh.find(k[0], k[1])
	if !found {
		return 0, 0, false
	}
	return int64(e.at >> 16), int(e.at & 0xffff), true
}

// counts returns the number of distinct ids per stratum number (the
// stratum of each id's first row).
func (d *distinctSet) counts(strata int) []int64 {
	out := make([]int64, strata)
	for i := range d.shards {
		for _, e := range d.shards[i].slots {
			if e.at != 0 {
				out[e.at&0xffff]++
			}
		}
	}
	return out
}
