package sqlquery

import (
	"bytes"
	"encoding/csv"
	"errors"
	"fmt"
	"math"
	"math/big"
	"math/rand/v2"
	"strconv"
	"strings"
	"testing"

	"probity/sampling"
	"probity/sampling/sqlquery/chcluster"
)

// exactDecimal writes a double's exact decimal expansion.
func exactDecimal(x float64) string {
	r := new(big.Rat).SetFloat64(x)
	return r.FloatString(r.Denom().BitLen() - 1)
}

// decimalText writes a decimalPoint back as "0.DDD" text with the point
// moved by its exponent.
func decimalText(m decimalPoint) string {
	if m.Exp >= 0 {
		ip := m.Digits
		for int64(len(ip)) < m.Exp {
			ip += "0"
		}
		fp := ip[m.Exp:]
		ip = ip[:m.Exp]
		if ip == "" {
			ip = "0"
		}
		if fp == "" {
			return ip
		}
		return ip + "." + fp
	}
	return "0." + strings.Repeat("0", int(-m.Exp)) + m.Digits
}

// TestHalfway checks the exact midpoints the band expressions compare
// against with strconv.ParseFloat, which rounds correctly (half to even):
// the midpoint itself rounds to whichever neighbour halfwayBelow says, and
// a digit more or less on its last place moves it to the neighbour above
// or below. Reference: strconv.ParseFloat (Go spec: IEEE 754 round to
// nearest even), exact.
func TestHalfway(t *testing.T) {
	rng := rand.New(rand.NewPCG(1, 2))
	bs := []float64{0.1, 0.3, 0.5, 0.7, 0.9, 1, math.Nextafter(1, 2), 0.25, 0.75, 1e-300, math.SmallestNonzeroFloat64, 5e-324 * 3}
	for range 2000 {
		bs = append(bs, rng.Float64())
	}
	for _, b := range bs {
		m, tieUp := halfwayBelow(b)
		below := math.Nextafter(b, 0)
		text := decimalText(m)
		got, err := strconv.ParseFloat(text, 64)
		if err != nil {
			t.Fatal(err)
		}
		if want := map[bool]float64{true: b, false: below}[tieUp]; got != want {
			t.Errorf("%v: the midpoint %s reads as %v, want %v (tie up %v)", b, text, got, want, tieUp)
		}
		if up, _ := strconv.ParseFloat(text+"1", 64); up != b {
			t.Errorf("%v: just above the midpoint reads as %v", b, up)
		}
		// Just below: the midpoint minus one unit in a place past its last
		// digit.
		r, _ := new(big.Rat).SetString(text)
		r.Sub(r, new(big.Rat).SetFrac(big.NewInt(1), new(big.Int).Exp(big.NewInt(10), big.NewInt(int64(len(text))), nil)))
		if down, _ := strconv.ParseFloat(r.FloatString(len(text)), 64); down != below {
			t.Errorf("%v: just below the midpoint reads as %v, want %v", b, down, below)
		}
		if n := normalise(text); n != m {
			t.Errorf("normalise(%q) = %+v, want %+v", text, n, m)
		}
	}
}

// chBandCases returns band values around each edge (and 0 and 1) in the
// forms strconv.ParseFloat reads, with the interval the draw from a file
// gives each, and values both refuse.
func chBandCases(b sampling.Band) (good map[string]string, bad []string) {
	labels := b.Labels()
	good = map[string]string{}
	add := func(v string) {
		f, err := strconv.ParseFloat(strings.TrimSpace(v), 64)
		if err != nil && !errors.Is(err, strconv.ErrRange) {
			panic(fmt.Sprintf("%q: %v", v, err))
		}
		i := b.Index(f)
		if i < 0 {
			bad = append(bad, v)
			return
		}
		good[v] = labels[i]
	}
	forms := func(x float64, exact string) {
		short := strconv.FormatFloat(x, 'g', -1, 64)
		for _, v := range []string{short, strconv.FormatFloat(x, 'e', 16, 64), strconv.FormatFloat(x, 'e', 25, 64), exact,
			exact + "0000", " " + short, short + "\t", "+" + short, "00" + short, "\u3000" + short + "\u2028"} {
			add(v)
		}
		if strings.HasPrefix(exact, "0.") {
			// The point moved into the exponent: "0.123" as "123e-3".
			digits := strings.TrimLeft(exact[2:], "0")
			add(digits + "e-" + strconv.Itoa(len(exact)-2))
			add("0.0" + exact[2:] + "E+1")
		}
	}
	points := append([]float64{0, 1}, b.Edges...)
	for _, e := range points {
		x := e
		for range 3 {
			x = math.Nextafter(x, 0)
		}
		for range 7 {
			forms(x, exactDecimal(x))
			if x > 0 {
				m, _ := halfwayBelow(x)
				text := decimalText(m)
				add(text)
				add(text + "1")
				add(" " + text + "000 ")
				r, _ := new(big.Rat).SetString(text)
				r.Sub(r, new(big.Rat).SetFrac(big.NewInt(1), new(big.Int).Exp(big.NewInt(10), big.NewInt(int64(len(text))), nil)))
				add(r.FloatString(len(text)))
			}
			x = math.Nextafter(x, 2)
		}
	}
	for _, v := range []string{"-0", "-0.0", "-0e7", "0e-5", "1e-400", "-1e-400", "1.", ".5", "1e0", "0.5e0000000001", "1.00000000000000011102230246251565404236316680908203125"} {
		add(v)
	}
	for _, v := range []string{"-0.1", "-1e-300", "1.0000000000000003", "2", "1e999", "nan", "NaN", "inf", "+Inf", "-inf"} {
		add(v) // each is read, and refused as outside [0, 1]
	}
	// Text that is no number for strconv.ParseFloat either.
	bad = append(bad, "", " ", "abc", "0.5.5", "--0.5", "1e", ".", "+", "e5", "0.5e+", "0,5", "½")
	return good, bad
}

