package planfile

import (
	"testing"
	"time"

	"probity/plan"
	"probity/plan/sequential"
)

func benchParse(b *testing.B, data []byte) {
	b.SetBytes(int64(len(data)))
	for b.Loop() {
		if _, err := Parse(data, "plan.yaml"); err != nil {
			b.Fatal(err)
		}
	}
}

// BenchmarkParseThresholds loads the demo's kind of plan (three
// thresholds, n = 1712): the search run again.
func BenchmarkParseThresholds(b *testing.B) { benchParse(b, thresholdPlan(b)) }

// BenchmarkParseSequential loads a sequential plan (fixed n = 1271,
// T = 2542): the fixed search, and the boundaries evaluated exactly at the
// ceiling and at the anticipated error.
func BenchmarkParseSequential(b *testing.B) { benchParse(b, sequentialPlan(b, 0)) }

// largeSequentialPlan is the largest sequential plan of the sequential
// package's benchmarks (ceiling 0.001, anticipated 0.0005, M = 10: fixed
// n = 45 968, T = 91 936), whose search takes seconds.
func largeSequentialPlan(b *testing.B) []byte {
	p0 := 0.0005
	in := plan.Inputs{Ceiling: 0.001, Confidence: 0.95, CandidateCount: 10, Anticipated: &p0, ProducerRisk: 0.10,
		Method: plan.MethodExact, Multiplicity: plan.Bonferroni, Design: plan.DesignSequential, Require: plan.RequireAll}
	f, err := plan.Build(in, plan.Meta{ToolVersion: "test", Created: time.Date(2026, 11, 30, 9, 0, 0, 0, time.UTC), Seed: "5eed"})
	if err != nil {
		b.Fatal(err)
	}
	if _, err := sequential.Apply(f, 0); err != nil {
		b.Fatal(err)
	}
	data, err := f.Marshal()
	if err != nil {
		b.Fatal(err)
	}
	return data
}

// BenchmarkParseSequentialLarge loads the large sequential plan: the
// boundaries are verified, not searched again.
func BenchmarkParseSequentialLarge(b *testing.B) { benchParse(b, largeSequentialPlan(b)) }

// BenchmarkDecodeSequentialLarge only decodes the same file (plan.Decode,
// no check): the baseline of BenchmarkParseSequentialLarge, since reading
// 700 kB of YAML is most of the cost of loading it.
func BenchmarkDecodeSequentialLarge(b *testing.B) {
	data := largeSequentialPlan(b)
	b.SetBytes(int64(len(data)))
	for b.Loop() {
		if _, _, err := plan.Decode(data, "plan.yaml"); err != nil {
			b.Fatal(err)
		}
	}
}
