package pdfreport

import (
	"bytes"
	"errors"
	"fmt"
	"os"
	"os/exec"
	"path/filepath"
	"regexp"
	"strconv"
	"strings"
	"sync"
	"testing"
	"time"

	"probity/plan"
	"probity/plan/numfmt"
	"probity/plan/record"
	"probity/plan/testkit/golden"
	"probity/plan/testkit/needs"
	"probity/templates"
)

const goldenDir = "../testdata/pdfreport"

func render(t *testing.T, rec *record.Record, opts Options) []byte {
	t.Helper()
	pdf, err := Render(rec, opts)
	if err != nil {
		t.Fatalf("Render: %v", err)
	}
	return pdf
}

// pdfText extracts the text of a PDF with pdftotext.
func pdfText(t *testing.T, pdf []byte, args ...string) string {
	t.Helper()
	bin := needs.Program(t, "pdftotext")
	in := filepath.Join(t.TempDir(), "r.pdf")
	if err := os.WriteFile(in, pdf, 0o644); err != nil {
		t.Fatal(err)
	}
	cmd := exec.Command(bin, append(append([]string{"-enc", "UTF-8"}, args...), in, "-")...)
	var stderr bytes.Buffer
	cmd.Stderr = &stderr
	out, err := cmd.Output()
	if err != nil || stderr.Len() > 0 {
		t.Fatalf("pdftotext: %v: %s", err, stderr.String())
	}
	return string(out)
}

var spaces = regexp.MustCompile(`\s+`)

// flat joins text with single spaces, for searching across line breaks.
func flat(s string) string { return strings.TrimSpace(spaces.ReplaceAllString(s, " ")) }

// pageCount reads the page count with pdfinfo.
func pageCount(t *testing.T, pdf []byte) int {
	t.Helper()
	bin := needs.Program(t, "pdfinfo")
	in := filepath.Join(t.TempDir(), "r.pdf")
	if err := os.WriteFile(in, pdf, 0o644); err != nil {
		t.Fatal(err)
	}
	out, err := exec.Command(bin, in).CombinedOutput()
	if err != nil {
		t.Fatalf("pdfinfo: %v: %s", err, out)
	}
	m := regexp.MustCompile(`(?m)^Pages:\s+(\d+)`).FindSubmatch(out)
	if m == nil {
		t.Fatalf("pdfinfo gave no page count: %s", out)
	}
	n, _ := strconv.Atoi(string(m[1]))
	return n
}

func TestTextHasVerdictsBoundsAndCautions(t *testing.T) {
	for _, use := range []string{"medical", "general"} {
		t.Run(use, func(t *testing.T) {
			rec := fixtureRecord(use)
			pdf := render(t, rec, Options{Paper: "a4"})
			text := flat(pdfText(t, pdf))
			layout := strings.Split(pdfText(t, pdf, "-layout"), "\n")
			for i, c := range rec.Candidates {
				// The summary: the name on its own line, whole, and the
				// bound, verdict and reason on the next line.
				row := false
				for j, l := range layout[:len(layout)-2] {
					next := layout[j+1]
					if strings.TrimSpace(next) == "" {
						next = layout[j+2]
					}
					if strings.Contains(l, "Candidate "+strconv.Itoa(i+1)+": "+c.Name) && strings.Contains(next, numfmt.RateUp(c.UpperBound)) &&
						strings.Contains(next, c.Verdict) && strings.Contains(next, c.Reason) {
						row = true
					}
				}
				if !row {
					t.Errorf("no summary line holds %s, %s, %s and %q", c.Name, numfmt.RateUp(c.UpperBound), c.Verdict, c.Reason)
				}
			}
			// The bounds as printed, rounded up (scipy.stats.beta.ppf values
			// of the fixture, formatted by hand).
			if !regexp.MustCompile(`OVERALL VERDICT.{0,100}REJECT`).MatchString(text) {
				t.Error("text lacks the overall verdict REJECT")
			}
			for _, want := range []string{"1.297 %", "1.661 %", "2.937 %"} {
				if !strings.Contains(text, want) {
					t.Errorf("text lacks %q", want)
				}
			}
			set, _ := templates.Load("")
			for _, u := range templates.Uses() {
				caution, _ := set.Caution(u)
				for _, b := range templates.Blocks(caution) {
					has := strings.Contains(text, flat(b.Text))
					if u == use && !has {
						t.Errorf("text lacks the %s caution %q", u, b.Text)
					}
					if u != use && has && u != "general" {
						t.Errorf("text carries the %s caution for use %s", u, use)
					}
				}
			}
			for _, want := range []string{
				"results apply only to the population and period sampled",
				"Zoë Łukasiewicz-Øberg", "Renée Dubois-Ibáñez", "Statement of conformity",
				"False-accept risk", "s0007, s0012", "w00311", rec.SigningKey, rec.Fingerprints.Labels,
				"Page 1 of", "urgency_score ≥ 0.35",
			} {
				if !strings.Contains(text, want) {
					t.Errorf("text lacks %q", want)
				}
			}
		})
	}
}

