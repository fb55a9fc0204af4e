package pdfreport

import (
	"fmt"
	"strings"
	"testing"
	"time"

	"probity/plan/record"
	"probity/templates"
)

// identifierRecord is the fixture with the demo's kind of candidate names
// (identifiers with an operator) and reasons, for the line-breaking tests.
func identifierRecord() *record.Record {
	rec := fixtureRecord("safety")
	for i := range rec.Candidates {
		c := &rec.Candidates[i]
		c.Name = fmt.Sprintf("defect_score>=0.%d5", 3+i)
		c.Reason = fmt.Sprintf("%d errors > c = 22 in n = 1712", 61+i)
		adj := min(1, 3*c.PValue)
		c.AdjustedPValue = &adj
	}
	return rec
}

// breaksInside reports whether text (pdftotext's, one line per printed
// line) breaks word across a line anywhere but before an operator.
func breaksInside(text, word string) (string, bool) {
	lines := strings.Split(text, "\n")
	for i := 0; i+1 < len(lines); i++ {
		a, b := strings.TrimSpace(lines[i]), strings.TrimSpace(lines[i+1])
		for k := 1; k < len(word); k++ {
			head, tail := word[:k], word[k:]
			if !strings.HasSuffix(a, head) || !strings.HasPrefix(b, tail) {
				continue
			}
			if strings.ContainsAny(tail[:1], "<>=!") || strings.HasPrefix(tail, "≤") || strings.HasPrefix(tail, "≥") || strings.HasSuffix(head, " ") || strings.HasPrefix(tail, " ") {
				continue // a break before an operator, or at a space
			}
			return a + " / " + b, true
		}
	}
	return "", false
}

// TestCandidateNamesNeverBreakInsideAnIdentifier: the decision table of
// a record whose names are identifiers ("defect_score>=0.35") used to
// print "defect_" on one line and "score>=0.35" on the next; widening
// the name's column then broke the reason's "c = 22". On both papers no
// name breaks but before its operator and no reason breaks inside
// "errors > c = 22" (pdftotext's lines).
func TestCandidateNamesNeverBreakInsideAnIdentifier(t *testing.T) {
	rec := identifierRecord()
	for _, paper := range []string{"a4", "letter"} {
		text := pdfText(t, render(t, rec, Options{Paper: paper}))
		for _, c := range rec.Candidates {
			if at, broken := breaksInside(text, c.Name); broken {
				t.Errorf("%s: name %s broken: %q", paper, c.Name, at)
			}
			unit := c.Reason[:strings.Index(c.Reason, " in ")]
			if at, broken := breaksInside(text, unit); broken {
				t.Errorf("%s: reason %q broken: %q", paper, unit, at)
			}
		}
	}
}

func TestBreakAtPrefersAnOperator(t *testing.T) {
	d := testDoc(t)
	w := d.pdf.GetStringWidth("defect_score>=0")
	if got := d.breakAt("defect_score>=0.35", w); got != len("defect_score") {
		t.Errorf("breakAt = %d, want %d (before >=)", got, len("defect_score"))
	}
}

// TestNoTableRowAloneOnAPage: with many candidates and strata, on A4 and
// Letter, every page that holds rows of a table holds at least two of
// them, unless the table has only one row; a candidate's name row and
// its figures are on the same page (the layout's own record of where
// each row went).
func TestNoTableRowAloneOnAPage(t *testing.T) {
	tpl, err := templates.Load("")
	if err != nil {
		t.Fatal(err)
	}
	for _, rec := range []*record.Record{manyRecord(), fixtureRecord("safety")} {
		for _, paper := range []string{"a4", "letter"} {
			for _, strata := range []int{len(rec.Strata), 3, 4, 5, 6, 7} {
				r := *rec
				r.Strata = rec.Strata[:min(strata, len(rec.Strata))]
				cands := make([]record.Candidate, len(rec.Candidates))
				for i, c := range rec.Candidates {
					c.Strata = c.Strata[:min(strata, len(c.Strata))]
					cands[i] = c
				}
				r.Candidates = cands
				c, err := newContent(&r, tpl)
				if err != nil {
					t.Fatal(err)
				}
				size, w, h, _ := paperSize(paper)
				out, err := c.layout(size, w, h, time.Date(2026, 11, 30, 16, 20, 0, 0, time.UTC), 0)
				if err != nil {
					t.Fatal(err)
				}
				checkPlacements(t, fmt.Sprintf("%s, %d strata", paper, strata), out.placed)
			}
		}
	}
}

func checkPlacements(t *testing.T, what string, placed []placement) {
	t.Helper()
	type key struct{ seq, page int }
	perPage := map[key]int{}
	rows := map[int]int{}
	title := map[int]string{}
	var order []key
	for i, p := range placed {
		title[p.seq] = p.table
		k := key{p.seq, p.page}
		if perPage[k] == 0 {
			order = append(order, k)
		}
		perPage[k]++
		rows[p.seq]++
		if p.table == "Decision summary" && p.row%2 == 1 && (i == 0 || placed[i-1].page != p.page) {
			t.Errorf("%s: a candidate's figures (row %d) are on page %d, away from its name", what, p.row, p.page)
		}
	}
	for _, k := range order {
		if perPage[k] == 1 && rows[k.seq] > 1 {
			t.Errorf("%s: table %d (%q) has a single row on page %d", what, k.seq, title[k.seq], k.page)
		}
	}
}
