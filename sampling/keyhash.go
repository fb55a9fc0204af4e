package sampling

import (
	"crypto/sha256"
	"hash"
)

// keyHasher computes the selection key SHA-256("<seed>:<id>") (see Key)
// of many rows with crypto/sha256, which uses the processor's SHA
// instructions where it has them. Each worker owns one: its digest and
// output buffer are reused, so a row costs no allocation. (A reused
// digest measured a few per cent less CPU per draw than sha256.Sum256
// over a reused buffer; compare BenchmarkKeyHasher and BenchmarkKeySum256.)
type keyHasher struct {
	d      hash.Hash
	prefix []byte // "<seed>:"
	out    []byte
}

// newKeyHasher returns a keyHasher for this seed.
func newKeyHasher(seed string) *keyHasher {
	return &keyHasher{d: sha256.New(), prefix: []byte(seed + ":"), out: make([]byte, 0, sha256.Size)}
}

// key returns the key of the row with this id.
func (k *keyHasher) key(id []byte) hkey {
	k.d.Reset()
	k.d.Write(k.prefix)
	k.d.Write(id)
	k.out = k.d.Sum(k.out[:0])
	return toHKey((*[sha256.Size]byte)(k.out))
}