func TestEveryPageCarriesRecordIDAndPageNumber(t *testing.T) {
	rec := fixtureRecord("medical")
	pdf := render(t, rec, Options{Paper: "letter"})
	n := pageCount(t, pdf)
	if n < 2 {
		t.Fatalf("only %d pages", n)
	}
	if !bytes.Contains(pdf, []byte("/Type /Outlines")) || bytes.Count(pdf, []byte("/Title ")) < 12+1 {
		t.Error("the PDF has no outline entry per section")
	}
	pages := strings.Split(pdfText(t, pdf), "\f")
	for i := 0; i < n; i++ {
		want := "Page " + strconv.Itoa(i+1) + " of " + strconv.Itoa(n)
		if !strings.Contains(pages[i], want) || !strings.Contains(pages[i], "Record "+rec.RecordID) {
			t.Errorf("page %d lacks %q or the record id", i+1, want)
		}
	}
}

func TestPdftoppmRendersEveryPage(t *testing.T) {
	bin := needs.Program(t, "pdftoppm")
	for _, tc := range []struct {
		name string
		rec  *record.Record
		opts Options
	}{
		{"medical-a4", fixtureRecord("medical"), Options{Paper: "a4"}},
		{"many-letter", manyRecord(), Options{Paper: "Letter"}},
	} {
		t.Run(tc.name, func(t *testing.T) {
			pdf := render(t, tc.rec, tc.opts)
			dir := t.TempDir()
			in := filepath.Join(dir, "r.pdf")
			if err := os.WriteFile(in, pdf, 0o644); err != nil {
				t.Fatal(err)
			}
			out, err := exec.Command(bin, "-png", "-r", "30", in, filepath.Join(dir, "page")).CombinedOutput()
			if err != nil || len(out) > 0 {
				t.Fatalf("pdftoppm: %v: %s", err, out)
			}
			pngs, _ := filepath.Glob(filepath.Join(dir, "page-*.png"))
			if want := pageCount(t, pdf); len(pngs) != want {
				t.Errorf("pdftoppm wrote %d pages, pdfinfo counts %d", len(pngs), want)
			}
		})
	}
}

func TestManyCandidatesAndStrataLayOut(t *testing.T) {
	rec := manyRecord()
	pdf := render(t, rec, Options{Paper: "letter"})
	raw := pdfText(t, pdf)
	text := flat(raw)
	for _, c := range rec.Candidates {
		if n := strings.Count(text, c.Name); n < 4 {
			t.Errorf("candidate %s appears %d times, want it in the summary, findings, strata, confusion and definitions", c.Name, n)
		}
	}
	for _, s := range rec.Strata {
		if !strings.Contains(text, s.Label) {
			t.Errorf("stratum %s missing", s.Label)
		}
	}
	for _, want := range []string{"(continued)", "Adjusted p", "1,250,000", "Korn–Graubard",
		"counted as an error for every candidate", "w00017, w00230, w01999", "This record was not sealed."} {
		if !strings.Contains(text, want) {
			t.Errorf("text lacks %q", want)
		}
	}
	// A continued table repeats its header on the new page.
	pages := strings.Split(raw, "\f")
	repeated := 0
	for _, p := range pages {
		if strings.Contains(p, "(continued)") && strings.Contains(p, "Stratum") {
			repeated++
		}
	}
	if repeated == 0 {
		t.Error("no page repeats a table header after a break")
	}
}

