package pdfreport

import (
	"reflect"
	"strings"
	"testing"

	"codeberg.org/go-fonts/liberation/liberationsansregular"
	"github.com/jung-kurt/gofpdf"
)

func TestGlueUnits(t *testing.T) {
	got := glueUnits(strings.Fields("bound 2.000 % (risk 5 %), c = 3 and errors ≤ c."))
	want := []string{"bound", "2.000 %", "(risk", "5 %),", "c = 3", "and", "errors ≤ c."}
	if !reflect.DeepEqual(got, want) {
		t.Errorf("glueUnits = %q, want %q", got, want)
	}
}

func testDoc(t *testing.T) *doc {
	t.Helper()
	pdf := gofpdf.New("P", "mm", "A4", "")
	pdf.AddUTF8FontFromBytes("sans", "", liberationsansregular.TTF)
	pdf.SetFont("sans", "", bodySize)
	return &doc{pdf: pdf, pageW: 210, pageH: 297}
}

func TestWrapKeepsWidthAndText(t *testing.T) {
	d := testDoc(t)
	text := "seam-net-00-threshold-0.30 conforms: 9d1f0c6a4be57d2e8f3a1c0b9e8d7f6a5b4c3d2e1f0a9b8c7d6e5f4a3b2c1d0e is the digest of Zoë's plan."
	for _, w := range []float64{20, 35, 60, 170} {
		lines := d.wrap(text, w)
		for _, l := range lines {
			if d.pdf.GetStringWidth(l) > w+1e-9 {
				t.Errorf("width %v: line %q is %.2f mm wide", w, l, d.pdf.GetStringWidth(l))
			}
		}
		joined := strings.ReplaceAll(strings.Join(lines, ""), " ", "")
		if joined != strings.ReplaceAll(text, " ", "") {
			t.Errorf("width %v: wrapping lost or changed text: %q", w, lines)
		}
	}
	// A long hyphenated name breaks after a hyphen, not inside a word.
	lines := d.wrap("seam-net-00-threshold-0.30", 25)
	if len(lines) < 2 || !strings.HasSuffix(lines[0], "-") {
		t.Errorf("hyphenated name wrapped as %q", lines)
	}
	if got := d.ellipsis("Acceptance record · a very long system name indeed", 30); !strings.HasSuffix(got, "…") || d.pdf.GetStringWidth(got) > 30 {
		t.Errorf("ellipsis = %q", got)
	}
}

func TestPrintable(t *testing.T) {
	cases := []struct{ in, want string }{
		{"Zoë Łukasiewicz-Øberg", "Zoë Łukasiewicz-Øberg"},
		{"model 😀\tv2", "model \uFFFD v2"},
		{"bad \xff byte", "bad \uFFFD byte"},
		{"two\nlines", "two\nlines"},
	}
	for _, c := range cases {
		if got := printable(c.in); got != c.want {
			t.Errorf("printable(%q) = %q, want %q", c.in, got, c.want)
		}
	}
}
