package delimscan

import (
	"encoding/binary"
	"math/bits"
)

// Masks appends to seps, nls and quotes one word per 64 bytes of data
// (the last word covers the rest, its high bits clear): bit j of seps[i]
// is set when data[64·i+j] == sep, of nls[i] when it is '\n', and of
// quotes[i] when it is quote. seen reports whether quote occurs at all.
func Masks(data []byte, sep, quote byte, seps, nls, quotes []uint64) (s2, l2, q2 []uint64, seen bool) {
	words := (len(data) + 63) / 64
	seps, nls, quotes = grow(seps, words), grow(nls, words), grow(quotes, words)
	s, l, q := seps[len(seps)-words:], nls[len(nls)-words:], quotes[len(quotes)-words:]
	whole := len(data) / 64
	if whole > 0 {
		seen = masks(data[:64*whole], sep, quote, s[:whole], l[:whole], q[:whole])
	}
	if rest := data[64*whole:]; len(rest) > 0 {
		var ms, ml, mq uint64
		for j, c := range rest {
			if c == sep {
				ms |= 1 << uint(j)
			}
			if c == '\n' {
				ml |= 1 << uint(j)
			}
			if c == quote {
				mq |= 1 << uint(j)
			}
		}
		s[whole], l[whole], q[whole] = ms, ml, mq
		seen = seen || mq != 0
	}
	return seps, nls, quotes, seen
}

// OutsideQuotes clears in seps and nls the bits of bytes inside quoted
// fields, quotes being the quote mask of the same text, which must start
// outside quotes. A byte is inside when an odd number of quote characters
// precede it or it is an opening quote itself (the prefix XOR of the
// quote bits); doubled quotes inside a field toggle twice and change
// nothing. This is how RFC 4180 CSV tells a separator or line end that
// ends a field from one that is part of its value.
func OutsideQuotes(quotes, seps, nls []uint64) {
	var carry uint64 // all ones when the previous word ended inside quotes
	for i, q := range quotes {
		in := prefixXor(q) ^ carry
		seps[i] &^= in
		nls[i] &^= in
		carry = uint64(int64(in) >> 63)
	}
}

// prefixXor sets bit i of the result to the XOR of bits 0..i of x.
func prefixXor(x uint64) uint64 {
	x ^= x << 1
	x ^= x << 2
	x ^= x << 4
	x ^= x << 8
	x ^= x << 16
	x ^= x << 32
	return x
}

func grow(m []uint64, words int) []uint64 {
	n := len(m) + words
	if cap(m) < n {
		m = append(make([]uint64, 0, n+n/4), m...)
	}
	return m[:n]
}

// SWAR constants: eight bytes handled at once in a uint64.
const (
	low7 = 0x7f7f7f7f7f7f7f7f
	ones = 0x0101010101010101
)

// zeroBytes sets the high bit of every byte of x that is zero, and only
// of those (no carry crosses bytes, unlike the shorter borrow trick).
func zeroBytes(x uint64) uint64 {
	return ^(((x & low7) + low7) | x | low7)
}

// gatherHigh packs the high bits of the eight bytes of x (all other bits
// clear) into the low eight bits, byte 0 first: the multiplication moves
// bit 8k+7 to bit 56+k without carries, as each product term lands on
// its own bit.
func gatherHigh(x uint64) uint64 {
	return ((x >> 7) * 0x0102040810204080) >> 56
}

// masksPortable builds the masks of whole 64-byte blocks eight bytes at a
// time and reports whether the byte quote occurs.
func masksPortable(data []byte, sep, quote byte, seps, nls, quotes []uint64) bool {
	sepBytes := uint64(sep) * ones
	quoteBytes := uint64(quote) * ones
	const nlBytes = uint64('\n') * ones
	var seen uint64
	for i := range seps {
		block := data[64*i : 64*i+64]
		var ms, ml, mq uint64
		for k := 0; k < 8; k++ {
			x := binary.LittleEndian.Uint64(block[8*k:])
			ms |= gatherHigh(zeroBytes(x^sepBytes)) << (8 * k)
			ml |= gatherHigh(zeroBytes(x^nlBytes)) << (8 * k)
			mq |= gatherHigh(zeroBytes(x^quoteBytes)) << (8 * k)
		}
		seps[i], nls[i], quotes[i] = ms, ml, mq
		seen |= mq
	}
	return seen != 0
}

// Next returns the position of the first set bit of m at or after from
// and before limit, or limit when there is none. m must cover limit.
func Next(m []uint64, from, limit int) int {
	if from >= limit {
		return limit
	}
	wi := from >> 6
	if x := m[wi] >> uint(from&63); x != 0 {
		return min(from+bits.TrailingZeros64(x), limit)
	}
	for wi++; wi<<6 < limit; wi++ {
		if x := m[wi]; x != 0 {
			return min(wi<<6+bits.TrailingZeros64(x), limit)
		}
	}
	return limit
}

// Count returns the number of set bits of m in [from, to).
func Count(m []uint64, from, to int) int {
	if from >= to {
		return 0
	}
	fw, tw := from>>6, (to-1)>>6
	first := m[fw] &^ (1<<uint(from&63) - 1)
	lastMask := ^uint64(0) >> uint(63-(to-1)&63)
	if fw == tw {
		return bits.OnesCount64(first & lastMask)
	}
	n := bits.OnesCount64(first)
	for i := fw + 1; i < tw; i++ {
		n += bits.OnesCount64(m[i])
	}
	return n + bits.OnesCount64(m[tw]&lastMask)
}