func TestSameInputsGiveSameBytes(t *testing.T) {
	a := render(t, fixtureRecord("medical"), Options{Paper: "a4"})
	for i := 0; i < 3; i++ {
		b := render(t, fixtureRecord("medical"), Options{Paper: "a4"})
		if !bytes.Equal(a, b) {
			t.Fatalf("render %d differs from the first", i+2)
		}
	}
	other := fixtureRecord("medical")
	other.Date = "2026-12-01"
	if bytes.Equal(a, render(t, other, Options{Paper: "a4"})) {
		t.Error("a different date gave the same bytes")
	}
}

func TestGoldenPDFAndText(t *testing.T) {
	for _, tc := range []struct {
		name string
		use  string
		opts Options
	}{
		{"medical-a4", "medical", Options{Paper: "a4", Signatures: fixtureSignatures()}},
		{"general-letter", "general", Options{Paper: "letter"}},
	} {
		t.Run(tc.name, func(t *testing.T) {
			pdf := render(t, fixtureRecord(tc.use), tc.opts)
			golden.CompareString(t, filepath.Join(goldenDir, tc.name+".txt"), pdfText(t, pdf, "-layout"))
			golden.Compare(t, filepath.Join(goldenDir, tc.name+".pdf"), pdf)
		})
	}
}

func TestTemplatesOverrideReachesThePDF(t *testing.T) {
	dir := t.TempDir()
	custom := "Ward-specific caution: a triage nurse confirms every urgent flag within ten minutes. We defer to the local codes, the regulator and licensed clinicians."
	if err := os.WriteFile(filepath.Join(dir, "caution-medical.md"), []byte(custom+"\n"), 0o644); err != nil {
		t.Fatal(err)
	}
	set, err := templates.Load(dir)
	if err != nil {
		t.Fatal(err)
	}
	rec := fixtureRecord("medical")
	rec.Wording = record.Wording{Digest: set.Fingerprint(), Replaced: set.Overridden()}
	text := flat(pdfText(t, render(t, rec, Options{Templates: set})))
	if !strings.Contains(text, custom) {
		t.Error("the overriding caution is not in the PDF")
	}
	if strings.Contains(text, "does not replace clinical validation") {
		t.Error("the embedded medical caution is still in the PDF")
	}
	if !strings.Contains(text, "caution-medical.md replaced") {
		t.Error("the PDF does not say which wording was replaced")
	}
	if page1 := flat(strings.Split(pdfText(t, render(t, rec, Options{Templates: set})), "\f")[0]); !strings.Contains(page1, "Wording CUSTOM: caution-medical.md replaced by the issuer") {
		t.Errorf("page 1 does not flag the custom wording:\n%s", page1)
	}
	// The record names its wording: another set is refused.
	if _, err := Render(rec, Options{}); !errors.Is(err, ErrWording) {
		t.Errorf("rendered with the built-in wording a record made with custom wording: %v", err)
	}

	bad := t.TempDir()
	if err := os.WriteFile(filepath.Join(bad, "scope.md"), []byte("{{.Perod}}"), 0o644); err != nil {
		t.Fatal(err)
	}
	if _, err := templates.Load(bad); err == nil || !strings.Contains(err.Error(), filepath.Join(bad, "scope.md")) {
		t.Errorf("bad override: err = %v, want it to name scope.md", err)
	}
}

func TestRenderRefusesWhatItCannotLayOut(t *testing.T) {
	cases := []struct {
		name string
		edit func(*record.Record)
		opts Options
		want string
	}{
		{"date", func(r *record.Record) { r.Date = "30/11/2026" }, Options{}, `date "30/11/2026"`},
		{"use", func(r *record.Record) { r.Use = "casino" }, Options{}, `use "casino"`},
		{"confusion rows", func(r *record.Record) { r.Candidates[1].Confusion.Counts = r.Candidates[1].Confusion.Counts[:1] }, Options{}, "candidates[1]"},
		{"confusion cols", func(r *record.Record) { r.Candidates[2].Confusion.Counts[1] = []int{1} }, Options{}, "row 1 has 1 columns"},
		{"oc point", func(r *record.Record) { r.OC[3].AcceptProbability = 1.5 }, Options{}, "oc[3]"},
		{"paper", func(r *record.Record) {}, Options{Paper: "a3"}, `paper "a3"`},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			rec := fixtureRecord("medical")
			tc.edit(rec)
			_, err := Render(rec, tc.opts)
			if err == nil || !strings.Contains(err.Error(), tc.want) {
				t.Fatalf("err = %v, want it to mention %s", err, tc.want)
			}
			if tc.name != "paper" && !errors.Is(err, ErrRecord) {
				t.Errorf("err %v does not wrap ErrRecord", err)
			}
		})
	}
	if _, err := Render(nil, Options{}); err == nil {
		t.Error("nil record accepted")
	}
}

