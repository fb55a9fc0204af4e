package agreement

import (
	"errors"
	"fmt"
	"math"
	"math/rand/v2"
	"slices"
	"strings"
	"testing"

	"probity/plan/inputerr"
	"probity/plan/record"
	"probity/sampling/drawfolder"
)

// fixture is a draw of 10 items, the first 6 doubled, with labels:
//
//	item  first          second        expected
//	1     ok (ann)       ok (bo)       agreed ok
//	2     defect (ann)   ok (bo)       disagreement → adjudicated defect
//	3     ok (ann)       unsure (bo)   disagreement → adjudicated ok
//	4     unsure (cy)    unsure (bo)   neither → unsure
//	5     defect (cy)    "" (bo)       one side → defect, warning
//	6     defect (cy)    defect (bo)   agreed defect
//	7–10  not doubled: ok, defect, unsure, ok
type fixture struct{ in Input }

func newFixture() *fixture {
	var ledger []drawfolder.LedgerRow
	for i := 1; i <= 10; i++ {
		ledger = append(ledger, drawfolder.LedgerRow{Item: i, RecordID: fmt.Sprintf("w-%04d", i), Double: i <= 6})
	}
	row := func(item int, label, labeler string, line int) drawfolder.WorksheetRow {
		return drawfolder.WorksheetRow{Item: item, RecordID: fmt.Sprintf("w-%04d", item), Label: label, Labeler: labeler, Line: line}
	}
	first := []drawfolder.WorksheetRow{
		row(1, "ok", "ann", 2), row(2, "defect", "ann", 3), row(3, "ok", "ann", 4), row(4, "unsure", "cy", 5),
		row(5, "defect", "cy", 6), row(6, "defect", "cy", 7), row(7, "ok", "ann", 8), row(8, "defect", "ann", 9),
		row(9, "unsure", "ann", 10), row(10, "ok", "", 11),
	}
	second := []drawfolder.WorksheetRow{
		row(1, "ok", "bo", 2), row(2, "ok", "bo", 3), row(3, "unsure", "bo", 4), row(4, "unsure", "bo", 5),
		row(5, "", "bo", 6), row(6, "defect", "Bo ", 7),
	}
	adj := []Adjudication{
		{Item: 2, RecordID: "w-0002", FinalLabel: "defect", DecidedBy: "dana", Note: "crack", Line: 2},
		{Item: 3, RecordID: "w-0003", FinalLabel: "ok", DecidedBy: "dana", Line: 3},
	}
	return &fixture{in: Input{
		Classes: []string{"defect", "ok"},
		Ledger:  ledger, LedgerFile: "ledger.csv",
		First: first, FirstFile: "worksheet.csv",
		Second: second, SecondFile: "worksheet-second.csv",
		Adjudications: adj, AdjudicationFile: "adjudication.csv",
	}}
}

func labelsOf(r *Result) []string {
	var out []string
	for _, f := range r.Labels {
		out = append(out, fmt.Sprintf("%d:%s/%s", f.Item, f.Label, f.Source))
	}
	return out
}

