package pdfreport

import "testing"

// BenchmarkRender lays out the three-candidate fixture (6 pages).
func BenchmarkRender(b *testing.B) {
	rec := fixtureRecord("medical")
	b.ReportAllocs()
	for b.Loop() {
		if _, err := Render(rec, Options{Paper: "a4"}); err != nil {
			b.Fatal(err)
		}
	}
}

// BenchmarkRenderMany lays out 12 candidates × 20 strata (16 pages).
func BenchmarkRenderMany(b *testing.B) {
	rec := manyRecord()
	b.ReportAllocs()
	for b.Loop() {
		if _, err := Render(rec, Options{Paper: "letter"}); err != nil {
			b.Fatal(err)
		}
	}
}

// BenchmarkOCFigure draws the OC figure alone, for comparison.
func BenchmarkOCFigure(b *testing.B) {
	rec := fixtureRecord("medical")
	b.ReportAllocs()
	for b.Loop() {
		if _, err := ocFigure(rec); err != nil {
			b.Fatal(err)
		}
	}
}
