package trend

import (
	"bytes"
	"errors"
	"image/png"
	"os"
	"path/filepath"
	"testing"
	"time"

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
