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
