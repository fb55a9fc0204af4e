package sampling

import (
	"bytes"
	"crypto/sha256"
	"encoding"
	"encoding/binary"
	"hash"
)

// keyHasher computes the selection key SHA-256("<seed>:<id>") of many
// rows with one reused digest and no allocation.
//
// The fast path pads the message itself (FIPS 180-4 §5.1.1: a 1 bit,
// zeros up to 56 mod 64 bytes, the length in bits as a big-endian 64-bit
// number) and writes the padded blocks, so the digest runs only its
// compression function on them. The state words after the last block
// are then the hash (FIPS 180-4 §6.2.2, step 4); they are read from the
// digest's binary encoding (the 4-byte magic, then the eight words
// big-endian). This skips the copy of the digest and the second write
// that Sum makes. newKeyHasher checks the fast path against
// sha256.Sum256 and falls back to Sum when the encoding is not as
// expected.
type keyHasher struct {
	d    hash.Hash
	app  encoding.BinaryAppender // nil: use Sum
	buf  []byte
	plen int
	out  []byte
}

// newKeyHasher returns a keyHasher for this seed.
func newKeyHasher(seed string) *keyHasher {
	k := &keyHasher{d: sha256.New()}
	k.buf = append(append(k.buf, seed...), ':')
	k.plen = len(k.buf)
	if app, ok := k.d.(encoding.BinaryAppender); ok {
		k.app = app
		// Self-check on ids that give one, two and three blocks.
		for _, id := range []string{"", "r1", string(bytes.Repeat([]byte("x"), 60)), string(bytes.Repeat([]byte("y"), 130))} {
			if k.sum([]byte(id)) != sha256.Sum256([]byte(seed+":"+id)) {
				k.app = nil
				break
			}
		}
	}
	return k
}

// sum returns SHA-256("<seed>:<id>").
func (k *keyHasher) sum(id []byte) [32]byte {
	b := append(k.buf[:k.plen], id...)
	n := len(b)
	k.d.Reset()
	if k.app == nil {
		k.d.Write(b)
		k.out = k.d.Sum(k.out[:0])
		k.buf = b
		return [32]byte(k.out)
	}
	padded := (n+8)/64*64 + 64
	if cap(b) < padded {
		b = append(b, make([]byte, padded-n)...)
	}
	b = b[:padded]
	b[n] = 0x80
	clear(b[n+1 : padded-8])
	binary.BigEndian.PutUint64(b[padded-8:], uint64(n)*8)
	k.d.Write(b)
	k.buf = b
	out, err := k.app.AppendBinary(k.out[:0])
	k.out = out
	if err != nil || len(out) < 36 {
		// Not reached with crypto/sha256; kept so a change of the
		// encoding can only cost speed.
		k.app = nil
		return k.sum(id)
	}
	return [32]byte(out[4:36])
}
