package sha256pair

import (
	"crypto/sha256"
	"encoding/binary"
	"math/rand/v2"
	"testing"
)

// digest hashes msg with Compress2 (paired with other, hashed alongside)
// and returns both digests: FIPS 180-4 §5.1.1 padding, then one
// compression per block, lanes of different lengths padded with the
// other's blocks run on a throw-away state.
func digest2(msg, other []byte) ([32]byte, [32]byte) {
	pa, pb := pad(msg), pad(other)
	sa, sb := Init, Init
	var junk [8]uint32
	for i := 0; i < max(len(pa), len(pb)); i++ {
		switch {
		case i < len(pa) && i < len(pb):
			Compress2(&sa, &sb, &pa[i], &pb[i])
		case i < len(pa):
			Compress2(&sa, &junk, &pa[i], &pa[i])
		default:
			Compress2(&junk, &sb, &pb[i], &pb[i])
		}
	}
	return bytesOf(&sa), bytesOf(&sb)
}

func pad(msg []byte) [][64]byte {
	n := len(msg)
	total := (n+8)/64*64 + 64
	buf := make([]byte, total)
	copy(buf, msg)
	buf[n] = 0x80
	binary.BigEndian.PutUint64(buf[total-8:], uint64(n)*8)
	blocks := make([][64]byte, total/64)
	for i := range blocks {
		copy(blocks[i][:], buf[64*i:])
	}
	return blocks
}

func bytesOf(h *[8]uint32) [32]byte {
	var d [32]byte
	for i, w := range h {
		binary.BigEndian.PutUint32(d[4*i:], w)
	}
	return d
}

// TestCompress2MatchesCryptoSHA256 checks every message length from 0 to
// 300 bytes and 20 000 random messages against crypto/sha256 (the Go
// standard library, itself validated against the NIST CAVP vectors).
func TestCompress2MatchesCryptoSHA256(t *testing.T) {
	t.Logf("accelerated: %v", Accelerated())
	r := rand.New(rand.NewPCG(1, 2))
	random := func(n int) []byte {
		b := make([]byte, n)
		for i := range b {
			b[i] = byte(r.Uint32())
		}
		return b
	}
	check := func(a, b []byte) {
		t.Helper()
		da, db := digest2(a, b)
		if da != sha256.Sum256(a) || db != sha256.Sum256(b) {
			t.Fatalf("digest differs for messages of %d and %d bytes", len(a), len(b))
		}
	}
	for n := 0; n <= 300; n++ {
		check(random(n), random(300-n))
		check(random(n), random(n))
	}
	for i := 0; i < 20000; i++ {
		check(random(r.IntN(140)), random(r.IntN(140)))
	}
}

// TestKnownAnswers checks the FIPS 180-4 example messages "abc" (one
// block) and the 448-bit two-block message; the digests are the ones
// printed in NIST's SHA-256 example document (quoted from memory, and
// equal to crypto/sha256's).
func TestKnownAnswers(t *testing.T) {
	cases := []struct{ msg, hex string }{
		{"abc", "ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad"},
		{"abcdbcdecdefdefgefghfghighijhijkijkljklmklmnlmnomnopnopq", "248d6a61d20638b8e5c026930c3e6039a33ce45964ff2167f6ecedd419db06c1"},
	}
	for _, c := range cases {
		d, _ := digest2([]byte(c.msg), []byte(c.msg))
		if got := hexOf(d); got != c.hex {
			t.Errorf("%q: %s, want %s", c.msg, got, c.hex)
		}
	}
}

func hexOf(d [32]byte) string {
	const digits = "0123456789abcdef"
	out := make([]byte, 64)
	for i, b := range d {
		out[2*i], out[2*i+1] = digits[b>>4], digits[b&15]
	}
	return string(out)
}

// TestCompressPortableMatchesAsm compares the portable code with
// Compress2 on random states and blocks (on processors without the SHA
// extensions both sides are the portable code).
func TestCompressPortableMatchesAsm(t *testing.T) {
	r := rand.New(rand.NewPCG(3, 4))
	for i := 0; i < 5000; i++ {
		var sa, sb [8]uint32
		var ba, bb [64]byte
		for j := range sa {
			sa[j], sb[j] = r.Uint32(), r.Uint32()
		}
		for j := range ba {
			ba[j], bb[j] = byte(r.Uint32()), byte(r.Uint32())
		}
		ra, rb, s1 := sa, sb, sa
		Compress2(&sa, &sb, &ba, &bb)
		Compress1(&s1, &ba)
		Compress(&ra, &ba)
		Compress(&rb, &bb)
		if sa != ra || sb != rb || s1 != ra {
			t.Fatalf("case %d: states differ", i)
		}
	}
}

// BenchmarkCompress2 is two block compressions per op.
func BenchmarkCompress2(b *testing.B) {
	var sa, sb [8]uint32 = Init, Init
	var ba, bb [64]byte
	b.SetBytes(128)
	for i := 0; i < b.N; i++ {
		Compress2(&sa, &sb, &ba, &bb)
	}
}

// BenchmarkCompress1 is one block compression per op.
func BenchmarkCompress1(b *testing.B) {
	s := Init
	var blk [64]byte
	b.SetBytes(64)
	for i := 0; i < b.N; i++ {
		Compress1(&s, &blk)
	}
}

// BenchmarkCompressPortable is one portable block compression per op.
func BenchmarkCompressPortable(b *testing.B) {
	s := Init
	var blk [64]byte
	b.SetBytes(64)
	for i := 0; i < b.N; i++ {
		Compress(&s, &blk)
	}
}