func TestUnusualRecordsLayOut(t *testing.T) {
	cases := []struct {
		name string
		edit func(*record.Record)
		want []string
	}{
		{"sequential without curve or strata", func(r *record.Record) {
			r.Plan.Design = plan.DesignSequential
			r.OC = nil
			r.Strata = nil
			for i := range r.Candidates {
				r.Candidates[i].Strata = nil
				r.Candidates[i].StoppedAt = 120
			}
		}, []string{"holds no operating-characteristic curve", "not stratified", "sequential boundaries",
			"Stopped after", "120 labels"}},
		{"finite lot, one candidate, nothing optional", func(r *record.Record) {
			r.System, r.SystemVersion, r.Period, r.Use = "", "", "", ""
			r.Plan.Population = 20000
			r.Plan.Model = plan.ModelHypergeometric
			r.Plan.Method = plan.MethodExact
			r.Method.Bound = plan.BoundExactHypergeometric
			r.Plan.CandidateCount = 1
			r.Plan.Anticipated, r.Plan.ProducerRisk = nil, nil
			r.Candidates = r.Candidates[:1]
			r.Candidates[0].Confusion = record.Confusion{}
			r.Deviations = record.Deviations{}
			r.Signoff = nil
			r.SigningKey = ""
			r.Fingerprints = record.Fingerprints{}
		}, []string{"unnamed system", "20,000 decisions (finite lot)", "exact hypergeometric", "None. Every sampled item",
			"Not recorded.", "not recorded", "Declared use general", "Period not stated"}},
		{"bounds at different confidences", func(r *record.Record) {
			r.Candidates[2].BoundConfidence = 0.95
		}, []string{"Upper bound (confidence)", "1.297 % (98.333 %)", "2.937 % (95 %)"}},
		{"no candidates", func(r *record.Record) {
			r.Candidates = nil
			r.OverallVerdict = ""
		}, []string{"NO VERDICT", "The record lists no candidates."}},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			rec := fixtureRecord("general")
			tc.edit(rec)
			pdf := render(t, rec, Options{Paper: "a4"})
			text := flat(pdfText(t, pdf))
			for _, want := range tc.want {
				if !strings.Contains(text, want) {
					t.Errorf("text lacks %q", want)
				}
			}
			if n := pageCount(t, pdf); n < 3 {
				t.Errorf("only %d pages", n)
			}
		})
	}
}

// Characters outside the fonts' reach must not break the layout: emoji
// (outside the Basic Multilingual Plane) print as U+FFFD, CJK names stay in
// the extractable text.
func TestNamesOutsideTheFontRender(t *testing.T) {
	rec := fixtureRecord("general")
	rec.Candidates[0].Name = "模型-甲 😀 v2"
	rec.Signoff[0].Name = "李小龍 🙂"
	rec.Signoff = append(rec.Signoff, record.Signoff{Role: "witnessed 🚀", Name: "A. N. Other"})
	text := flat(pdfText(t, render(t, rec, Options{})))
	for _, want := range []string{"模型-甲 \uFFFD v2", "李小龍 \uFFFD", "witnessed \uFFFD", "A. N. Other"} {
		if !strings.Contains(text, want) {
			t.Errorf("text lacks %q", want)
		}
	}
}

