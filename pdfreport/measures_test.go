package pdfreport

import (
	"fmt"
	"regexp"
	"strings"
	"testing"
	"time"

	"probity/plan/numfmt"
	"probity/plan/record"
	"probity/templates"
)

// measuresRecord is the triage fixture judged on error measures for the
// positive class "urgent": the miss rate and the false discovery rate of
// each candidate (the demo's kind of identifier names), every candidate's
// estimated confusion, and a release rule picking the accepted candidate
// with the lowest estimated miss rate. released is the candidate it picks
// ("" for none).
func measuresRecord(use, released string) *record.Record {
	rec := identifierRecord()
	rec.Use = use
	rec.OC = nil
	est := func(x float64) *float64 { return &x }
	for i, c := range rec.Candidates {
		verdict := record.Accept
		if i == 2 {
			verdict = record.Reject
		}
		rec.Candidates[i].Verdict = verdict
		rec.Measures = append(rec.Measures,
			record.MeasureVerdict{Candidate: c.Name, Measure: "fnr", Ceiling: 0.2, Labeled: 406 + i, Events: 1 + 2*i, LabeledOther: 57, EventsOther: i,
				Estimate: est(0.02 + 0.05*float64(i)), UpperBound: 0.09 + 0.07*float64(i), Level: 0.05 / 6, PValue: 0.001, Verdict: verdict, Planned: true})
	}
	for i, c := range rec.Candidates {
		rec.Measures = append(rec.Measures,
			record.MeasureVerdict{Candidate: c.Name, Measure: "fdr", Ceiling: 0.3, Labeled: 58, Events: i, Estimate: est(0.01 * float64(i)),
				UpperBound: 0.12, Level: 0.05 / 6, PValue: 0.001, Verdict: record.Accept, Planned: i != 1})
		rec.EstimatedConfusion = append(rec.EstimatedConfusion, record.EstimatedConfusion{Candidate: c.Name,
			TP: 11950.4 - 100*float64(i), FN: 50.2 + 100*float64(i), FP: 20.7, TN: 91000.6, Prevalence: 0.1165})
	}
	rec.MeasurePlan = &record.MeasurePlan{Positive: "urgent", Prevalence: 0.12}
	rec.ReleaseRule, rec.Released = "best:fnr", &record.Released{Candidate: released}
	rec.OverallVerdict = record.Reject
	if released != "" {
		rec.OverallVerdict = record.Accept
	}
	return rec
}

// TestMeasuresRecordPage1: page 1 of a record of measures names the
// release and its rule in the banner, summarises every claim by measure
// with its bound rounded up, and states each claim's false-accept risk;
// when the rule picks nothing it says that no candidate qualifies and the
// approver's default meaning approves exactly that.
func TestMeasuresRecordPage1(t *testing.T) {
	rec := measuresRecord("general", "defect_score>=0.35")
	page1, _, _ := strings.Cut(pdfText(t, render(t, rec, Options{})), "\f")
	for _, want := range []string{"RELEASE DECISION", "Released: defect_score>=0.35 (the accepted candidate with the lowest estimated fnr)",
		"Claims by measure", "False-negative rate (miss rate), fnr", "False discovery rate, fdr", "defect_score>=0.35 (released)",
		"9.000 %", "23.000 %", // the bounds, rounded up
		"a candidate whose measure is at or above its ceiling is accepted with probability at most 0.8333 %"} {
		if !strings.Contains(flat(page1), want) {
			t.Errorf("page 1 lacks %q:\n%s", want, page1)
		}
	}
	if text := flat(pdfText(t, render(t, rec, Options{}))); !strings.Contains(text, "at most "+numfmt.Chance(0.05)+" (Bonferroni over the family of claims)") {
		t.Error("the statement of conformity lacks the family's risk")
	}
	none := measuresRecord("general", "")
	text := flat(pdfText(t, render(t, none, Options{})))
	for _, want := range []string{"No candidate qualifies for release (the accepted candidate with the lowest estimated fnr)",
		"I approve the decision stated in this record that no candidate is released"} {
		if !strings.Contains(text, want) {
			t.Errorf("a record without a release lacks %q", want)
		}
	}
}

// TestMeasuresRecordDeviation: a safety record whose plan claims no
// measure on missed positives states the plan's reason on page 1 and
// among the deviations.
func TestMeasuresRecordDeviation(t *testing.T) {
	rec := measuresRecord("safety", "defect_score>=0.35")
	rec.Deviations.NoMissMeasure = "a second reader reviews every cleared case"
	pages := strings.Split(pdfText(t, render(t, rec, Options{})), "\f")
	if !strings.Contains(flat(pages[0]), "Deviation from what a safety use needs") || !strings.Contains(flat(pages[0]), "\u201ca second reader reviews every cleared case\u201d") {
		t.Errorf("page 1 lacks the deviation:\n%s", pages[0])
	}
	if !strings.Contains(flat(strings.Join(pages, " ")), "No claim on the misses of the positive class urgent (false-negative or false omission rate), which a safety use needs") {
		t.Error("the deviations do not list the missing claim")
	}
}

// TestMeasuresRecordLayout: on A4 and Letter no candidate name breaks
// inside its identifier, no heading ends a page and no table row is alone
// on a page (the layout's own record of where each row went).
func TestMeasuresRecordLayout(t *testing.T) {
	tpl, err := templates.Load("")
	if err != nil {
		t.Fatal(err)
	}
	heading := regexp.MustCompile(`^(\d+ {1,3}[A-Z].*|Claims by measure|Findings|Estimated confusion in the population|Estimated: .*|Confusion matrix: .*|False-negative rate \(miss rate\), fnr|False discovery rate, fdr)$`)
	for _, paper := range []string{"a4", "letter"} {
		rec := measuresRecord("safety", "defect_score>=0.35")
		text := pdfText(t, render(t, rec, Options{Paper: paper}))
		for _, c := range rec.Candidates {
			if at, broken := breaksInside(text, c.Name); broken {
				t.Errorf("%s: name %s broken: %q", paper, c.Name, at)
			}
		}
		for i, p := range strings.Split(text, "\f") {
			var last string
			for _, l := range strings.Split(p, "\n") {
				if l = strings.TrimSpace(l); l != "" && !strings.HasPrefix(l, "Record "+rec.RecordID) && !strings.HasPrefix(l, "Page ") {
					last = l
				}
			}
			if heading.MatchString(last) {
				t.Errorf("%s: page %d ends with the heading %q", paper, i+1, last)
			}
		}
		c, err := newContent(rec, tpl)
		if err != nil {
			t.Fatal(err)
		}
		size, w, h, _ := paperSize(paper)
		out, err := c.layout(size, w, h, time.Date(2026, 11, 30, 16, 20, 0, 0, time.UTC), 0)
		if err != nil {
			t.Fatal(err)
		}
		checkPlacements(t, fmt.Sprintf("measures, %s", paper), out.placed)
	}
}
