package plan

import (
	"bytes"
	"errors"
	"fmt"
	"os"
	"strings"
	"testing"
	"time"
)

func examplePlan(t testing.TB) *File {
	t.Helper()
	in := inputs(0.02, 0.95)
	in.Anticipated = ptr(0.01)
	in.CandidateCount = 2
	in.Population = 20000
	th := 0.7
	f, err := Build(in, Meta{
		ToolVersion: "0.1.0", Created: time.Date(2026, 11, 30, 10, 0, 0, 999, time.FixedZone("z", -7200)),
		Seed: "00112233445566778899aabbccddeeff", System: "triage", SystemVersion: "3",
		Classes: []string{"fraud", "ok"},
		Candidates: []Candidate{
			{Name: "model-a", Column: "pred_a"},
			{Name: "score>=0.7", ScoreColumn: "score", Threshold: &th, Positive: "fraud", Negative: "ok"},
		},
	})
	if err != nil {
		t.Fatal(err)
	}
	return f
}

// Marshal then Parse is lossless: the re-encoded bytes are identical and
// every number reads back bit for bit.
func TestPlanFileRoundTrip(t *testing.T) {
	f := examplePlan(t)
	data, err := f.Marshal()
	if err != nil {
		t.Fatal(err)
	}
	g, err := parse(data, "plan.yaml")
	if err != nil {
		t.Fatal(err)
	}
	again, err := g.Marshal()
	if err != nil {
		t.Fatal(err)
	}
	if !bytes.Equal(data, again) {
		t.Fatalf("re-encoding differs:\n%s\n---\n%s", data, again)
	}
	if g.Rule.ConsumerRisk != f.Rule.ConsumerRisk || *g.Rule.ProducerRisk != *f.Rule.ProducerRisk ||
		g.Rule.PerCandidateRisk != f.Rule.PerCandidateRisk || *g.Inputs.Anticipated != 0.01 {
		t.Errorf("numbers changed: %+v vs %+v", g.Rule, f.Rule)
	}
	if want := time.Date(2026, 11, 30, 12, 0, 0, 0, time.UTC); !g.Created.Equal(want) {
		t.Errorf("created %v, want %v (UTC, to the second)", g.Created, want)
	}
	if fp := Fingerprint(data); len(fp) != 64 {
		t.Errorf("fingerprint %q", fp)
	}
	if c := f.PerCandidateConfidence(); c != 1-0.05/2 && c != 1-(1-0.95)/2 {
		t.Errorf("per-candidate confidence %v", c)
	}
}

// parse is what the plan package checks of a file: Decode, then Check
// (planfile.Parse adds the sequential section's check).
func parse(data []byte, name string) (*File, error) {
	f, src, err := Decode(data, name)
	if err != nil {
		return nil, err
	}
	return f, f.Check(src)
}

// Each edit is refused with the file, the line of the edited key and the
// field: "p.yaml line L, field F: message".
func TestCheckRefusesBadPlans(t *testing.T) {
	data, err := examplePlan(t).Marshal()
	if err != nil {
		t.Fatal(err)
	}
	for _, tc := range []struct{ old, new, field, want string }{
		{"method: exact", "method: exakt", "inputs.method", `"exakt": must be one of`},
		{"multiplicity: bonferroni", "multiplicity: sidak", "inputs.multiplicity", `"sidak": must be one of bonferroni, holm, fixed-sequence`},
		{"model: hypergeometric", "model: poisson", "rule.model", `"poisson": must be one of binomial, hypergeometric, hoeffding, kl`},
		{"model: hypergeometric", "model: binomial", "rule.model", `states "binomial", but the inputs give "hypergeometric"`},
		{"ceiling: 0.02", "ceiling: 2", "inputs.ceiling", "2 is outside (0, 1)"},
		{"seed: 00112233445566778899aabbccddeeff", "seed: \"\"", "seed", "is empty"},
		{"format: 1", "format: 9", "format", "9 is not supported"},
		{"  candidates: 2", "  candidates: 3", "inputs.candidates", "is 3 but 2 candidates are declared"},
		{"require: all", "requires: all", "inputs.requires", "is not a key of a plan file"},
		{"name: model-a", "name: score>=0.7", "candidates[1].name", "declared twice"},
		{"sample_size: 1459", "sample_size: abc", "rule.sample_size", "cannot unmarshal !!str `abc` into int"},
		{"created: 2026-11-30T12:00:00Z", "created: 0001-01-01T00:00:00Z", "created", "no creation time"},
	} {
		bad := strings.Replace(string(data), tc.old, tc.new, 1)
		if bad == string(data) {
			t.Fatalf("edit %q not applied", tc.old)
		}
		line := strings.Count(bad[:strings.LastIndex(bad, tc.new)], "\n") + 1
		_, err := parse([]byte(bad), "p.yaml")
		prefix := fmt.Sprintf("p.yaml line %d, field %s: ", line, tc.field)
		if err == nil || !errors.Is(err, ErrPlanFile) || !strings.Contains(err.Error(), tc.want) || !strings.HasPrefix(err.Error(), prefix) {
			t.Errorf("%q → %q: error %v, want %q…%q", tc.old, tc.new, err, prefix, tc.want)
		}
	}
}

// FuzzDecode: Decode and Check never panic, and whatever they accept
// re-encodes to a file they accept again, identically. (planfile's
// FuzzParse adds the sequential section and what a plan is used for.)
func FuzzDecode(f *testing.F) {
	data, err := examplePlan(f).Marshal()
	if err != nil {
		f.Fatal(err)
	}
	f.Add(data)
	f.Add([]byte("format: 1\nseed: x\n"))
	f.Add([]byte("{}"))
	for _, p := range []string{"../testdata/draw/plan.yaml", "../testdata/draw/plan-sizing-only.yaml"} {
		if b, err := os.ReadFile(p); err == nil {
			f.Add(b)
		}
	}
	f.Fuzz(func(t *testing.T, b []byte) {
		g, err := parse(b, "fuzz.yaml")
		if err != nil {
			return
		}
		out, err := g.Marshal()
		if err != nil {
			t.Fatalf("accepted plan does not encode: %v", err)
		}
		h, err := parse(out, "again.yaml")
		if err != nil {
			t.Fatalf("re-encoded plan refused: %v\n%s", err, out)
		}
		again, _ := h.Marshal()
		if !bytes.Equal(out, again) {
			t.Fatalf("encoding not stable:\n%s\n---\n%s", out, again)
		}
	})
}