func TestResolveFinalLabelsAndSummary(t *testing.T) {
	res, err := Resolve(newFixture().in)
	if err != nil {
		t.Fatal(err)
	}
	want := []string{"1:ok/agreed", "2:defect/adjudicated", "3:ok/adjudicated", "4:unsure/neither",
		"5:defect/one-side", "6:defect/agreed", "7:ok/first", "8:defect/first", "9:unsure/first", "10:ok/first"}
	if got := labelsOf(res); !slices.Equal(got, want) {
		t.Errorf("labels\n got %v\nwant %v", got, want)
	}
	q := res.Quality
	if q.Doubled != 6 || q.Compared != 3 || q.Adjudicated != 2 || q.Unadjudicated != 0 || q.Unsure != 2 {
		t.Errorf("counts: doubled %d compared %d adjudicated %d unadjudicated %d unsure %d; want 6 3 2 0 2",
			q.Doubled, q.Compared, q.Adjudicated, q.Unadjudicated, q.Unsure)
	}
	// Items 1, 2, 6 are compared: rows first labeler (defect, ok).
	wantTable := [][]int{{1, 1}, {0, 1}}
	for i := range wantTable {
		if !slices.Equal(q.Table[i], wantTable[i]) {
			t.Errorf("table row %d = %v, want %v", i, q.Table[i], wantTable[i])
		}
	}
	// By hand (exact arithmetic): p_o = 2/3; kappa margins (2/3, 1/3) and
	// (1/3, 2/3), p_e = 4/9, κ = (2/9)/(5/9) = 0.4; AC1 π = (1/2, 1/2),
	// p_e = 1/2, γ = (1/6)/(1/2) = 1/3.
	if !near(q.ObservedAgreement, 2.0/3, 1e-15) || !near(q.Kappa.Value, 0.4, 1e-12) || !near(q.AC1.Value, 1.0/3, 1e-12) {
		t.Errorf("p_o %v kappa %v AC1 %v, want 2/3, 0.4, 1/3", q.ObservedAgreement, q.Kappa.Value, q.AC1.Value)
	}
	if !q.Kappa.Defined || !q.AC1.Defined || q.Kappa.Confidence != 0.95 || q.Kappa.Method != KappaMethod || q.AC1.Method != AC1Method {
		t.Errorf("coefficients: %+v %+v", q.Kappa, q.AC1)
	}
	wantDis := []record.Disagreement{
		{Item: 2, RecordID: "w-0002", First: "defect", FirstLabeler: "ann", Second: "ok", SecondLabeler: "bo",
			Resolution: record.ResolvedAdjudicated, Final: "defect", DecidedBy: "dana", Note: "crack"},
		{Item: 3, RecordID: "w-0003", First: "ok", FirstLabeler: "ann", Second: "unsure", SecondLabeler: "bo",
			Resolution: record.ResolvedAdjudicated, Final: "ok", DecidedBy: "dana"},
	}
	if !slices.Equal(q.Disagreements, wantDis) {
		t.Errorf("disagreements\n got %+v\nwant %+v", q.Disagreements, wantDis)
	}
	// "bo" and "Bo " are one labeler; the blank name of item 10 is its own
	// entry; item 5's blank second label is not counted. Sorted by the
	// case-folded name.
	wantLab := []record.Labeler{{Name: "", First: 1}, {Name: "ann", First: 6}, {Name: "Bo", Second: 5}, {Name: "cy", First: 3}}
	if !slices.Equal(q.Labelers, wantLab) {
		t.Errorf("labelers\n got %+v\nwant %+v", q.Labelers, wantLab)
	}
	if len(q.Warnings) != 1 || !strings.Contains(q.Warnings[0], "worksheet-second.csv line 6: item 5 has no label here") {
		t.Errorf("warnings = %q", q.Warnings)
	}
}

func TestResolveFollowsTheAdjudication(t *testing.T) {
	f := newFixture()
	f.in.Adjudications[0].FinalLabel = "ok"
	f.in.Adjudications[1].FinalLabel = "defect"
	res, err := Resolve(f.in)
	if err != nil {
		t.Fatal(err)
	}
	if res.Labels[1].Label != "ok" || res.Labels[2].Label != "defect" {
		t.Errorf("labels %v do not follow the adjudication", labelsOf(res))
	}
	// The agreement statistics do not depend on the adjudication.
	if !near(res.Quality.Kappa.Value, 0.4, 1e-12) {
		t.Errorf("kappa %v changed with the adjudication", res.Quality.Kappa.Value)
	}
}

