package sampling

import (
	"errors"
	"math"
	"strings"
	"testing"

	"probity/plan/inputerr"
)

func sizes(a []StratumAllocation) []int {
	out := make([]int, len(a))
	for i, x := range a {
		out[i] = x.Sample
	}
	return out
}

func eqInts(a, b []int) bool {
	if len(a) != len(b) {
		return false
	}
	for i := range a {
		if a[i] != b[i] {
			return false
		}
	}
	return true
}

func TestAllocatePublishedExamples(t *testing.T) {
	cases := []struct {
		name   string
		strata []StratumCount
		n      int
		opts   AllocOptions
		want   []int
		source string
	}{
		{
			name:   "proportional 60 of 500/300/200",
			strata: []StratumCount{{"g1", 500}, {"g2", 300}, {"g3", 200}},
			n:      60, opts: AllocOptions{Rule: Proportional},
			want:   []int{30, 18, 12},
			source: "worked example of proportional allocation, https://www.lexprep.net/sampling (citing Cochran, Sampling Techniques, 3rd ed., ch. 5)",
		},
		{
			name:   "equal 60 over three groups",
			strata: []StratumCount{{"g1", 500}, {"g2", 300}, {"g3", 200}},
			n:      60, opts: AllocOptions{Rule: Equal},
			want:   []int{20, 20, 20},
			source: "same page, equal allocation example",
		},
		{
			// Strata sizes and variances of the aerial caribou survey in
			// Lohr, Sampling: Design and Analysis, 2nd ed., Example 3.2
			// (from memory): N_h = 400, 30, 61, 18, 70, 120; s²_h = 5575,
			// 4064, 347556, 22798, 123578, 9795. Expected Neyman shares for
			// n = 225 computed independently with /usr/bin/python3
			// fractions: 62.84, 4.02, 75.66, 5.72, 51.77, 24.99; C's share
			// exceeds N_C = 61, so C is taken whole and 164 are shared again:
			// 69.01, 4.42, 6.28, 56.86, 27.44, rounded by largest remainder.
			// (The textbook's own rounded figures are not relied on.)
			name:   "neyman caribou n=225",
			strata: []StratumCount{{"A", 400}, {"B", 30}, {"C", 61}, {"D", 18}, {"E", 70}, {"F", 120}},
			n:      225,
			opts: AllocOptions{Rule: Neyman, StdDev: map[string]float64{
				"A": math.Sqrt(5575), "B": math.Sqrt(4064), "C": math.Sqrt(347556),
				"D": math.Sqrt(22798), "E": math.Sqrt(123578), "F": math.Sqrt(9795)}},
			want:   []int{69, 4, 61, 6, 57, 28},
			source: "Lohr Example 3.2 inputs (from memory); shares by python3 fractions",
		},
		{
			name:   "proportional caribou n=225",
			strata: []StratumCount{{"A", 400}, {"B", 30}, {"C", 61}, {"D", 18}, {"E", 70}, {"F", 120}},
			n:      225, opts: AllocOptions{},
			want:   []int{129, 10, 20, 6, 22, 38},
			source: "shares 128.76, 9.66, 19.64, 5.79, 22.53, 38.63 by python3 fractions; largest remainder",
		},
	}
	for _, c := range cases {
		got, err := Allocate(c.strata, c.n, c.opts)
		if err != nil {
			t.Fatalf("%s: %v", c.name, err)
		}
		if !eqInts(sizes(got), c.want) {
			t.Errorf("%s: got %v, want %v (%s)", c.name, sizes(got), c.want, c.source)
		}
	}
}

