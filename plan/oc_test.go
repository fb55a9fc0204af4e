package plan

import (
	"math"
	"testing"
)

func TestOCCurve(t *testing.T) {
	in := inputs(0.02, 0.95)
	in.Anticipated = ptr(0.01)
	r, _, err := Size(in)
	if err != nil {
		t.Fatal(err)
	}
	f := &File{Inputs: in, Rule: r}
	oc := f.OC(21)
	if len(oc) != 21 || oc[0].Error != 0 || oc[0].AcceptProbability != 1 {
		t.Fatalf("OC start: %+v", oc[:1])
	}
	last := oc[len(oc)-1]
	if last.Error < 2*in.Ceiling || last.AcceptProbability > 0.001 {
		t.Errorf("OC end %+v: should reach P(accept) ≤ 0.001 and at least twice the ceiling", last)
	}
	for i := 1; i < len(oc); i++ {
		if oc[i].Error <= oc[i-1].Error || oc[i].AcceptProbability > oc[i-1].AcceptProbability {
			t.Errorf("OC not increasing in error / decreasing in acceptance at %d: %+v %+v", i, oc[i-1], oc[i])
		}
		// exact: each point is the binomial CDF (scipy-checked in tails_test.go)
		if want := BinomialCDF(17, 1271, oc[i].Error); oc[i].AcceptProbability != want {
			t.Errorf("OC(%v) = %v, want %v", oc[i].Error, oc[i].AcceptProbability, want)
		}
	}
	kp := f.KeyPoints()
	found := map[float64]float64{}
	for _, p := range kp {
		found[p.Error] = p.AcceptProbability
	}
	if found[0.02] != r.ConsumerRisk || math.Abs(1-found[0.01]-*r.ProducerRisk) > 1e-15 {
		t.Errorf("key points %+v do not show the plan's risks", kp)
	}
}

// For a lot the OC points are whole numbers of errors D/N, each exact.
func TestOCCurveLot(t *testing.T) {
	in := inputs(0.1, 0.9)
	in.Population = 37
	r, _, err := Size(in)
	if err != nil {
		t.Fatal(err)
	}
	f := &File{Inputs: in, Rule: r}
	for _, p := range f.OC(50) {
		d := p.Error * 37
		if math.Abs(d-math.Round(d)) > 1e-9 {
			t.Errorf("OC point %v is not D/37", p.Error)
		}
		if want := HypergeometricCDF(r.AcceptanceNumber, 37, int64(math.Round(d)), r.SampleSize); p.AcceptProbability != want {
			t.Errorf("OC(%v) = %v, want %v", p.Error, p.AcceptProbability, want)
		}
	}
	if got := f.AcceptProbability(1.5); !math.IsNaN(got) {
		t.Errorf("AcceptProbability(1.5) = %v, want NaN", got)
	}
}

// Issue 13: the OC rows of a batch plan are computed where the stated risks
// are — the ceiling at D1 = ⌈ceiling·N⌉, p0 at D0 = ⌊p0·N⌋ — and every row is
// labeled with the rate it was computed at; "half the ceiling" is exactly
// half, or for a batch the whole number of errors at or below it. N = 43 and
// ceiling 10 % make ⌈4.3⌉ = 5 differ from round(4.3) = 4 (common practice, no
// source: the definitions of D1 and D0 in BadLotErrors and GoodLotErrors).
func TestKeyPointsLotRounding(t *testing.T) {
	in := inputs(0.10, 0.90)
	in.Population = 43
	in.Anticipated = ptr(0.035) // 1.505 errors → D0 = 1
	f, err := Build(in, Meta{Seed: "s"})
	if err != nil {
		t.Fatal(err)
	}
	if f.CeilingPoint() != 5.0/43 {
		t.Errorf("ceiling point %v, want 5/43", f.CeilingPoint())
	}
	if p0, ok := f.AnticipatedPoint(); !ok || p0 != 1.0/43 {
		t.Errorf("anticipated point %v, want 1/43", p0)
	}
	var sawCeiling, sawP0 bool
	for _, p := range f.KeyPoints() {
		d := p.Error * 43
		if math.Abs(d-math.Round(d)) > 1e-9 {
			t.Errorf("row %v is not a whole number of errors in the batch", p.Error)
		}
		switch p.Error {
		case f.CeilingPoint():
			sawCeiling = true
			if math.Abs(p.AcceptProbability-f.Rule.ConsumerRisk) > 1e-12 {
				t.Errorf("ceiling row %v, stated consumer's risk %v", p.AcceptProbability, f.Rule.ConsumerRisk)
			}
		case 1.0 / 43:
			sawP0 = true
			if math.Abs(1-p.AcceptProbability-*f.Rule.ProducerRisk) > 1e-12 {
				t.Errorf("anticipated row %v, stated producer's risk %v", 1-p.AcceptProbability, *f.Rule.ProducerRisk)
			}
		}
	}
	if !sawCeiling || !sawP0 {
		t.Errorf("rows %+v lack the ceiling or the anticipated point", f.KeyPoints())
	}
	half := f.HalfCeilingPoint()
	if half.Error != 2.0/43 { // ⌊4.3/2⌋ = 2
		t.Errorf("half the ceiling at %v, want 2/43", half.Error)
	}
	stream, err := Build(inputs(0.10, 0.90), Meta{Seed: "s"})
	if err != nil {
		t.Fatal(err)
	}
	if h := stream.HalfCeilingPoint(); h.Error != 0.05 || h.AcceptProbability != BinomialCDF(0, stream.Rule.SampleSize, 0.05) {
		t.Errorf("half the ceiling of a stream: %+v", h)
	}
}