func TestResolveUnadjudicated(t *testing.T) {
	f := newFixture()
	f.in.Adjudications = f.in.Adjudications[1:] // item 2 left open
	_, err := Resolve(f.in)
	assertInputError(t, err, "adjudication.csv", 0, "", "no row for 1 of the disagreements: items 2")

	f.in.Adjudications, f.in.AdjudicationFile = nil, ""
	_, err = Resolve(f.in)
	assertInputError(t, err, "worksheet-second.csv", 0, "", "2 doubled items have two different labels and need an adjudication: items 2, 3")

	f.in.AllowUnadjudicated = true
	res, err := Resolve(f.in)
	if err != nil {
		t.Fatal(err)
	}
	for _, fl := range res.Labels[1:3] {
		if !fl.CountsAsError() || fl.Label != "" {
			t.Errorf("item %d: %+v, want counted as an error", fl.Item, fl)
		}
	}
	for _, fl := range append(append([]Final{}, res.Labels[:1]...), res.Labels[3:]...) {
		if fl.CountsAsError() {
			t.Errorf("item %d counted as an error: %+v", fl.Item, fl)
		}
	}
	q := res.Quality
	if q.Unadjudicated != 2 || q.Adjudicated != 0 || !q.AllowUnadjudicated {
		t.Errorf("unadjudicated %d adjudicated %d allow %v", q.Unadjudicated, q.Adjudicated, q.AllowUnadjudicated)
	}
	for _, d := range q.Disagreements {
		if d.Resolution != record.ResolvedCountedAsError || d.Final != "" {
			t.Errorf("disagreement %+v, want counted-as-error", d)
		}
	}
	if !strings.Contains(strings.Join(q.Warnings, "\n"), "2 disagreements were not adjudicated and count as errors for every candidate") {
		t.Errorf("warnings %q do not say the items count as errors", q.Warnings)
	}
}

func assertInputError(t *testing.T, err error, file string, line int, column, msg string) {
	t.Helper()
	var ie *inputerr.Error
	if !errors.As(err, &ie) {
		t.Fatalf("error %v is not an *inputerr.Error", err)
	}
	if ie.File != file || ie.Line != line || ie.Field != column || !strings.Contains(ie.Msg, msg) {
		t.Errorf("got %q line %d column %q: %q\nwant %q line %d column %q: …%q…", ie.File, ie.Line, ie.Field, ie.Msg, file, line, column, msg)
	}
	if ie.Hint == "" {
		t.Errorf("error %q has no hint", ie.Error())
	}
}

func TestResolveRefusesBadInput(t *testing.T) {
	cases := []struct {
		name   string
		edit   func(*Input)
		file   string
		line   int
		column string
		msg    string
	}{
		{"second has an undoubled item", func(in *Input) {
			in.Second = append(in.Second, drawfolder.WorksheetRow{Item: 8, RecordID: "w-0008", Label: "ok", Line: 8})
		}, "worksheet-second.csv", 8, "item", `item 8 (record_id "w-0008") was not drawn for a second label`},
		{"second has an unknown item", func(in *Input) {
			in.Second = append(in.Second, drawfolder.WorksheetRow{Item: 99, RecordID: "w-0099", Line: 8})
		}, "worksheet-second.csv", 8, "item", "item 99 is not in the ledger"},
		{"second has a wrong record id", func(in *Input) { in.Second[2].RecordID = "w-0009" },
			"worksheet-second.csv", 4, "record_id", `item 3 has record_id "w-0009", but the ledger has "w-0003"`},
		{"second lacks a doubled item", func(in *Input) { in.Second = in.Second[:4] },
			"worksheet-second.csv", 0, "item", "2 doubled items are missing: items 5, 6"},
		{"second has a bad label", func(in *Input) { in.Second[0].Label = "maybe" },
			"worksheet-second.csv", 2, "label", `label "maybe" (item 1) is not one of the plan's classes (defect, ok), blank or "unsure"`},
		{"first has a bad label", func(in *Input) { in.First[0].Label = "Ok" },
			"worksheet.csv", 2, "label", `label "Ok" (item 1) is not one of the plan's classes`},
		{"first lacks a doubled item", func(in *Input) { in.First = in.First[1:] },
			"worksheet.csv", 0, "item", `item 1 (record_id "w-0001") is in the ledger but not in the worksheet`},
		{"adjudication of an undoubled item", func(in *Input) {
			in.Adjudications = append(in.Adjudications, Adjudication{Item: 7, RecordID: "w-0007", FinalLabel: "ok", DecidedBy: "d", Line: 4})
		}, "adjudication.csv", 4, "item", "item 7 was not doubled"},
		{"adjudication of an agreed item", func(in *Input) {
			in.Adjudications = append(in.Adjudications, Adjudication{Item: 1, RecordID: "w-0001", FinalLabel: "defect", DecidedBy: "d", Line: 4})
		}, "adjudication.csv", 4, "item", `the labelers agreed on item 1 (both "ok")`},
		{"adjudication of an unknown item", func(in *Input) {
			in.Adjudications = append(in.Adjudications, Adjudication{Item: 42, RecordID: "w-0042", FinalLabel: "ok", DecidedBy: "d", Line: 4})
		}, "adjudication.csv", 4, "item", "item 42 is not in the ledger"},
		{"adjudication with a wrong record id", func(in *Input) { in.Adjudications[0].RecordID = "w-0003" },
			"adjudication.csv", 2, "record_id", `item 2 has record_id "w-0003", but the ledger has "w-0002"`},
		{"no doubled items", func(in *Input) {
			for i := range in.Ledger {
				in.Ledger[i].Double = false
			}
		}, "ledger.csv", 0, "double", "no item is marked for a second label"},
		{"same labeler under strict", func(in *Input) { in.Strict = true; in.Second[0].Labeler = " ANN" },
			"worksheet-second.csv", 2, "labeler", `item 1 was labeled by "ANN" in both worksheets`},
		{"unnamed labeler under strict", func(in *Input) { in.Strict = true; in.First[0].Labeler = "" },
			"worksheet.csv", 2, "labeler", "item 1 does not name its labeler"},
		{"blank second label under strict", func(in *Input) { in.Strict = true },
			"worksheet-second.csv", 6, "label", "item 5 has no label"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			f := newFixture()
			c.edit(&f.in)
			res, err := Resolve(f.in)
			if err == nil {
				t.Fatalf("accepted: %v", labelsOf(res))
			}
			assertInputError(t, err, c.file, c.line, c.column, c.msg)
		})
	}
}

