package sampling

import (
	"bytes"
	"crypto/sha256"
	"testing"
)

// TestKeyHasherMatchesSum256 checks the padded-block key hash against
// crypto/sha256.Sum256 (the reference, itself checked against coreutils
// sha256sum in TestKeyAndPeriodSeed) for every message length from 1 to
// 200 bytes, so each padding case (length mod 64 below 56, from 56 to
// 63, and exact blocks) is covered, and for a reused hasher.
func TestKeyHasherMatchesSum256(t *testing.T) {
	for _, seed := range []string{"", "s", "bench-seed", "0123456789abcdef0123456789abcdef"} {
		k := newKeyHasher(seed)
		if k.app == nil {
			t.Fatalf("seed %q: the padded-block path was disabled by its self-check", seed)
		}
		for n := 0; n+len(seed)+1 <= 200; n++ {
			id := bytes.Repeat([]byte{byte('a' + n%26)}, n)
			got := k.sum(id)
			want := sha256.Sum256([]byte(seed + ":" + string(id)))
			if got != want {
				t.Fatalf("seed %q, id of %d bytes: got %x, want %x", seed, n, got, want)
			}
		}
	}
	// The fallback path gives the same keys.
	k := newKeyHasher("abc")
	k.app = nil
	if got := k.sum([]byte("r1")); Key("abc", "r1") != string(hexKey(got)) {
		t.Fatalf("fallback: got %x", got)
	}
}

func hexKey(k [32]byte) []byte {
	r := Row{Key: k}
	return []byte(r.KeyHex())
}

// BenchmarkKeyHasher is the per-row key hash of the draw; compare with
// BenchmarkKeySum, the reused digest and Sum.
func BenchmarkKeyHasher(b *testing.B) {
	k := newKeyHasher("0123456789abcdef0123456789abcdef")
	id := []byte("rec0000000001")
	var acc byte
	for i := 0; i < b.N; i++ {
		s := k.sum(id)
		acc ^= s[0]
	}
	_ = acc
}

// BenchmarkKeySum is the per-row hash with Reset, Write and Sum.
func BenchmarkKeySum(b *testing.B) {
	h := sha256.New()
	msg := []byte("0123456789abcdef0123456789abcdef:rec0000000001")
	var sum []byte
	var acc byte
	for i := 0; i < b.N; i++ {
		h.Reset()
		h.Write(msg)
		sum = h.Sum(sum[:0])
		acc ^= sum[0]
	}
	_ = acc
}
