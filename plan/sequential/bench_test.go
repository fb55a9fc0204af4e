package sequential

import "testing"

// BenchmarkSearchExample designs the example plan (ceiling 0.02,
// anticipated 0.01, risk 0.05, producer's risk 0.10, fixed n = 1271).
func BenchmarkSearchExample(b *testing.B) {
	for i := 0; i < b.N; i++ {
		if _, err := Search(Spec{Ceiling: 0.02, Anticipated: 0.01, ConsumerRisk: 0.05, ProducerRisk: 0.10, FixedSampleSize: 1271}); err != nil {
			b.Fatal(err)
		}
	}
}

// BenchmarkSearchLarge designs the largest plan of the ASN table
// (ceiling 0.001, anticipated 0.0005, M = 10: fixed n = 45 968).
func BenchmarkSearchLarge(b *testing.B) {
	for i := 0; i < b.N; i++ {
		if _, err := Search(Spec{Ceiling: 0.001, Anticipated: 0.0005, ConsumerRisk: 0.005, ProducerRisk: 0.10, FixedSampleSize: 45968}); err != nil {
			b.Fatal(err)
		}
	}
}

// BenchmarkEvaluate is one exact dynamic programme of the example plan.
func BenchmarkEvaluate(b *testing.B) {
	d, err := Search(Spec{Ceiling: 0.02, Anticipated: 0.01, ConsumerRisk: 0.05, ProducerRisk: 0.10, FixedSampleSize: 1271})
	if err != nil {
		b.Fatal(err)
	}
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		if _, err := Evaluate(d.Rule, Binomial{P: 0.01}); err != nil {
			b.Fatal(err)
		}
	}
}