// chUnreadForms are band values strconv.ParseFloat reads but the band
// expressions refuse as not a number: hexadecimal and underscore forms,
// and exponents of more than nine digits. A draw inside ClickHouse
// refuses a table holding them; it never classifies them differently.
var chUnreadForms = []string{"0x1p-1", "0X.8p0", "0.2_5", "1e-99999999999"}

// TestClickHouseBandValues runs the counts query on a table of band values
// around every edge — shortest and long forms, exact midpoints between
// neighbouring doubles and a digit either side, exponents, signs, spaces —
// and requires each interval's count to be the one
// strconv.ParseFloat and sampling.Band.Index give (the draw from a file),
// and the refused values to be counted as such.
func TestClickHouseBandValues(t *testing.T) {
	c := chcluster.Start(t)
	b, err := sampling.ParseBand("score text=0.1,0.3,0.5,0.7,0.9")
	if err != nil {
		t.Fatal(err)
	}
	good, bad := chBandCases(b)
	for _, v := range chUnreadForms {
		if _, err := strconv.ParseFloat(v, 64); err != nil {
			t.Fatalf("%q: strconv.ParseFloat no longer reads it: %v", v, err)
		}
	}
	bad = append(bad, chUnreadForms...)
	want := map[string]int64{}
	var load bytes.Buffer
	i := 0
	row := func(v string) {
		i++
		// The other columns of the invented log's table.
		fmt.Fprintf(&load, "\"id%d\",\\N,\"web\",0.5,\"ok\",\\N,%s\n", i, csvQuote(v))
	}
	for v, label := range good {
		row(v)
		want[label]++
	}
	for _, v := range bad {
		row(v)
	}
	table := chLoad(t, c, "band values", load.Bytes())
	p := e2ePlan(10)
	s := &Spec{Format: QueryFormat, ToolVersion: "test", Dialect: ClickHouse, PlanFingerprint: "f00d", Seed: p.Seed, SelectionSeed: p.Seed,
		Table: table, IDColumn: chColumns[0], Bands: []string{b.String()}, Candidates: p.Candidates, SampleSize: 10, Allocation: "proportional"}
	q, err := CountsQuery(s)
	if err != nil {
		t.Fatal(err)
	}
	out := c.MustQuery(t, q, nil)
	recs, err := csv.NewReader(bytes.NewReader(out)).ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	got := map[string]int64{}
	var badRows int64
	for _, r := range recs[1:] {
		n, _ := strconv.ParseInt(r[colStratumSize], 10, 64)
		switch r[colKind] {
		case KindStratum:
			got[r[colStratum]] = n
		case KindBadValue:
			if r[colDetail] != "band:score text" {
				t.Errorf("bad value row %q", r)
			}
			badRows += n
		}
	}
	for _, l := range b.Labels() {
		if got[l] != want[l] {
			t.Errorf("interval %s: %d values inside ClickHouse, %d by strconv.ParseFloat", l, got[l], want[l])
		}
	}
	if badRows != int64(len(bad)) {
		t.Errorf("%d values refused inside ClickHouse, want %d", badRows, len(bad))
	}
	t.Logf("%d values classified, %d refused", len(good), len(bad))
}
