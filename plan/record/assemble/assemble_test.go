package assemble

import (
	"errors"
	"strings"
	"testing"

	"probity/plan"
	"probity/plan/record"
	"probity/templates"
)

// The whole of Assemble runs in the record and verify command tests on
// draws made with the sampling package; these cover what it checks first.
func TestAssembleRefusesBadInputsFirst(t *testing.T) {
	p := &plan.File{Inputs: plan.Inputs{Ceiling: 0.1, Confidence: 0.9, CandidateCount: 1}}
	cases := []struct {
		o    Options
		want string
	}{
		{Options{Use: "aviation", Date: "2026-01-01"}, `use "aviation" is not one of general, safety, medical, vehicle, credit, employment`},
		{Options{Use: "general", Date: "2026-13-01"}, `date "2026-13-01" is not a date`},
		{Options{Use: "general", Date: "2026-01-01"}, "the plan declares no candidates"},
	}
	for _, c := range cases {
		_, err := Assemble(&Inputs{Plan: p}, c.o)
		if !errors.Is(err, ErrInput) || !strings.Contains(err.Error(), c.want) {
			t.Errorf("got %v, want ErrInput with %q", err, c.want)
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
