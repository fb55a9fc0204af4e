package pdfreport

import "testing"

// Expected strings follow the formats documented in format.go (common
// practice, no source).
func TestFormats(t *testing.T) {
	cases := []struct {
		name string
		got  string
		want string
	}{
		{"pct", pct(0.021304), "2.130 %"},
		{"pct half up", pct(0.0213050001), "2.131 %"},
		{"pct zero", pct(0), "0.000 %"},
		{"pctUp rounds up", pct(0.0213001), "2.130 %"},
		{"pctUp", pctUp(0.0213001), "2.131 %"},
		{"pctUp exact stays", pctUp(0.02), "2.000 %"},
		{"pctUp noise stays", pctUp(0.1 * 0.2), "2.000 %"},
		{"pctDown", pctDown(0.0213999), "2.139 %"},
		{"pctDown one", pctDown(1), "100.000 %"},
		{"pctExact short", pctExact(0.02), "2.000 %"},
		{"pctExact long", pctExact(0.0000015), "0.00015 %"},
		{"pctExact 0.15%", pctExact(0.0015), "0.150 %"},
		{"prob", prob(0.0482912), "0.04829"},
		{"prob carry", prob(0.099996), "0.1000"},
		{"prob one", prob(1), "1.000"},
		{"prob tiny", prob(3.2e-7), "3.200e-7"},
		{"prob 1e-4", prob(0.0001), "0.0001000"},
		{"prob zero", prob(0), "0"},
		{"confidence 95", confidence(0.95), "95 %"},
		{"confidence bonferroni", confidence(1 - 0.05/3), "98.333 %"},
		{"confidence six nines", confidence(0.999999), "99.9999 %"},
		{"risk", riskPct(0.05 / 3), "1.667 %"},
		{"count", count(1250000), "1,250,000"},
		{"count small", count(999), "999"},
		{"count negative", count(-1234), "-1,234"},
	}
	for _, c := range cases {
		if c.got != c.want {
			t.Errorf("%s: got %q, want %q", c.name, c.got, c.want)
		}
	}
}
