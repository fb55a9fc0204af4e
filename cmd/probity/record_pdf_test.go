package main

import (
	"math"
	"os"
	"os/exec"
	"path/filepath"
	"strconv"
	"strings"
	"testing"

	"probity/plan/testkit/needs"
)

// pdfText extracts the text of a PDF with pdftotext (poppler-utils), and
// checks that pdftoppm renders every page.
func pdfText(t *testing.T, path string) string {
	t.Helper()
	pdftotext, pdftoppm := needs.Program(t, "pdftotext"), needs.Program(t, "pdftoppm")
	out, err := exec.Command(pdftotext, "-layout", path, "-").Output()
	if err != nil {
		t.Fatalf("pdftotext %s: %v", path, err)
	}
	if err := exec.Command(pdftoppm, "-png", "-r", "30", path, filepath.Join(t.TempDir(), "page")).Run(); err != nil {
		t.Fatalf("pdftoppm %s: %v", path, err)
	}
	return string(out)
}

// TestRecordPDFShowsVerdictsAndCautions: the record.pdf that record writes
// holds each candidate's verdict and bound, the cautions of the declared
// use, the sign-off names (UTF-8) and the signing key; --templates
// overrides a caution and a broken override is refused naming the file.
func TestRecordPDFShowsVerdictsAndCautions(t *testing.T) {
	t.Parallel()
	fx := newRecFixture(t, true, 0)
	labels := fx.labels(t, "labels.csv", nil)
	key := filepath.Join(fx.dir, "key")
	runProbity(t, "keygen", "--out", key)
	signoff := writeTemp(t, fx.dir, "signoff.yaml", "reviewed:\n  name: Jörg Þórsson\n  title: Model-risk reviewer\n  date: 2026-12-02\n")
	out := filepath.Join(fx.dir, "rec")
	code, stdout, stderr := runProbity(t, "record", "--plan", fx.planPath, "--draw", fx.draw, "--labels", labels, "--out", out,
		"--use", "medical", "--signoff", signoff, "--sign-key", key, "--date", "2026-12-01", "--paper", "letter")
	if code != exitRejected {
		t.Fatalf("exit %d\n%s%s", code, stdout, stderr)
	}
	r := readRecord(t, out)
	text := pdfText(t, filepath.Join(out, "record.pdf"))
	flat := strings.Join(strings.Fields(text), " ")
	for _, want := range []string{"sorter-a", "sorter-b", "ACCEPT", "REJECT", "Jörg Þórsson", r.RecordID, "clinical validation", r.SigningKey[:20]} {
		if !strings.Contains(flat, want) {
			t.Errorf("record.pdf text lacks %q", want)
		}
	}
	for _, c := range r.Candidates {
		if b := boundText(c.UpperBound); !strings.Contains(flat, b) {
			t.Errorf("record.pdf text lacks %s's bound %s", c.Name, b)
		}
	}

	tdir := filepath.Join(fx.dir, "wording")
	os.Mkdir(tdir, 0o755)
	writeFile(t, filepath.Join(tdir, "caution-medical.md"), []byte("Invented override: consult the hospital's device committee. Defer to the local codes; the regulator and licensed clinicians decide.\n"))
	out2 := filepath.Join(fx.dir, "rec2")
	runProbity(t, "record", "--plan", fx.planPath, "--draw", fx.draw, "--labels", labels, "--out", out2, "--use", "medical", "--templates", tdir)
	if flat := strings.Join(strings.Fields(pdfText(t, filepath.Join(out2, "record.pdf"))), " "); !strings.Contains(flat, "consult the hospital's device committee") || strings.Contains(flat, "clinical validation") {
		t.Errorf("the --templates override is not what record.pdf shows")
	}
	writeFile(t, filepath.Join(tdir, "caution-aviation.md"), []byte("x\n"))
	out3 := filepath.Join(fx.dir, "rec3")
	code, _, stderr = runProbity(t, "record", "--plan", fx.planPath, "--draw", fx.draw, "--labels", labels, "--out", out3, "--templates", tdir)
	if code != exitBadInput || !strings.Contains(stderr, "caution-aviation.md") {
		t.Errorf("bad override: exit %d: %s", code, stderr)
	}
	if _, err := os.Stat(out3); err == nil {
		t.Errorf("a refused record left %s", out3)
	}
}

// boundText is how the PDF prints an upper bound: a percentage with three
// decimals, rounded up (so a printed bound is never tighter than computed).
func boundText(x float64) string {
	return strconv.FormatFloat(math.Ceil(100*x*1000-1e-9)/1000, 'f', 3, 64) + " %"
}
