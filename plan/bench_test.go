package plan

import "testing"

// The issue's speed target: ceiling 0.001, confidence 0.999, M = 100 must
// plan well under 100 ms. Both the zero-failure plan and one with p0 are
// measured, including the four comparison rows.
func BenchmarkSizeStrict(b *testing.B) {
	in := inputs(0.001, 0.999)
	in.CandidateCount = 100
	for b.Loop() {
		if _, _, err := Size(in); err != nil {
			b.Fatal(err)
		}
	}
}

func BenchmarkSizeStrictAnticipated(b *testing.B) {
	in := inputs(0.001, 0.999)
	in.CandidateCount = 100
	in.Anticipated = ptr(0.0005)
	for b.Loop() {
		if _, _, err := Size(in); err != nil {
			b.Fatal(err)
		}
	}
}

func BenchmarkSizeIssueExample(b *testing.B) {
	in := inputs(0.02, 0.95)
	in.Anticipated = ptr(0.01)
	for b.Loop() {
		if _, _, err := Size(in); err != nil {
			b.Fatal(err)
		}
	}
}

func BenchmarkSizeLot(b *testing.B) {
	in := inputs(0.001, 0.999)
	in.CandidateCount = 100
	in.Anticipated = ptr(0.0005)
	in.Population = 5_000_000
	for b.Loop() {
		if _, _, err := Size(in); err != nil {
			b.Fatal(err)
		}
	}
}
