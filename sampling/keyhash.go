package sampling

import (
	"bytes"
	"crypto/sha256"
	"encoding"
	"encoding/binary"
	"hash"

	"probity/sampling/sha256pair"
)

// keyHasher computes the selection key SHA-256("<seed>:<id>") of many
// rows without allocating.
//
// Where the processor has the SHA extensions it hashes two rows at once
// (sha256pair): the whole 64-byte blocks of "<seed>:" are compressed once
// (the midstate); each row then needs only its tail — the rest of the
// prefix, the id and the FIPS 180-4 §5.1.1 padding (a 1 bit, zeros up to
// 56 mod 64 bytes, the message length in bits as a big-endian 64-bit
// number) — usually a single block. The state words after the last
// block are the hash (FIPS 180-4 §6.2.2, step 4).
//
// Elsewhere it uses crypto/sha256 with the padded blocks written by
// itself, so the digest runs only its compression function, and reads
// the state from the digest's binary encoding (the 4-byte magic, then
// the eight words big-endian), which skips the copy and second write of
// Sum. Both paths are checked against sha256.Sum256 when the hasher is
// made and fall back to Sum when the check fails.
type keyHasher struct {
	// pair: two rows at a time on the SHA extensions.
	pair bool
	mid  [8]uint32
	rem  []byte // the prefix after its whole blocks (< 64 bytes)
	ta   []byte
	tb   []byte
	// The crypto/sha256 path.
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
	checks := []string{"", "r1", string(bytes.Repeat([]byte("x"), 60)), string(bytes.Repeat([]byte("y"), 130))}
	if app, ok := k.d.(encoding.BinaryAppender); ok {
		k.app = app
		for _, id := range checks {
			if k.cryptoSum([]byte(id)) != toHKey(digestRef(sha256.Sum256([]byte(seed+":"+id)))) {
				k.app = nil
				break
			}
		}
	}
	if sha256pair.Accelerated() {
		whole := k.plen / 64 * 64
		k.mid = sha256pair.Init
		for i := 0; i < whole; i += 64 {
			sha256pair.Compress(&k.mid, (*[64]byte)(k.buf[i:]))
		}
		k.rem = append([]byte(nil), k.buf[whole:k.plen]...)
		k.pair = true
		want := func(id string) hkey { return toHKey(digestRef(sha256.Sum256([]byte(seed + ":" + id)))) }
		for i, id := range checks {
			other := checks[(i+1)%len(checks)]
			a, b := k.key2([]byte(id), []byte(other))
			if a != want(id) || b != want(other) || k.key([]byte(id)) != want(id) {
				k.pair = false
				break
			}
		}
	}
	return k
}

// digestRef returns a pointer to a copy of a digest (for toHKey).
func digestRef(b [32]byte) *[32]byte { return &b }

// key returns the key of one row.
func (k *keyHasher) key(id []byte) hkey {
	if !k.pair {
		return k.cryptoSum(id)
	}
	t := k.tail(k.ta, id)
	k.ta = t
	s := k.mid
	for i := 0; i < len(t); i += 64 {
		sha256pair.Compress1(&s, (*[64]byte)(t[i:]))
	}
	return stateKey(&s)
}

// key2 returns the keys of two rows, hashed together.
func (k *keyHasher) key2(a, b []byte) (hkey, hkey) {
	if !k.pair {
		return k.cryptoSum(a), k.cryptoSum(b)
	}
	ta, tb := k.tail(k.ta, a), k.tail(k.tb, b)
	k.ta, k.tb = ta, tb
	sa, sb := k.mid, k.mid
	n := min(len(ta), len(tb))
	for i := 0; i < n; i += 64 {
		sha256pair.Compress2(&sa, &sb, (*[64]byte)(ta[i:]), (*[64]byte)(tb[i:]))
	}
	// Tails of different lengths: the longer one goes on alone.
	for i := n; i < len(ta); i += 64 {
		sha256pair.Compress1(&sa, (*[64]byte)(ta[i:]))
	}
	for i := n; i < len(tb); i += 64 {
		sha256pair.Compress1(&sb, (*[64]byte)(tb[i:]))
	}
	return stateKey(&sa), stateKey(&sb)
}

// tail writes into dst, which starts with the rest of the prefix, the
// blocks that follow the midstate for this id: that rest, the id and the
// padding.
func (k *keyHasher) tail(dst, id []byte) []byte {
	r := len(k.rem)
	n := r + len(id)
	padded := (n+8)/64*64 + 64
	if cap(dst) < padded || len(dst) < r {
		dst = append(make([]byte, 0, max(padded, 128)), k.rem...)
	}
	dst = dst[:padded]
	copy(dst[r:], id)
	dst[n] = 0x80
	clear(dst[n+1 : padded-8])
	binary.BigEndian.PutUint64(dst[padded-8:], uint64(k.plen+len(id))*8)
	return dst
}

// stateKey is the key of a final state: its words, big-endian, in order.
func stateKey(s *[8]uint32) hkey {
	return hkey{uint64(s[0])<<32 | uint64(s[1]), uint64(s[2])<<32 | uint64(s[3]),
		uint64(s[4])<<32 | uint64(s[5]), uint64(s[6])<<32 | uint64(s[7])}
}

// cryptoSum returns SHA-256("<seed>:<id>") through crypto/sha256.
func (k *keyHasher) cryptoSum(id []byte) hkey {
	b := append(k.buf[:k.plen], id...)
	n := len(b)
	k.d.Reset()
	if k.app == nil {
		k.d.Write(b)
		k.out = k.d.Sum(k.out[:0])
		k.buf = b
		return toHKey((*[32]byte)(k.out))
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
		return k.cryptoSum(id)
	}
	return toHKey((*[32]byte)(out[4:36]))
}