// No page ends with a heading: a section or table title is always followed
// by content on its own page.
func TestNoHeadingEndsAPage(t *testing.T) {
	heading := regexp.MustCompile(`^(\d+ {1,3}[A-Z].*|Errors per stratum: .*|Confusion matrix: .*|Strata of the draw|Findings|Assumptions|Method as recorded|Versions|Models and thresholds judged.*|Electronic signature)$`)
	for _, tc := range []struct {
		name string
		rec  *record.Record
		opts Options
	}{
		{"medical-a4", fixtureRecord("medical"), Options{Paper: "a4"}},
		{"general-letter", fixtureRecord("general"), Options{Paper: "letter"}},
		{"many-letter", manyRecord(), Options{Paper: "letter"}},
		{"many-a4", manyRecord(), Options{Paper: "a4"}},
	} {
		t.Run(tc.name, func(t *testing.T) {
			pages := strings.Split(pdfText(t, render(t, tc.rec, tc.opts)), "\f")
			seen := 0
			for i, p := range pages {
				var lines []string
				for _, l := range strings.Split(p, "\n") {
					l = strings.TrimSpace(l)
					if l == "" || strings.HasPrefix(l, "Record "+tc.rec.RecordID) || strings.HasPrefix(l, "Page ") ||
						strings.HasPrefix(l, "Acceptance record · ") {
						continue
					}
					lines = append(lines, l)
				}
				for _, l := range lines {
					if heading.MatchString(l) {
						seen++
					}
				}
				if len(lines) > 0 && heading.MatchString(lines[len(lines)-1]) {
					t.Errorf("page %d ends with the heading %q", i+1, lines[len(lines)-1])
				}
			}
			// The check must see the headings to mean anything.
			if seen < 12+len(tc.rec.Candidates) {
				t.Errorf("found only %d headings", seen)
			}
		})
	}
}

func TestPaperAndMetadata(t *testing.T) {
	bin := needs.Program(t, "pdfinfo")
	for _, tc := range []struct{ paper, want string }{{"a4", "(A4)"}, {"LETTER", "(letter)"}, {"", "(A4)"}} {
		rec := fixtureRecord("general")
		in := filepath.Join(t.TempDir(), "r.pdf")
		if err := os.WriteFile(in, render(t, rec, Options{Paper: tc.paper}), 0o644); err != nil {
			t.Fatal(err)
		}
		out, err := exec.Command(bin, "-isodates", in).CombinedOutput()
		if err != nil {
			t.Fatalf("pdfinfo: %v: %s", err, out)
		}
		info := string(out)
		for _, want := range []string{tc.want, "Producer:        probity 0.4.0-test",
			"CreationDate:    2026-11-30T16:20:00", "ModDate:         2026-11-30T16:20:00",
			"Title:           Acceptance record 3f9c2a71be04"} {
			if !strings.Contains(info, want) {
				t.Errorf("paper %q: pdfinfo lacks %q:\n%s", tc.paper, want, info)
			}
		}
	}
}

// TestRenderConcurrently renders records from four goroutines at once (a
// long one, one with a label-quality section, names in Icelandic, both
// paper sizes): each gets the bytes of a render alone, and go test -race
// finds no write to shared memory (gofpdf pads the embedded fonts' tables
// in place, so each document needs its own copy of them).
func TestRenderConcurrently(t *testing.T) {
	record := func(i int) *record.Record {
		var r *record.Record
		switch i % 3 {
		case 0:
			r = fixtureRecord("medical")
		case 1:
			r = manyRecord()
		default:
			r = fixtureRecord("general")
			r.LabelQuality = fixtureLabelQuality()
		}
		if len(r.Signoff) > 0 {
			r.Signoff[0].Name = "Jörg Þórsson"
		}
		return r
	}
	paper := func(i int) Options { return Options{Paper: []string{"a4", "letter"}[i%2]} }
	// Four goroutines render three records each, before any render alone.
	type job struct{ rec, paper int }
	got := map[job][]byte{}
	var mu sync.Mutex
	var wg sync.WaitGroup
	errs := make(chan error, 12)
	for g := 0; g < 4; g++ {
		wg.Go(func() {
			for i := 0; i < 3; i++ {
				j := job{(g + i) % 3, i % 2}
				pdf, err := Render(record(j.rec), paper(j.paper))
				if err != nil {
					errs <- err
					continue
				}
				mu.Lock()
				if prev, ok := got[j]; ok && !bytes.Equal(prev, pdf) {
					errs <- fmt.Errorf("record %d on paper %d: two renders at the same time differ", j.rec, j.paper)
				}
				got[j] = pdf
				mu.Unlock()
			}
		})
	}
	wg.Wait()
	close(errs)
	for j, pdf := range got {
		if !bytes.Equal(pdf, render(t, record(j.rec), paper(j.paper))) {
			t.Errorf("record %d on paper %d, rendered at the same time as others, differs from its render alone", j.rec, j.paper)
		}
	}
	for err := range errs {
		t.Error(err)
	}
}