func TestAllocateRules(t *testing.T) {
	// Values worked by hand (common practice, no source).
	cases := []struct {
		name   string
		strata []StratumCount
		n      int
		opts   AllocOptions
		want   []int
		spares []int
	}{
		// Shares 5/3 each: floors 1,1,1, two units left, equal remainders:
		// label order gives them to a and b.
		{"remainder ties by label", []StratumCount{{"c", 10}, {"b", 10}, {"a", 10}}, 5, AllocOptions{}, []int{2, 2, 1}, []int{0, 0, 0}},
		// Byte order: "B" < "a".
		{"byte order", []StratumCount{{"a", 10}, {"B", 10}}, 1, AllocOptions{}, []int{1, 0}, []int{0, 0}},
		// Small stratum taken whole, the rest redistributed: shares of 50 by
		// 2/1000/98 would give tiny 0.09; with equal rule: 16.67 > 2 → take 2,
		// then 48 over two: 24/24.
		{"equal takes small whole", []StratumCount{{"a", 2}, {"b", 1000}, {"c", 98}}, 50, AllocOptions{Rule: Equal}, []int{2, 24, 24}, []int{0, 0, 0}},
		// Minimum per stratum 5: proportional gives a 0.45 → pinned at 5, rest 45 by 1000:98 → 40.98, 4.02 → 41, 4 → c pinned at 5 too, rest 40 to b.
		{"min per stratum", []StratumCount{{"a", 10}, {"b", 1000}, {"c", 98}}, 50, AllocOptions{MinPerStratum: 5}, []int{5, 40, 5}, []int{0, 0, 0}},
		// Spares capped by what is left.
		// Shares 0.29, 9.71: the left-over unit goes to b's larger remainder.
		{"spares", []StratumCount{{"a", 3}, {"b", 100}}, 10, AllocOptions{Spare: 2}, []int{0, 10}, []int{2, 2}},
		{"spares capped", []StratumCount{{"a", 1}, {"b", 100}}, 10, AllocOptions{Spare: 2}, []int{0, 10}, []int{1, 2}},
		{"whole log", []StratumCount{{"a", 4}, {"b", 6}}, 10, AllocOptions{Spare: 3}, []int{4, 6}, []int{0, 0}},
	}
	for _, c := range cases {
		got, err := Allocate(c.strata, c.n, c.opts)
		if err != nil {
			t.Fatalf("%s: %v", c.name, err)
		}
		sp := make([]int, len(got))
		for i, a := range got {
			sp[i] = a.Spare
		}
		if !eqInts(sizes(got), c.want) || !eqInts(sp, c.spares) {
			t.Errorf("%s: got %v spares %v, want %v spares %v", c.name, sizes(got), sp, c.want, c.spares)
		}
	}
}

func TestAllocateWeightsAndErrors(t *testing.T) {
	got, err := Allocate([]StratumCount{{"a", 10}, {"b", 1000}}, 20, AllocOptions{MinPerStratum: 5})
	if err != nil {
		t.Fatal(err)
	}
	if got[0].Weight != 2 || got[1].Weight != 1000.0/15 {
		t.Errorf("weights %v, %v; want 2 and 1000/15", got[0].Weight, got[1].Weight)
	}
	bad := []struct {
		name   string
		strata []StratumCount
		n      int
		opts   AllocOptions
		is     error
	}{
		{"too large", []StratumCount{{"a", 3}}, 5, AllocOptions{}, ErrSampleTooLarge},
		{"min too big", []StratumCount{{"a", 30}, {"b", 30}}, 5, AllocOptions{MinPerStratum: 3}, ErrAllocation},
		{"neyman missing", []StratumCount{{"a", 30}}, 5, AllocOptions{Rule: Neyman}, ErrAllocation},
		{"neyman zero", []StratumCount{{"a", 30}}, 5, AllocOptions{Rule: Neyman, Anticipated: map[string]float64{"a": 0}}, ErrAllocation},
		{"rule", []StratumCount{{"a", 30}}, 5, AllocOptions{Rule: "optimal"}, ErrAllocation},
		{"dup label", []StratumCount{{"a", 30}, {"a", 3}}, 5, AllocOptions{}, ErrAllocation},
		{"n zero", []StratumCount{{"a", 30}}, 0, AllocOptions{}, ErrAllocation},
	}
	for _, b := range bad {
		if _, err := Allocate(b.strata, b.n, b.opts); !errors.Is(err, b.is) {
			t.Errorf("%s: error %v, want %v", b.name, err, b.is)
		}
	}
}

