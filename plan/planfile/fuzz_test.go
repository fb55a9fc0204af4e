package planfile

import (
	"bytes"
	"errors"
	"math"
	"os"
	"strings"
	"testing"

	"probity/plan"
	"probity/plan/sequential"
)

// attackEdits are the edits of a plan and their kin (old → new,
// first occurrence): the fuzz corpus starts from each.
var attackEdits = [][2]string{
	{"sample_size: 1712", "sample_size: 60"},
	{"acceptance_number: 22", "acceptance_number: 30"},
	{"ceiling: 0.02", "ceiling: 0.03"},
	{"per_candidate_risk: 0.01666666666666668", "per_candidate_risk: 0.05"},
	{"consumer_risk: 0.016557872661596158", "consumer_risk: 0.0165"},
	{"producer_risk: 0.09945711575772648", "producer_risk: 0.05"},
	{"negative: sound", "negative: defect"},
	{"threshold: 0.5", "threshold: .nan"},
	{"design: fixed", "design: sequential"},
	{"multiplicity: bonferroni", "multiplicity: \"\""},
	{"  - sound\n", "  - unsure\n"},
}

// FuzzParse: no plan file makes the loader panic or fail other than with
// an input error about the plan (exit 2 in every command); a plan it
// accepts re-encodes to one it accepts identically, and what later steps
// compute from a plan — the OC curve, a sequential plan's exact OC, each
// candidate's prediction — stays defined. The corpus holds plans probity
// makes (fixed, sequential, a lot, the test data) and the attacks
// on them, a second document appended among them. Its sequential plans
// are large inputs, which the fuzzer would spend its time minimizing: run
// it with go test -run XXX -fuzz FuzzParse -fuzzminimizetime 1x
// ./plan/planfile.
func FuzzParse(f *testing.F) {
	fixed := thresholdPlan(f)
	f.Add(fixed)
	f.Add(sequentialPlan(f, 0))
	f.Add(sequentialPlan(f, 50000))
	for _, e := range attackEdits {
		f.Add([]byte(strings.Replace(string(fixed), e[0], e[1], 1)))
	}
	f.Add(append(append([]byte{}, fixed...), "---\nrule:\n  sample_size: 60\n"...))
	f.Add([]byte("format: 1\nseed: x\n"))
	f.Add([]byte("{}"))
	for _, p := range []string{"../../testdata/draw/plan.yaml", "../../testdata/draw/plan-sizing-only.yaml", "../../testdata/sql/plan.yaml"} {
		if b, err := os.ReadFile(p); err == nil {
			f.Add(b)
		}
	}
	f.Fuzz(func(t *testing.T, b []byte) {
		p, err := Parse(b, "fuzz.yaml")
		if err != nil {
			if !errors.Is(err, plan.ErrPlanFile) {
				t.Fatalf("refused with an error that is not about the plan file: %v", err)
			}
			return
		}
		out, err := p.Marshal()
		if err != nil {
			t.Fatalf("accepted plan does not encode: %v", err)
		}
		q, err := Parse(out, "again.yaml")
		if err != nil {
			t.Fatalf("re-encoded plan refused: %v\n%s", err, out)
		}
		if again, _ := q.Marshal(); !bytes.Equal(out, again) {
			t.Fatalf("encoding not stable:\n%s\n---\n%s", out, again)
		}
		for _, pt := range p.OC(11) {
			if !(pt.AcceptProbability >= 0 && pt.AcceptProbability <= 1) {
				t.Fatalf("OC point %+v", pt)
			}
		}
		if p.Sequential != nil {
			oc, err := sequential.OC(p.Sequential, []float64{0, p.Inputs.Ceiling, 1})
			if err != nil || math.IsNaN(oc[1]) {
				t.Fatalf("sequential OC: %v %v", oc, err)
			}
		}
		for _, c := range p.Candidates {
			if got, err := c.Predict("0.5"); err != nil && c.Column != "" || err == nil && !contains(p.Classes, got) && c.Column == "" {
				t.Fatalf("candidate %s predicts %q, %v", c.Name, got, err)
			}
		}
	})
}

func contains(list []string, s string) bool {
	for _, x := range list {
		if x == s {
			return true
		}
	}
	return false
}
