package assemble

import (
	"errors"
	"strings"
	"testing"
	"time"

	"probity/plan"
	"probity/plan/chrono"
	"probity/plan/record"
	"probity/sampling/drawfolder"
	"probity/templates"
)

// The whole of Assemble runs in the record and verify command tests on
// draws made with the sampling package; these cover what it checks first.
func TestAssembleRefusesBadInputsFirst(t *testing.T) {
	p := &plan.File{Inputs: plan.Inputs{Ceiling: 0.1, Confidence: 0.9, CandidateCount: 1}}
	issued := chrono.FromClock(time.Date(2026, 12, 1, 9, 30, 0, 0, time.UTC))
	cases := []struct {
		o    Options
		want string
	}{
		{Options{Use: "aviation", Issued: issued}, `use "aviation" is not one of general, safety, medical, vehicle, credit, employment`},
		{Options{Use: "general"}, "the record has no issue time"},
		{Options{Use: "general", Issued: issued}, "the plan declares no candidates"},
	}
	for _, c := range cases {
		_, err := Assemble(&Inputs{Plan: p}, c.o)
		if !errors.Is(err, ErrInput) || !strings.Contains(err.Error(), c.want) {
			t.Errorf("got %v, want ErrInput with %q", err, c.want)
		}
	}
}

// The chronology is refused out of order, naming the three times: a
// record issued before its draw (a back-dated --date), a draw before its
// plan, a draw folder that states no draw time.
func TestChronologyRefusedOutOfOrder(t *testing.T) {
	at := func(s string) time.Time {
		v, err := time.Parse(time.RFC3339, s)
		if err != nil {
			t.Fatal(err)
		}
		return v
	}
	for _, tc := range []struct {
		created, drawn, issued string
		source                 chrono.Source
		file, want             string
	}{
		{"2026-11-30T09:00:00Z", "2026-11-30T15:00:00Z", "2026-12-01T09:30:00Z", chrono.SourceClock, "", ""},
		{"2026-11-30T09:00:00Z", "2026-11-30T15:00:00Z", "2026-11-30T15:00:00Z", chrono.SourceClock, "", ""},
		{"2026-11-30T09:00:00Z", "2026-11-30T15:00:00Z", "1999-01-01T00:00:00Z", chrono.SourceOperator, "",
			"the chronology is broken: the record is issued before the sample was drawn (plan created 2026-11-30T09:00:00Z (system clock), sample drawn 2026-11-30T15:00:00Z (system clock), record issued 1999-01-01T00:00:00Z (supplied by the operator))"},
		{"2026-12-02T09:00:00Z", "2026-11-30T15:00:00Z", "2026-12-03T09:30:00Z", chrono.SourceClock, "draw/manifest.json, field drawn: ",
			"the sample was drawn before the plan was made (plan created 2026-12-02T09:00:00Z (system clock)"},
		{"2026-11-30T09:00:00Z", "", "2026-12-03T09:30:00Z", chrono.SourceClock, "draw/manifest.json, field drawn: ",
			"the draw time is not stated (plan created 2026-11-30T09:00:00Z (system clock), sample drawn not stated,"},
	} {
		m := &drawfolder.Manifest{}
		if tc.drawn != "" {
			d := chrono.FromClock(at(tc.drawn))
			m.Drawn = &d
		}
		in := &Inputs{Plan: &plan.File{Created: at(tc.created), CreatedFrom: chrono.SourceClock}, Folder: &drawfolder.Folder{Dir: "draw", Manifest: m}}
		c, err := chronology(in, chrono.Stamp{Time: at(tc.issued), Source: tc.source})
		if tc.want == "" {
			if err != nil || c.Issued.Time != at(tc.issued) || c.Drawn.Time != at(tc.drawn) {
				t.Errorf("%v: %v %+v", tc, err, c)
			}
			continue
		}
		if err == nil || !errors.Is(err, ErrChronology) || !strings.HasPrefix(err.Error(), tc.file) || !strings.Contains(err.Error(), tc.want) {
			t.Errorf("got %v, want %q…%q", err, tc.file, tc.want)
		}
	}
}

func TestSignoffFillsRolesAndMeanings(t *testing.T) {
	set, err := templates.Load("")
	if err != nil {
		t.Fatal(err)
	}
	given := []record.Signoff{{Role: "approved", Name: "Ren Example", Meaning: "approves the release"}}
	got, err := signoff(given, set, &record.Record{})
	if err != nil {
		t.Fatal(err)
	}
	if len(got) != 3 || got[0].Role != "prepared" || got[1].Role != "reviewed" || got[2].Role != "approved" {
		t.Fatalf("%+v", got)
	}
	want, _ := set.SignatureMeaning("reviewed", templates.Fields{})
	if got[1].Name != "" || got[1].Meaning != strings.TrimSpace(want) || got[1].Meaning == "" {
		t.Errorf("a role not given gets a blank line and the default meaning: %+v", got[1])
	}
	if got[2].Name != "Ren Example" || got[2].Meaning != "approves the release" {
		t.Errorf("a given meaning is kept: %+v", got[2])
	}
}