func FuzzAllocate(f *testing.F) {
	f.Add(uint16(100), uint8(0), uint8(0), uint8(0), []byte{10, 200, 3, 40})
	f.Add(uint16(7), uint8(1), uint8(2), uint8(1), []byte{1, 1, 1, 1, 1, 1, 1, 1})
	f.Add(uint16(500), uint8(2), uint8(0), uint8(5), []byte{255, 1, 2})
	f.Add(uint16(3), uint8(0), uint8(9), uint8(0), []byte{0, 0, 7})
	f.Fuzz(func(t *testing.T, n16 uint16, rule, minK, spare uint8, pops []byte) {
		if len(pops) == 0 || len(pops) > 64 {
			return
		}
		strata := make([]StratumCount, len(pops))
		ant := map[string]float64{}
		var total int64
		for i, p := range pops {
			label := string(rune('A' + i))
			strata[i] = StratumCount{label, int64(p)*7 + 1}
			total += strata[i].Population
			ant[label] = (float64(p%97) + 1) / 100
		}
		opts := AllocOptions{Rule: []string{Proportional, Neyman, Equal}[int(rule)%3], MinPerStratum: int(minK % 12), Spare: int(spare % 9), Anticipated: ant}
		n := int(n16%2000) + 1
		got, err := Allocate(strata, n, opts)
		if opts.Spare > n {
			// More spares per stratum than the sample size: refused first.
			var in *inputerr.Error
			if !errors.As(err, &in) || in.Field != "spare" {
				t.Fatalf("spare %d > n %d: error %v, want the spare refused", opts.Spare, n, err)
			}
			return
		}
		if err != nil {
			if int64(n) > total && !errors.Is(err, ErrSampleTooLarge) {
				t.Fatalf("n %d > total %d: %v", n, total, err)
			}
			if !errors.Is(err, ErrAllocation) && !errors.Is(err, ErrSampleTooLarge) {
				t.Fatalf("unexpected error kind: %v", err)
			}
			// The only other refusal is a minimum the sample cannot meet.
			if int64(n) <= total && opts.MinPerStratum*len(strata) <= n {
				t.Fatalf("refused a feasible allocation: n %d, total %d, min %d × %d strata: %v", n, total, opts.MinPerStratum, len(strata), err)
			}
			return
		}
		sum := 0
		for _, a := range got {
			if a.Sample < 0 || int64(a.Sample) > a.Population {
				t.Fatalf("stratum %s: n_h %d outside [0, %d]", a.Label, a.Sample, a.Population)
			}
			if a.Spare < 0 || int64(a.Sample+a.Spare) > a.Population || a.Spare > opts.Spare {
				t.Fatalf("stratum %s: spare %d with n_h %d of %d", a.Label, a.Spare, a.Sample, a.Population)
			}
			if int64(a.Sample) < min(int64(opts.MinPerStratum), a.Population) {
				t.Fatalf("stratum %s: n_h %d below the minimum %d", a.Label, a.Sample, opts.MinPerStratum)
			}
			sum += a.Sample
		}
		if sum != n {
			t.Fatalf("allocations sum to %d, want %d", sum, n)
		}
	})
}

