package agreement

import (
	"math"
	"strings"
	"testing"
)

func TestDisagreementRateAndNote(t *testing.T) {
	res, err := Resolve(newFixture().in)
	if err != nil {
		t.Fatal(err)
	}
	q := res.Quality
	// 1 of 3 compared items disagree; one-sided 95 % Clopper–Pearson upper
	// bound = Beta(2, 2) 0.95-quantile = 0.8646496378284161
	// (scipy.stats.beta.ppf(0.95, 2, 2), scipy 1.10.1).
	if q.Disagreed != 1 || !near(q.DisagreementRate, 1.0/3, 1e-15) || !near(q.DisagreementUpper, 0.8646496378284161, 1e-9) {
		t.Errorf("disagreed %d rate %v upper %v", q.Disagreed, q.DisagreementRate, q.DisagreementUpper)
	}
	for _, want := range []string{
		"can differ from the measured one by up to ε",
		"On the 3 doubled items both labelers put in a class they disagreed on 1 (33.333 %; one-sided 95 % upper bound 86.465 %)",
		"wrong on at least 16.666 % of items on average",
		"settled by adjudication",
	} {
		if !strings.Contains(q.Note, want) {
			t.Errorf("note lacks %q:\n%s", want, q.Note)
		}
	}

	f := newFixture()
	f.in.Adjudications, f.in.AdjudicationFile, f.in.AllowUnadjudicated = nil, "", true
	res, err = Resolve(f.in)
	if err != nil {
		t.Fatal(err)
	}
	if !strings.Contains(res.Quality.Note, "2 disagreements were not adjudicated and are counted as errors for every candidate") {
		t.Errorf("note does not state the unadjudicated treatment:\n%s", res.Quality.Note)
	}
}

func TestNoteWithoutComparedItems(t *testing.T) {
	f := newFixture()
	// No doubled pair is comparable: the first labels of the doubled items
	// are blank and the second ones unsure.
	for i := range f.in.First[:6] {
		f.in.First[i].Label = ""
	}
	for i := range f.in.Second {
		f.in.Second[i].Label = "unsure"
	}
	f.in.Adjudications, f.in.AdjudicationFile = nil, ""
	res, err := Resolve(f.in)
	if err != nil {
		t.Fatal(err)
	}
	q := res.Quality
	if q.Compared != 0 || q.Kappa.Defined || q.AC1.Defined || q.DisagreementUpper != 0 {
		t.Errorf("compared %d kappa %+v AC1 %+v upper %v", q.Compared, q.Kappa, q.AC1, q.DisagreementUpper)
	}
	if !strings.Contains(q.Note, "no measure of label error") {
		t.Errorf("note: %s", q.Note)
	}
	// Items 1–6 are unsure (neither labeler gave a class) plus item 9.
	if q.Unsure != 7 {
		t.Errorf("unsure = %d, want 7", q.Unsure)
	}
}

func TestUnsureTreatment(t *testing.T) {
	cases := []struct {
		unsure, replaced int
		allow            bool
		want             string
	}{
		{0, 0, false, "none"},
		{3, 3, false, "all 3 replaced by spares, in draw order"},
		{3, 1, true, "1 replaced by spares, in draw order; the other 2 counted as errors for every candidate (incomplete labeling allowed)"},
		{2, 0, true, "all 2 counted as errors for every candidate (incomplete labeling allowed)"},
		{2, 1, false, "1 replaced by spares, in draw order; 1 not replaced"},
		{2, 0, false, "2 not replaced"},
	}
	for _, c := range cases {
		if got := UnsureTreatment(c.unsure, c.replaced, c.allow); got != c.want {
			t.Errorf("UnsureTreatment(%d, %d, %v) = %q, want %q", c.unsure, c.replaced, c.allow, got, c.want)
		}
	}
}

func TestDegenerateIntervalIsFlagged(t *testing.T) {
	// All six doubled items agreed, three in each class: κ = AC1 = 1 with
	// zero variance (exact arithmetic: see TestCohenKappaEdgeCases).
	f := newFixture()
	for i := range 6 {
		l := "ok"
		if i%2 == 0 {
			l = "defect"
		}
		f.in.First[i].Label, f.in.Second[i].Label = l, l
	}
	f.in.Adjudications, f.in.AdjudicationFile = nil, ""
	res, err := Resolve(f.in)
	if err != nil {
		t.Fatal(err)
	}
	q := res.Quality
	for _, a := range []struct {
		name string
		v    float64
		note string
	}{{"kappa", q.Kappa.Value, q.Kappa.Note}, {"AC1", q.AC1.Value, q.AC1.Note}} {
		if !near(a.v, 1, 1e-12) || a.note != DegenerateNote {
			t.Errorf("%s = %v, note %q; want 1 with the degenerate-interval note", a.name, a.v, a.note)
		}
	}
	// 0 of 6 disagree: Clopper–Pearson one-sided 95 % upper bound
	// 1 − 0.05^(1/6) = 0.39303 (closed form for x = 0).
	if !near(q.DisagreementUpper, 1-math.Pow(0.05, 1.0/6), 1e-9) {
		t.Errorf("disagreement upper %v", q.DisagreementUpper)
	}
	// The fixture's kappa (0.4, se 0.39) is not degenerate.
	res, err = Resolve(newFixture().in)
	if err != nil {
		t.Fatal(err)
	}
	if res.Quality.Kappa.Note != "" || res.Quality.AC1.Note != "" {
		t.Errorf("notes on a regular table: %q %q", res.Quality.Kappa.Note, res.Quality.AC1.Note)
	}
}

func TestNoteComparesLabelErrorWithTheCeiling(t *testing.T) {
	// The fixture's lower bound on a labeler's error is 1/6 (16.7 %); it
	// is called not small when at least a quarter of the ceiling.
	for _, c := range []struct {
		ceiling float64
		want    string
		notWant string
	}{
		{0.9, "wrong on at least 16.666 % of items on average, against an error ceiling of 90 %; ", "not small"},
		{0.2, "against an error ceiling of 20 %: label error of this size is not small beside the ceiling; ", ""},
		{0, "wrong on at least 16.666 % of items on average; ", "ceiling of"},
	} {
		f := newFixture()
		f.in.Ceiling = c.ceiling
		res, err := Resolve(f.in)
		if err != nil {
			t.Fatal(err)
		}
		n := res.Quality.Note
		if !strings.Contains(n, c.want) || (c.notWant != "" && strings.Contains(n, c.notWant)) {
			t.Errorf("ceiling %v: note\n%s\nwant %q, not %q", c.ceiling, n, c.want, c.notWant)
		}
	}
}
