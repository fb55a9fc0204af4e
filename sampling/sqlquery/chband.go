package sqlquery

import (
	"fmt"
	"math"
	"math/big"
	"strconv"
	"strings"
	"unicode"

	"probity/sampling"
)

// ClickHouse reads decimal text into Float64 with a fast routine that is
// not correctly rounded (about one ten-digit decimal in fifty lands one
// unit in the last place away from the nearest double), so a band value
// next to an edge could fall on the other side of it than in the draw from
// a file, which uses Go's correctly rounded strconv.ParseFloat. The band
// expressions below therefore never convert a value to a float: they
// decide, on the decimal digits alone, which side of each edge the
// correctly rounded double would fall.
//
// A value's text, trimmed of the spaces Go's bytes.TrimSpace trims, must
// read [sign] digits [. digits] [e|E [sign] digits] with at least one digit
// before the exponent (the decimal syntax of strconv.ParseFloat; its
// hexadecimal, underscore, Inf and NaN forms are reported as values that
// are not a number in [0, 1]). Its magnitude is normalised to 0.D × 10^P,
// D the digits without leading or trailing zeros ("" for zero). Two such
// pairs compare as (P, D): for digit strings without trailing zeros, byte
// order is numeric order. The correctly rounded double of the value is at
// or above a double b exactly when the value is above the midpoint m
// between b and the double just below it, or equal to m and b's last
// significand bit is even (round half to even, IEEE 754-2019 §4.3.1); each
// such m is a terminating decimal, computed exactly here with math/big.

// scoreTextPattern is the RE2 pattern of a band value with capture groups
// 1 sign, 2 integer digits, 4 fraction digits, 6 exponent sign, 7 exponent
// digits (at most 9 after leading zeros). The space class holds the
// characters unicode.IsSpace accepts, which bytes.TrimSpace trims.
var scoreTextPattern = func() string {
	var runes []rune
	for _, r16 := range unicode.White_Space.R16 {
		for r := rune(r16.Lo); r <= rune(r16.Hi); r += rune(r16.Stride) {
			runes = append(runes, r)
		}
	}
	for _, r32 := range unicode.White_Space.R32 {
		for r := rune(r32.Lo); r <= rune(r32.Hi); r += rune(r32.Stride) {
			runes = append(runes, r)
		}
	}
	var class strings.Builder
	class.WriteString("[")
	for i := 0; i < len(runes); {
		j := i
		for j+1 < len(runes) && runes[j+1] == runes[j]+1 {
			j++
		}
		fmt.Fprintf(&class, `\x{%X}`, runes[i])
		if j > i {
			fmt.Fprintf(&class, `-\x{%X}`, runes[j])
		}
		i = j + 1
	}
	class.WriteString("]*")
	sp := class.String()
	return "^" + sp + `([+-]?)([0-9]*)(\.([0-9]*))?([eE]([+-]?)0*([0-9]{1,9}))?` + sp + "$"
}()

// decimalPoint is a positive number as 0.D × 10^P: Digits has no leading
// or trailing zeros.
type decimalPoint struct {
	Digits string
	Exp    int64
}

// halfwayBelow returns the exact midpoint between b > 0 and the largest
// double below it, and whether a value equal to it rounds up to b.
func halfwayBelow(b float64) (decimalPoint, bool) {
	return halfway(math.Nextafter(b, 0), b), math.Float64bits(b)&1 == 0
}

// halfway returns (a + b) / 2 for doubles 0 ≤ a < b, exactly.
func halfway(a, b float64) decimalPoint {
	m := new(big.Rat).Add(new(big.Rat).SetFloat64(a), new(big.Rat).SetFloat64(b))
	m.Quo(m, big.NewRat(2, 1))
	// The denominator is a power of two, 2^k, so k fraction digits are
	// exact.
	k := m.Denom().BitLen() - 1
	return normalise(m.FloatString(k))
}