func TestResolveWarnsWithoutStrict(t *testing.T) {
	f := newFixture()
	f.in.Second[0].Labeler = "Ann"
	f.in.First[5].Labeler = ""
	res, err := Resolve(f.in)
	if err != nil {
		t.Fatal(err)
	}
	w := strings.Join(res.Quality.Warnings, "\n")
	for _, want := range []string{
		`worksheet-second.csv line 2: item 1 was labeled by "Ann" in both worksheets; its two labels are not independent`,
		"1 doubled items do not name both labelers",
		"item 5 has no label here",
	} {
		if !strings.Contains(w, want) {
			t.Errorf("warnings %q lack %q", w, want)
		}
	}
}

func TestResolveNeitherClassCanBeAdjudicated(t *testing.T) {
	f := newFixture()
	f.in.Adjudications = append(f.in.Adjudications, Adjudication{Item: 4, RecordID: "w-0004", FinalLabel: "defect", DecidedBy: "dana", Line: 4})
	res, err := Resolve(f.in)
	if err != nil {
		t.Fatal(err)
	}
	if got := res.Labels[3]; got.Label != "defect" || got.Source != FromAdjudication {
		t.Errorf("item 4 = %+v, want adjudicated defect", got)
	}
	if res.Quality.Unsure != 1 || res.Quality.Adjudicated != 3 || len(res.Quality.Disagreements) != 3 {
		t.Errorf("unsure %d adjudicated %d disagreements %d, want 1 3 3", res.Quality.Unsure, res.Quality.Adjudicated, len(res.Quality.Disagreements))
	}
}

func TestResolveUndefinedKappa(t *testing.T) {
	// Every compared item is "ok" for both: kappa is 0/0, AC1 is 1.
	f := newFixture()
	for _, rows := range [][]drawfolder.WorksheetRow{f.in.First, f.in.Second} {
		for i := range rows {
			if rows[i].Item <= 6 {
				rows[i].Label = "ok"
			}
		}
	}
	f.in.Adjudications, f.in.AdjudicationFile = nil, ""
	res, err := Resolve(f.in)
	if err != nil {
		t.Fatal(err)
	}
	q := res.Quality
	if q.Kappa.Defined || !strings.HasPrefix(q.Kappa.Note, "undefined: both labelers put all 6 items in one class") {
		t.Errorf("kappa %+v, want undefined with a note", q.Kappa)
	}
	if !q.AC1.Defined || q.AC1.Value != 1 || math.IsNaN(q.AC1.StdErr) {
		t.Errorf("AC1 %+v, want defined, 1", q.AC1)
	}
}