// Rounding proportional shares up: n_h = min(N_h, max(⌈n·N_h/N⌉, k)),
// computed by hand here (common practice, no source: the definition).
// 100 items over 1000/600/300/97/3 decisions: shares 50, 30, 15, 4.85,
// 0.15 → 50, 30, 15, 5, 1 (101 items; largest remainder gives 50, 30, 15,
// 5, 0 and leaves the smallest stratum empty).
func TestAllocateRoundUp(t *testing.T) {
	strata := []StratumCount{{"a", 1000}, {"b", 600}, {"c", 300}, {"d", 97}, {"e", 3}}
	up, err := Allocate(strata, 100, AllocOptions{Rounding: RoundUp})
	if err != nil {
		t.Fatal(err)
	}
	if got := sizes(up); !equalInts(got, []int{50, 30, 15, 5, 1}) {
		t.Errorf("rounded up: %v", got)
	}
	lr, err := Allocate(strata, 100, AllocOptions{Rounding: RoundLargestRemainder})
	if err != nil {
		t.Fatal(err)
	}
	if got := sizes(lr); !equalInts(got, []int{50, 30, 15, 5, 0}) {
		t.Errorf("largest remainder: %v", got)
	}
	// with a minimum of 4 (capped at N_h = 3 for e)
	min4, err := Allocate(strata, 100, AllocOptions{Rounding: RoundUp, MinPerStratum: 4})
	if err != nil {
		t.Fatal(err)
	}
	if got := sizes(min4); !equalInts(got, []int{50, 30, 15, 5, 3}) {
		t.Errorf("rounded up, minimum 4: %v", got)
	}
	// rounding up never samples a stratum below its share, on random strata
	for seed := uint64(0); seed < 200; seed++ {
		r := seed*2654435761 + 1
		var st []StratumCount
		var N int64
		for h := 0; h < 2+int(r%7); h++ {
			r = r*6364136223846793005 + 1442695040888963407
			v := int64(1 + (r>>33)%5000)
			st = append(st, StratumCount{Label: string(rune('a' + h)), Population: v})
			N += v
		}
		n := int(1 + int64(r>>40)%min(N, 3000))
		a, err := Allocate(st, n, AllocOptions{Rounding: RoundUp})
		if err != nil {
			t.Fatal(err)
		}
		total := 0
		for _, x := range a {
			total += x.Sample
			if int64(x.Sample)*N < int64(n)*x.Population || x.Sample < 1 || int64(x.Sample) > x.Population {
				t.Fatalf("stratum %+v of %v below its share of n = %d", x, st, n)
			}
		}
		if total < n || total > n+len(st)-1 {
			t.Fatalf("%v, n = %d: %d items", st, n, total)
		}
	}
}

// The default minimum of one per stratum applies only when the sample has
// room for it; an explicit minimum without room is refused.
func TestAllocateMinIfRoom(t *testing.T) {
	strata := []StratumCount{{"a", 1000}, {"b", 20}, {"c", 10}, {"d", 5}}
	a, err := Allocate(strata, 40, AllocOptions{Rule: Neyman, StdDev: map[string]float64{"a": 0.5, "b": 0.01, "c": 0.01, "d": 0.01}, MinPerStratum: 1, MinIfRoom: true})
	if err != nil {
		t.Fatal(err)
	}
	for _, x := range a {
		if x.Sample < 1 {
			t.Errorf("stratum %s got no item with room for one each: %v", x.Label, sizes(a))
		}
	}
	if k := EffectiveMin(strata, 3, AllocOptions{MinPerStratum: 1, MinIfRoom: true}); k != 0 {
		t.Errorf("3 items over 4 strata: minimum %d applied", k)
	}
	if _, err := Allocate(strata, 3, AllocOptions{Rule: Equal, MinPerStratum: 1, MinIfRoom: true}); err != nil {
		t.Errorf("the default minimum without room: %v", err)
	}
	if _, err := Allocate(strata, 3, AllocOptions{Rule: Equal, MinPerStratum: 1}); !errors.Is(err, ErrAllocation) {
		t.Errorf("an explicit minimum without room: %v", err)
	}
	if note := AllocationNote(a, 40, 1, ""); !strings.Contains(note, "at least 1 per stratum") || !strings.Contains(note, "inclusion weights") {
		t.Errorf("note %q", note)
	}
}

func equalInts(a, b []int) bool {
	if len(a) != len(b) {
		return false
	}
	for i := range a {
		if a[i] != b[i] {
			return false
		}
	}
	return true
}