// normalise writes the decimal text "I.F" (or "I") of a positive number
// as 0.D × 10^P.
func normalise(text string) decimalPoint {
	ip, fp, _ := strings.Cut(text, ".")
	digits := ip + fp
	d := strings.TrimLeft(digits, "0")
	exp := int64(len(ip) - (len(digits) - len(d)))
	return decimalPoint{Digits: strings.TrimRight(d, "0"), Exp: exp}
}

// chBandValue holds the aliases of one band value's parts in a ClickHouse
// query: its text (x), whether it has the decimal syntax (ok), its sign,
// its digits, normalised digits (d) and exponent (p), and whether it is in
// [0, 1] (in).
type chBandValue struct {
	x, ok, parts, sign, digits, d, p, in string
}

// with returns the WITH entries that compute the parts from the value's
// text expression; pattern is the alias of scoreTextPattern's literal.
func (v chBandValue) with(text, pattern string, lit func(string) string) []withEntry {
	return []withEntry{
		{v.x, text},
		{v.ok, "match(" + v.x + ", " + pattern + ")"},
		{v.parts, "splitByChar('|', replaceRegexpOne(" + v.x + ", " + pattern + ", " + lit(`\1|\2|\4|\6|\7`) + "))"},
		{v.sign, v.parts + "[1]"},
		{v.digits, "concat(" + v.parts + "[2], " + v.parts + "[3])"},
		{v.d, "replaceRegexpOne(replaceRegexpOne(" + v.digits + ", '^0+', ''), '0+$', '')"},
		{v.p, "toInt64(length(" + v.parts + "[2])) - (toInt64(length(" + v.digits + ")) - toInt64(length(replaceRegexpOne(" + v.digits + ", '^0+', ''))))" +
			" + if(" + v.parts + "[4] = '-', -1, 1) * toInt64OrZero(" + v.parts + "[5])"},
		{v.in, v.inRange(lit)},
	}
}

// above is true when the magnitude is above m.
func (v chBandValue) above(m decimalPoint, lit func(string) string) string {
	e := strconv.FormatInt(m.Exp, 10)
	return "(" + v.d + " != '' AND (" + v.p + " > " + e + " OR (" + v.p + " = " + e + " AND " + v.d + " > " + lit(m.Digits) + ")))"
}

// roundsUpTo is true when the magnitude's correctly rounded double is at
// or above b (b > 0).
func (v chBandValue) roundsUpTo(b float64, lit func(string) string) string {
	m, tieUp := halfwayBelow(b)
	if !tieUp {
		return v.above(m, lit)
	}
	e := strconv.FormatInt(m.Exp, 10)
	return "(" + v.above(m, lit) + " OR (" + v.p + " = " + e + " AND " + v.d + " = " + lit(m.Digits) + "))"
}

// inRange is true when the value has the decimal syntax and its correctly
// rounded double is in [0, 1]: a negative value must round to −0 (its
// magnitude at most 2^−1075, half the smallest subnormal), a positive one
// must not round above 1.
func (v chBandValue) inRange(lit func(string) string) string {
	neg := "NOT " + v.roundsUpTo(math.SmallestNonzeroFloat64, lit)
	pos := "NOT " + v.roundsUpTo(math.Nextafter(1, 2), lit)
	return v.ok + " AND " + v.digits + " != '' AND if(" + v.sign + " = '-', " + neg + ", " + pos + ")"
}

// label is the band interval of an in-range value (sampling.Band.Labels):
// the last interval whose lower edge the value reaches; "" out of range.
func (v chBandValue) label(b sampling.Band, lit func(string) string) string {
	labels := b.Labels()
	var e strings.Builder
	e.WriteString("multiIf(NOT " + v.in + ", ''")
	for i := len(b.Edges) - 1; i >= 0; i-- {
		e.WriteString(", " + v.sign + " != '-' AND " + v.roundsUpTo(b.Edges[i], lit) + ", " + lit(labels[i+1]))
	}
	e.WriteString(", " + lit(labels[0]) + ")")
	return e.String()
}