func TestResolveReadsLabelsAsTheRecordDoes(t *testing.T) {
	// The record trims labels and reads unsure in any case; so does
	// Resolve, for both worksheets.
	f := newFixture()
	f.in.First[0].Label = " ok "
	f.in.Second[0].Label = "ok\t"
	f.in.First[3].Label = "Unsure"
	f.in.Second[3].Label = " UNSURE"
	f.in.First[8].Label = "UnSure"
	res, err := Resolve(f.in)
	if err != nil {
		t.Fatal(err)
	}
	if got := labelsOf(res); got[0] != "1:ok/agreed" || got[3] != "4:unsure/neither" || got[8] != "9:unsure/first" {
		t.Errorf("labels %v", got)
	}
	if res.Quality.Unsure != 2 {
		t.Errorf("unsure = %d, want 2", res.Quality.Unsure)
	}
}

// TestResolveInvariants resolves 300 random labelings of the fixture
// (fixed seed) and checks what must hold whatever the labels.
func TestResolveInvariants(t *testing.T) {
	rng := rand.New(rand.NewPCG(3, 14))
	choices := []string{"defect", "ok", "unsure", ""}
	for run := range 300 {
		f := newFixture()
		for i := range f.in.First {
			f.in.First[i].Label = choices[rng.IntN(len(choices))]
		}
		for i := range f.in.Second {
			f.in.Second[i].Label = choices[rng.IntN(len(choices))]
		}
		f.in.Adjudications, f.in.AdjudicationFile, f.in.AllowUnadjudicated = nil, "", true
		res, err := Resolve(f.in)
		if err != nil {
			t.Fatalf("run %d: %v", run, err)
		}
		q := res.Quality
		if len(res.Labels) != len(f.in.First) {
			t.Fatalf("run %d: %d labels for %d rows", run, len(res.Labels), len(f.in.First))
		}
		sum, errs := 0, 0
		for _, row := range q.Table {
			for _, v := range row {
				sum += v
			}
		}
		for _, l := range res.Labels {
			if l.CountsAsError() {
				errs++
			}
			if l.Item > 6 && l.Source != FromFirst {
				t.Errorf("run %d: undoubled item %d from %s", run, l.Item, l.Source)
			}
		}
		if sum != q.Compared || q.Compared > q.Doubled || q.Disagreed > q.Compared {
			t.Errorf("run %d: table sum %d compared %d doubled %d disagreed %d", run, sum, q.Compared, q.Doubled, q.Disagreed)
		}
		if errs != q.Unadjudicated || q.Adjudicated+q.Unadjudicated != len(q.Disagreements) {
			t.Errorf("run %d: %d counted as errors, unadjudicated %d, adjudicated %d, %d disagreements", run, errs, q.Unadjudicated, q.Adjudicated, len(q.Disagreements))
		}
		if q.Compared > 0 && (!q.AC1.Defined || q.AC1.Lower > q.AC1.Value || q.AC1.Upper < q.AC1.Value) {
			t.Errorf("run %d: AC1 %+v", run, q.AC1)
		}
	}
}

func TestResolveStrictAcceptsAnAdjudicatedBlankSide(t *testing.T) {
	// Item 5's second label is blank: refused under --strict unless the
	// adjudication decides it.
	f := newFixture()
	f.in.Strict = true
	f.in.Adjudications = append(f.in.Adjudications, Adjudication{Item: 5, RecordID: "w-0005", FinalLabel: "ok", DecidedBy: "dana", Line: 4})
	res, err := Resolve(f.in)
	if err != nil {
		t.Fatal(err)
	}
	if got := res.Labels[4]; got.Label != "ok" || got.Source != FromAdjudication {
		t.Errorf("item 5 = %+v, want adjudicated ok", got)
	}
	d := res.Quality.Disagreements[2]
	if d.Item != 5 || d.First != "defect" || d.Second != "" || d.Final != "ok" || d.Resolution != record.ResolvedAdjudicated {
		t.Errorf("disagreement entry %+v", d)
	}
}

// TestSameLabelerNormalises: one person's name typed with a precomposed
// and with a combining accent, or in another case, is one labeler.
func TestSameLabelerNormalises(t *testing.T) {
	if !sameLabeler("Jörg", " jo\u0308rg") || sameLabeler("", "") || sameLabeler("ann", "anne") {
		t.Errorf("sameLabeler does not compare normalised names")
	}
}