// TestSignoffShowsSignaturesAndWrapsNames: each electronic signature is
// shown with name, role, meaning, UTC time and key; an unsigned role reads
// NOT SIGNED and carries no date; the sign-off file's names are marked as
// intended signers; a long name is wrapped, never cut.
func TestSignoffShowsSignaturesAndWrapsNames(t *testing.T) {
	rec := fixtureRecord("general")
	long := "Dr. Maximiliane Alexandra von Hohenstein-Wittelsbach-Oberkirchberg zu Liebenau-Rothenfels"
	rec.Signoff[2] = record.Signoff{Role: "approved", Name: long, Title: "Head of quality and of the clinical safety board"}
	sigs := fixtureSignatures()
	sigs = append(sigs, record.ElectronicSignature{Sequence: 2, Name: long, Role: "approved", Meaning: "I approve.",
		SignedAt: time.Date(2026, 12, 1, 8, 5, 0, 0, time.UTC), KeyFingerprint: "sha256:" + strings.Repeat("ab", 32)})
	pages := strings.Split(pdfText(t, render(t, rec, Options{Signatures: sigs})), "\f")
	text := flat(pages[len(pages)-2])
	for _, want := range []string{
		"Intended signer, from the sign-off file (not a signature) Zoë Łukasiewicz-Øberg, Audit engineer (planned date 2026-11-30)",
		"Signed electronically by Zoë Łukasiewicz-Øberg on 2026-11-30 16:42:07 UTC Role signed: prepared; signature 1 in signatures.txt",
		"Signer's key: sha256:54d3c0087de1a8e125a5c683f9c6309751aef11b637cd44cfd5d1ba8ad720072",
		"Reviewed by Intended signer, from the sign-off file (not a signature) Renée Dubois-Ibáñez, Model-risk reviewer (planned date 2026-12-01) Electronic signature NOT SIGNED Meaning of this signature once given: I reviewed the method and the calculations.",
		"Signed electronically by " + long + " on 2026-12-01 08:05:00 UTC",
		"Operator's seal",
	} {
		if !strings.Contains(text, want) {
			t.Errorf("sign-off lacks %q:\n%s", want, text)
		}
	}
	if n := strings.Count(text, long); n != 2 {
		t.Errorf("the long name is printed whole %d times, want 2 (intended and signed):\n%s", n, text)
	}
}

// TestEveryPageCarriesRevisionAndDemonstration: the revision is on every
// page's foot with the record id; a demonstration record says so on every
// page; a revision names the record it supersedes on page 1.
func TestEveryPageCarriesRevisionAndDemonstration(t *testing.T) {
	rec := fixtureRecord("general")
	rec.Revision, rec.Supersedes, rec.Demonstration = 2, strings.Repeat("9", record.IDLength), true
	pages := strings.Split(strings.TrimSuffix(pdfText(t, render(t, rec, Options{})), "\f"), "\f")
	for i, p := range pages {
		p = flat(p)
		if !strings.Contains(p, "Record "+rec.RecordID+" · revision 2 · 2026-11-30") {
			t.Errorf("page %d lacks the revision", i+1)
		}
		if !strings.Contains(p, "DEMONSTRATION — the scenario, organisation and people are invented") {
			t.Errorf("page %d lacks the demonstration mark", i+1)
		}
	}
	if !strings.Contains(flat(pages[0]), "Revision 2, supersedes record "+rec.Supersedes) {
		t.Errorf("page 1 does not name the superseded record:\n%s", pages[0])
	}
}

// TestPValuesAreDefined (issue 16 item 16): the decision summary says what
// its p-value and, under Holm, its adjusted p are.
func TestPValuesAreDefined(t *testing.T) {
	for _, name := range []string{"medical-a4.txt", "general-letter.txt"} {
		data, err := os.ReadFile(filepath.Join(goldenDir, name))
		if err != nil {
			t.Fatal(err)
		}
		if txt := flat(string(data)); !strings.Contains(txt, "p-value: the probability of observing at most the candidate's errors if its true error rate were exactly the ceiling") {
			t.Errorf("%s does not define the p-value", name)
		}
	}
	if !strings.Contains(pValueNote(true), "Adjusted p: the p-value adjusted by Holm's step-down procedure") || strings.Contains(pValueNote(false), "Adjusted p") {
		t.Error("the adjusted p is defined exactly when its column is shown")
	}
}
