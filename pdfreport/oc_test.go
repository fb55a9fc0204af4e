package pdfreport

import (
	"strings"
	"testing"

	"probity/plan/numfmt"
	"probity/plan/record"
)

// TestOCFigureNamesEstimatesOffTheTrueErrorAxis: the estimates are no
// longer triangles on the "true error" axis with a legend that only says
// "estimate, accepted": the caption numbers each one, names its candidate
// and says they are observations, not true error rates.
func TestOCFigureNamesEstimatesOffTheTrueErrorAxis(t *testing.T) {
	rec := identifierRecord()
	text := flat(pdfText(t, render(t, rec, Options{})))
	if !strings.Contains(text, "observed estimates (errors / labeled), observations on the same scale, not true error rates") {
		t.Error("the caption does not say the estimates are observations, not true error rates")
	}
	for i, c := range rec.Candidates {
		want := itoa(i+1) + " = " + c.Name + " (" + numfmt.Rate(c.Estimate) + ", " + c.Verdict + ")"
		if !strings.Contains(text, want) {
			t.Errorf("the caption lacks %q", want)
		}
	}
	if strings.Contains(text, "Triangles on the axis") {
		t.Error("the caption still puts the estimates on the axis")
	}
}

// TestOCAxisCoversTheCurve: the x axis ends past every point of the curve
// and every estimate, on a tick.
func TestOCAxisCoversTheCurve(t *testing.T) {
	for _, rec := range []*record.Record{fixtureRecord("general"), manyRecord(), identifierRecord()} {
		r := *rec
		r.OC = append(append([]record.OCPoint(nil), rec.OC...), record.OCPoint{Error: 0.0731, AcceptProbability: 0})
		r.Candidates = append([]record.Candidate(nil), rec.Candidates...)
		r.Candidates[0].Estimate = 0.052
		xmax, step := ocXRange(&r)
		for _, pt := range r.OC {
			if 100*pt.Error > xmax {
				t.Errorf("axis ends at %v %%, the curve reaches %v %%", xmax, 100*pt.Error)
			}
		}
		if 5.2 > xmax {
			t.Errorf("axis ends at %v %%, an estimate is at 5.2 %%", xmax)
		}
		if k := xmax / step; k-float64(int(k+0.5)) > 1e-9 || k-float64(int(k+0.5)) < -1e-9 {
			t.Errorf("axis end %v is not on a tick of step %v", xmax, step)
		}
	}
}
