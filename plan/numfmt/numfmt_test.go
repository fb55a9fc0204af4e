package numfmt

import (
	"math"
	"strconv"
	"testing"
)

// Expected strings follow the rules of the package comment (common
// practice, no source); each is exact.
func TestFormats(t *testing.T) {
	cases := []struct {
		name string
		got  string
		want string
	}{
		{"rate", Rate(0.021304), "2.130 %"},
		{"rate half up", Rate(0.0213050001), "2.131 %"},
		{"rate zero", Rate(0), "0.000 %"},
		{"rate negative zero", Rate(math.Copysign(0, -1)), "0.000 %"},
		{"rate noise", Rate(0.1 * 0.2), "2.000 %"},
		{"rate nan", Rate(math.NaN()), "–"},
		{"rateUp", RateUp(0.0213001), "2.131 %"},
		{"rateUp exact stays", RateUp(0.02), "2.000 %"},
		{"rateUp noise stays", RateUp(0.1 * 0.2), "2.000 %"},
		// The demo's November bound for defect_score>=0.50 (issue 16:
		// the trend showed 1.194 %, the PDF 1.195 %).
		{"rateUp demo", RateUp(0.011944), "1.195 %"},
		{"chanceUp", ChanceUp(0.0165012), "1.651 %"},
		{"chanceUp exact stays", ChanceUp(0.0165), "1.65 %"},
		{"chanceUp demo count-rule bound", ChanceUp(0.0164986126450777), "1.65 %"},
		{"chanceUp large", ChanceUp(0.0995001), "9.951 %"},
		{"rateDown", RateDown(0.0213999), "2.139 %"},
		{"rateDown one", RateDown(1), "100.000 %"},
		{"rateDown a sixtieth", RateDown(1.0 / 60), "1.666 %"},
		{"setting", Setting(0.02), "2 %"},
		{"setting half", Setting(0.005), "0.5 %"},
		{"setting noise", Setting(0.0015), "0.15 %"},
		{"setting tiny", Setting(0.0000015), "0.00015 %"},
		{"confidence 95", Confidence(0.95), "95 %"},
		{"confidence bonferroni", Confidence(1 - 0.05/3), "98.333 %"},
		{"confidence six nines", Confidence(0.999999), "99.9999 %"},
		{"confidence one", Confidence(1), "100 %"},
		{"chance", Chance(0.016561), "1.656 %"},
		{"chance per candidate", Chance(0.05 / 3), "1.667 %"},
		{"chance trailing zeros", Chance(0.27), "27 %"},
		{"chance small", Chance(2.4891e-6), "0.0002489 %"},
		{"chance tiny", Chance(3e-11), "3e-9 %"},
		{"chance near one", Chance(0.999996), "over 99.99 %"},
		{"chance one", Chance(1), "100 %"},
		{"chance zero", Chance(0), "0 %"},
		{"pvalue", PValue(0.0482912), "0.04829"},
		{"pvalue trend", PValue(0.0844), "0.08440"},
		{"pvalue carry", PValue(0.099996), "0.1000"},
		{"pvalue one", PValue(1), "1.000"},
		{"pvalue tiny", PValue(3.2e-7), "3.200e-7"},
		{"pvalue 1e-4", PValue(0.0001), "0.0001000"},
		{"pvalue 1.8e-4", PValue(0.00018), "0.0001800"},
		{"pvalue zero", PValue(0), "0"},
		{"coefficient", Coefficient(0.7675), "0.768"},
		{"coefficient noise", Coefficient(0.7675000000000001), "0.768"},
		{"coefficient negative zero", Coefficient(-0.0001), "0.000"},
		{"coefficient down", CoefficientDown(0.9089), "0.908"},
		{"coefficient up", CoefficientUp(0.76701), "0.768"},
		{"coefficient up exact", CoefficientUp(1), "1.000"},
		{"count", Count(1250000), "1,250,000"},
		{"count int", Count(int(1712)), "1,712"},
		{"count small", Count(999), "999"},
		{"count negative", Count(-1234), "-1,234"},
		{"weight", Weight(140.1234), "140.12"},
		{"weight round", Weight(135.53177257525084), "135.53"},
		{"number", Number(0.5), "0.5"},
		{"number noise", Number(0.1 + 0.2), "0.3"},
	}
	for _, c := range cases {
		if c.got != c.want {
			t.Errorf("%s: got %q, want %q", c.name, c.got, c.want)
		}
	}
}

// TestBoundsNeverTighter: on a grid of values, the printed upper bound is
// at or above the value and the printed lower bound at or below it (up to
// the binary noise the rounding ignores).
func TestBoundsNeverTighter(t *testing.T) {
	parse := func(s string) float64 {
		var v float64
		for i, r := range s {
			if r == ' ' {
				f, err := parseFloat(s[:i])
				if err != nil {
					t.Fatal(err)
				}
				v = f / 100
			}
		}
		return v
	}
	for i := 0; i <= 20000; i++ {
		x := float64(i) * 0.0000499 / 1.0001
		if up := parse(RateUp(x)); up < x*(1-noise) {
			t.Fatalf("RateUp(%v) = %s is below it", x, RateUp(x))
		}
		if up := parse(ChanceUp(x)); up < x*(1-noise) {
			t.Fatalf("ChanceUp(%v) = %s is below it", x, ChanceUp(x))
		}
		if down := parse(RateDown(x)); down > x*(1+noise) {
			t.Fatalf("RateDown(%v) = %s is above it", x, RateDown(x))
		}
	}
}

func parseFloat(s string) (float64, error) { return strconv.ParseFloat(s, 64) }
