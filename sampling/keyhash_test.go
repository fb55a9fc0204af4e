package sampling

import (
	"bytes"
	"crypto/sha256"
	"strings"
	"testing"

	"probity/sampling/sha256pair"
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
			got := k.cryptoSum(id)
			want := toHKey(digestRef(sha256.Sum256([]byte(seed + ":" + string(id)))))
			if got != want {
				t.Fatalf("seed %q, id of %d bytes: got %x, want %x", seed, n, got, want)
			}
		}
	}
	// The fallback path gives the same keys.
	k := newKeyHasher("abc")
	k.app = nil
	if got := k.cryptoSum([]byte("r1")); Key("abc", "r1") != string(hexKey(got.bytes())) {
		t.Fatalf("fallback: got %x", got)
	}
}

// TestKeyHasherPairsMatchSum256 checks the two-at-a-time path (the
// midstate of the prefix's whole blocks, then the tails) against
// crypto/sha256.Sum256 for seeds whose "<seed>:" has 1 to 101 bytes — no
// whole block, exactly one (a 63-digit seed), and a period seed of 64
// hex digits, whose first block is all seed — and ids of 0 to 150 bytes
// in pairs of equal and of different block counts.
func TestKeyHasherPairsMatchSum256(t *testing.T) {
	seeds := []string{"", "0123456789abcdef0123456789abcdef", strings.Repeat("a", 62), strings.Repeat("b", 63),
		PeriodSeed("0123456789abcdef0123456789abcdef", "2026-10"), strings.Repeat("c", 100)}
	for _, seed := range seeds {
		k := newKeyHasher(seed)
		if sha256pair.Accelerated() && !k.pair {
			t.Fatalf("seed of %d bytes: the pair path was disabled by its self-check", len(seed))
		}
		want := func(id []byte) hkey { return toHKey(digestRef(sha256.Sum256([]byte(seed + ":" + string(id))))) }
		for n := 0; n <= 150; n++ {
			a := bytes.Repeat([]byte{byte('a' + n%26)}, n)
			b := []byte(strings.Repeat("Z", (n*37)%151))
			if got := k.key(a); got != want(a) {
				t.Fatalf("seed of %d bytes, id of %d bytes: key differs", len(seed), n)
			}
			ka, kb := k.key2(a, b)
			if ka != want(a) || kb != want(b) {
				t.Fatalf("seed of %d bytes, ids of %d and %d bytes: key2 differs", len(seed), len(a), len(b))
			}
		}
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
		s := k.key(id)
		acc ^= byte(s[0])
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
