package sampling

import (
	"bytes"
	"crypto/sha256"
	"encoding/hex"
	"strings"
	"testing"
)

// TestKeyHasherMatchesKey checks the draw's reused hasher against Key
// (sha256.Sum256 of the joined string, itself checked against coreutils
// sha256sum in TestKeyAndPeriodSeed) for seeds whose "<seed>:" has 1 to
// 101 bytes — less than a block, exactly one (a 63-byte seed), and a
// period seed of 64 hex digits — and ids of 0 to 150 bytes, so every
// padding case (message length mod 64 below 56, from 56 to 63, whole
// blocks) is covered, each hasher reused across all of its ids.
func TestKeyHasherMatchesKey(t *testing.T) {
	seeds := []string{"", "0123456789abcdef0123456789abcdef", strings.Repeat("a", 62), strings.Repeat("b", 63),
		PeriodSeed("0123456789abcdef0123456789abcdef", "2026-10"), strings.Repeat("c", 100)}
	for _, seed := range seeds {
		k := newKeyHasher(seed)
		for n := 0; n <= 150; n++ {
			id := bytes.Repeat([]byte{byte('a' + n%26)}, n)
			got := k.key(id)
			b := got.bytes()
			if want := Key(seed, string(id)); hex.EncodeToString(b[:]) != want {
				t.Fatalf("seed of %d bytes, id of %d bytes: got %x, want %s", len(seed), n, b, want)
			}
		}
	}
}

// BenchmarkKeyHasher is the per-row key hash of the draw: one reused
// digest with Reset, Write and Sum.
func BenchmarkKeyHasher(b *testing.B) {
	k := newKeyHasher("0123456789abcdef0123456789abcdef")
	id := []byte("rec0000000001")
	var acc uint64
	for b.Loop() {
		acc ^= k.key(id)[0]
	}
	_ = acc
}

// BenchmarkKeySum256 is the alternative: sha256.Sum256 over a reused
// buffer holding "<seed>:<id>".
func BenchmarkKeySum256(b *testing.B) {
	buf := []byte("0123456789abcdef0123456789abcdef:")
	plen := len(buf)
	id := []byte("rec0000000001")
	var acc byte
	for b.Loop() {
		buf = append(buf[:plen], id...)
		s := sha256.Sum256(buf)
		acc ^= s[0]
	}
	_ = acc
}
