package planfile

import (
	"fmt"
	"testing"
	"time"

	"probity/plan"
	"probity/plan/measure"
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

// measuresPlan is the demo's kind of plan with measures: three thresholds,
// fnr below 0.20 and error below 0.02 for each, 240 000 decisions at 3 %
// prevalence, with the given anticipated values.
func measuresPlan(b *testing.B, anticipated ...string) []byte {
	b.Helper()
	p0 := 0.01
	in := plan.Inputs{Ceiling: 0.02, Confidence: 0.95, CandidateCount: 3, Anticipated: &p0, ProducerRisk: 0.10,
		Method: plan.MethodExact, Multiplicity: plan.Bonferroni, Design: plan.DesignFixed, Require: plan.RequireAny}
	var cands []plan.Candidate
	for _, th := range []float64{0.35, 0.5, 0.65} {
		v := th
		cands = append(cands, plan.Candidate{Name: fmt.Sprintf("score>=%g", th), ScoreColumn: "score", Threshold: &v, Positive: "defect", Negative: "sound"})
	}
	f, err := plan.Build(in, plan.Meta{ToolVersion: "test", Created: time.Date(2026, 11, 30, 9, 0, 0, 0, time.UTC),
		Seed: "0f1e2d3c4b5a69788796a5b4c3d2e1f0", Classes: []string{"defect", "sound"}, Candidates: cands})
	if err != nil {
		b.Fatal(err)
	}
	spec := measure.Spec{Candidates: cands, Positive: "defect", Prevalence: 0.03, Decisions: 240000, Anticipated: anticipated,
		Confidence: 0.95, ProducerRisk: 0.10, Multiplicity: plan.Bonferroni, Release: "best:fnr"}
	for _, m := range []struct {
		name    string
		ceiling float64
	}{{"fnr", 0.2}, {"error", 0.02}} {
		for _, c := range cands {
			spec.Claims = append(spec.Claims, plan.MeasureClaim{Candidate: c.Name, Measure: m.name, Ceiling: m.ceiling})
		}
	}
	if f.Measures, err = measure.BuildPlan(spec); err != nil {
		b.Fatal(err)
	}
	data, err := f.Marshal()
	if err != nil {
		b.Fatal(err)
	}
	return data
}

// BenchmarkParseMeasures loads the measures plan with one anticipated fnr
// and error for every threshold.
func BenchmarkParseMeasures(b *testing.B) { benchParse(b, measuresPlan(b, "fnr:0.10", "error:0.01")) }

// BenchmarkParseMeasuresRealistic loads the measures plan with one
// anticipated fnr and error per threshold, near the demo's November log.
func BenchmarkParseMeasuresRealistic(b *testing.B) {
	benchParse(b, measuresPlan(b, "fnr:0.035,0.11,0.25", "error:0.032,0.007,0.008"))
}
