package trend

import (
	"bytes"
	"errors"
	"fmt"
	"image/png"
	"os"
	"path/filepath"
	"strings"
	"testing"
	"time"

	"probity/plan/record"
	"probity/plan/trend"
)

// monthly loads the year of records in testdata/trend/monthly.
func monthly(t testing.TB, opts trend.Options) *trend.Trend {
	t.Helper()
	l, err := trend.Load([]string{"../../testdata/trend/monthly"})
	if err != nil {
		t.Fatal(err)
	}
	if opts.Alpha == 0 {
		opts.Alpha = 0.05
	}
	tr, err := trend.Build(l.Entries, opts)
	if err != nil {
		t.Fatal(err)
	}
	return tr
}

func TestPNG(t *testing.T) {
	tr := monthly(t, trend.Options{})
	w, h := ChartSize(tr)
	data, err := PNG(tr, w, h, 120)
	if err != nil {
		t.Fatal(err)
	}
	img, err := png.Decode(bytes.NewReader(data))
	if err != nil {
		t.Fatal(err)
	}
	b := img.Bounds()
	if b.Dx() != 1200 || b.Dy() != int(h.Points()/72*120+0.5) {
		t.Errorf("image is %d × %d, want 1200 × %d", b.Dx(), b.Dy(), int(h.Points()/72*120+0.5))
	}
	again, err := PNG(tr, w, h, 120)
	if err != nil {
		t.Fatal(err)
	}
	if !bytes.Equal(data, again) {
		t.Error("the same trend drew two different PNGs")
	}
	if dir := os.Getenv("PROBITY_TREND_LOOK"); dir != "" {
		if err := os.WriteFile(filepath.Join(dir, "chart.png"), data, 0o644); err != nil {
			t.Fatal(err)
		}
	}
}

func TestPNGRefusesBadTrends(t *testing.T) {
	tr := monthly(t, trend.Options{})
	w, h := ChartSize(tr)
	if _, err := PNG(tr, 10, h, 120); !errors.Is(err, ErrTrend) {
		t.Errorf("tiny width: %v", err)
	}
	if _, err := PNG(&trend.Trend{}, w, h, 120); !errors.Is(err, ErrTrend) {
		t.Errorf("empty trend: %v", err)
	}
	bad := monthly(t, trend.Options{})
	bad.Candidates[0].Rows[3].Period = "2031-01"
	if _, err := PNG(bad, w, h, 120); !errors.Is(err, ErrTrend) {
		t.Errorf("row of an unknown period: %v", err)
	}
}

func TestPDF(t *testing.T) {
	tr := monthly(t, trend.Options{})
	info := PageInfo{Date: time.Date(2026, 12, 28, 0, 0, 0, 0, time.UTC), ToolVersion: "0.1.0"}
	data, err := PDF(tr, info)
	if err != nil {
		t.Fatal(err)
	}
	if !bytes.HasPrefix(data, []byte("%PDF-")) {
		t.Fatal("not a PDF")
	}
	again, err := PDF(tr, info)
	if err != nil {
		t.Fatal(err)
	}
	if !bytes.Equal(data, again) {
		t.Error("the same trend and date gave two different PDFs")
	}
	if dir := os.Getenv("PROBITY_TREND_LOOK"); dir != "" {
		if err := os.WriteFile(filepath.Join(dir, "trend.pdf"), data, 0o644); err != nil {
			t.Fatal(err)
		}
	}
}

// TestPDFManyCandidatesAndWarnings lays out a full page: four
// candidates, one missing from the early periods, two plan files, 18
// periods.
func TestPDFManyCandidatesAndWarnings(t *testing.T) {
	l, err := trend.Load([]string{"../../testdata/trend/monthly"})
	if err != nil {
		t.Fatal(err)
	}
	es := l.Entries
	for i := 0; i < 6; i++ {
		e := es[i]
		e.Record.Period = fmt.Sprintf("2027-%02d", i+1)
		e.Path = fmt.Sprintf("extra/%s.json", e.Record.Period)
		es = append(es, e)
	}
	for i := range es {
		r := &es[i].Record
		r.Candidates = append([]record.Candidate(nil), r.Candidates...)
		if i >= 9 {
			r.Plan.Fingerprint = strings.Repeat("cd", 32)
			r.Candidates = append(r.Candidates, record.Candidate{Name: "router-c-with-a-long-name", Labeled: 613, Errors: i % 4,
				Estimate: float64(i%4) / 613, UpperBound: 0.004 + 0.003*float64(i%4), BoundConfidence: 0.9875, Verdict: record.Accept})
		}
	}
	tr, err := trend.Build(es, trend.Options{Alpha: 0.05})
	if err != nil {
		t.Fatal(err)
	}
	if len(tr.Warnings) < 2 {
		t.Fatalf("want warnings, got %v", tr.Warnings)
	}
	data, err := PDF(tr, PageInfo{Date: time.Date(2027, 6, 28, 0, 0, 0, 0, time.UTC), ToolVersion: "0.1.0"})
	if err != nil {
		t.Fatal(err)
	}
	if dir := os.Getenv("PROBITY_TREND_LOOK"); dir != "" {
		if err := os.WriteFile(filepath.Join(dir, "wide.pdf"), data, 0o644); err != nil {
			t.Fatal(err)
		}
	}
	// Too many periods for one page are refused, not squeezed.
	var many []trend.Entry
	for i := 0; i < maxPeriods+1; i++ {
		e := l.Entries[i%12]
		e.Record.Period = fmt.Sprintf("p%03d", i)
		many = append(many, e)
	}
	big, err := trend.Build(many, trend.Options{Alpha: 0.05})
	if err != nil {
		t.Fatal(err)
	}
	if _, err := PDF(big, PageInfo{}); !errors.Is(err, ErrTrend) {
		t.Errorf("%d periods: err = %v", len(many), err)
	}
}
