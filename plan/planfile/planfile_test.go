package planfile

import (
	"errors"
	"fmt"
	"os"
	"path/filepath"
	"strings"
	"testing"
	"time"

	"probity/plan"
	"probity/plan/inputerr"
	"probity/plan/sequential"
)

// thresholdPlan is the plan of the attack: ceiling 2 %, confidence
// 95 %, anticipated error 1 %, producer's risk 10 %, three thresholds
// under Bonferroni (per-candidate risk 1.67 %): n = 1712, c = 22.
func thresholdPlan(t testing.TB) []byte {
	t.Helper()
	p0 := 0.01
	in := plan.Inputs{Ceiling: 0.02, Confidence: 0.95, CandidateCount: 3, Anticipated: &p0, ProducerRisk: 0.10,
		Method: plan.MethodExact, Multiplicity: plan.Bonferroni, Design: plan.DesignFixed, Require: plan.RequireAny}
	var cands []plan.Candidate
	for _, th := range []float64{0.35, 0.5, 0.65} {
		v := th
		cands = append(cands, plan.Candidate{Name: fmt.Sprintf("score>=%g", th), ScoreColumn: "score", Threshold: &v, Positive: "defect", Negative: "sound"})
	}
	f, err := plan.Build(in, plan.Meta{ToolVersion: "test", Created: time.Date(2026, 11, 30, 9, 0, 0, 0, time.UTC),
		Seed: "0f1e2d3c4b5a69788796a5b4c3d2e1f0", Classes: []string{"defect", "sound"}, Candidates: cands})
	if err != nil {
		t.Fatal(err)
	}
	if f.Rule.SampleSize != 1712 || f.Rule.AcceptanceNumber != 22 {
		t.Fatalf("plan (%d, %d), want (1712, 22)", f.Rule.SampleSize, f.Rule.AcceptanceNumber)
	}
	data, err := f.Marshal()
	if err != nil {
		t.Fatal(err)
	}
	return data
}

// sequentialPlan is a sequential plan for the same ceiling and anticipated
// error, one candidate (fixed plan n = 1271, c = 17).
func sequentialPlan(t testing.TB, population int64) []byte {
	t.Helper()
	p0 := 0.01
	in := plan.Inputs{Ceiling: 0.02, Confidence: 0.95, CandidateCount: 1, Anticipated: &p0, ProducerRisk: 0.10, Population: population,
		Method: plan.MethodExact, Multiplicity: plan.Bonferroni, Design: plan.DesignSequential, Require: plan.RequireAll}
	f, err := plan.Build(in, plan.Meta{ToolVersion: "test", Created: time.Date(2026, 11, 30, 9, 0, 0, 0, time.UTC),
		Seed: "5eed", Classes: []string{"ok", "bad"}, Candidates: []plan.Candidate{{Name: "model-a", Column: "pred_a"}}})
	if err != nil {
		t.Fatal(err)
	}
	if _, err := sequential.Apply(f, 0); err != nil {
		t.Fatal(err)
	}
	data, err := f.Marshal()
	if err != nil {
		t.Fatal(err)
	}
	return data
}

// edit replaces the first occurrence of old (the last with last set) and
// returns the new text and the line of the replacement.
func edit(t *testing.T, data []byte, old, new string, last bool) ([]byte, int) {
	t.Helper()
	s := string(data)
	i := strings.Index(s, old)
	if last {
		i = strings.LastIndex(s, old)
	}
	if i < 0 {
		t.Fatalf("%q is not in the plan", old)
	}
	return []byte(s[:i] + new + s[i+len(old):]), strings.Count(s[:i], "\n") + 1
}

// Every plan probity makes loads.
func TestMadePlansLoad(t *testing.T) {
	for name, data := range map[string][]byte{
		"thresholds": thresholdPlan(t), "sequential": sequentialPlan(t, 0), "sequential lot": sequentialPlan(t, 50000),
	} {
		if _, err := Parse(data, "plan.yaml"); err != nil {
			t.Errorf("%s: %v", name, err)
		}
	}
	for _, p := range []string{"../../testdata/draw/plan.yaml", "../../testdata/draw/plan-sizing-only.yaml", "../../testdata/sql/plan.yaml"} {
		if _, _, err := Load(p); err != nil {
			t.Errorf("%s: %v", p, err)
		}
	}
}

// The attacks of the issue, and their kin: each edit of a plan made by
// probity is refused with the file, the line of the edited key and the
// field. Before the plan was checked on load, every one of them loaded
// (the last two then failed inside a later step as an internal error).
func TestEditedPlansRefused(t *testing.T) {
	fixed := thresholdPlan(t)
	seq := sequentialPlan(t, 0)
	for _, tc := range []struct {
		name     string
		data     []byte
		old, new string
		last     bool
		field    string
		want     string
		// at is the text on the line the error names ("": the edit's)
		at string
	}{
		{"sample size 1712 → 60", fixed, "sample_size: 1712", "sample_size: 60", false, "rule.sample_size", "states 60, but the inputs give 1712", ""},
		{"acceptance number", fixed, "acceptance_number: 22", "acceptance_number: 30", false, "rule.acceptance_number", "states 30, but the inputs give 22", ""},
		{"ceiling", fixed, "ceiling: 0.02", "ceiling: 0.03", false, "rule.sample_size", "states 1712, but the inputs give 591", "sample_size: 1712"},
		{"confidence", fixed, "confidence: 0.95", "confidence: 0.9", false, "rule.per_candidate_risk", "but the inputs give 0.0333333", "per_candidate_risk:"},
		{"per-candidate risk", fixed, "per_candidate_risk: 0.01666666666666668", "per_candidate_risk: 0.05", false, "rule.per_candidate_risk", "states 0.05, but the inputs give 0.0166666", ""},
		{"consumer's risk", fixed, "consumer_risk: 0.016557872661596158", "consumer_risk: 0.0165", false, "rule.consumer_risk", "states 0.0165, but the inputs give 0.01655787", ""},
		{"producer's risk", fixed, "producer_risk: 0.09945711575772648", "producer_risk: 0.05", false, "rule.producer_risk", "states 0.05", ""},
		{"comparison", fixed, "sample_size: 2480", "sample_size: 248", false, "comparison[1].sample_size", "states 248, but the inputs give 2480", ""},
		{"comparison row", fixed, "rule: kl", "rule: chebyshev", false, "comparison[1].rule", `states "chebyshev", but row 2 is "kl"`, ""},
		{"positive = negative", fixed, "negative: sound", "negative: defect", true, "candidates[2].negative", `"defect" is also the positive label`, ""},
		{"positive not a class", fixed, "positive: defect", "positive: broken", false, "candidates[0].positive", `"broken" is not one of the classes (defect, sound)`, ""},
		{"class twice", fixed, "  - sound\n", "  - defect\n", false, "classes[1]", `"defect" is listed twice`, ""},
		{"class unsure", fixed, "  - sound\n", "  - Unsure\n", false, "classes[1]", "marks an item the labeler cannot decide", ""},
		{"class with spaces", fixed, "  - sound\n", "  - \" sound\"\n", false, "classes[1]", "leading or trailing spaces", ""},
		{"threshold .nan", fixed, "threshold: 0.5", "threshold: .nan", false, "candidates[1].threshold", "NaN is not a finite number", ""},
		{"threshold .inf", fixed, "threshold: 0.5", "threshold: .inf", false, "candidates[1].threshold", "+Inf is not a finite number", ""},
		{"column and threshold", fixed, "score_column: score", "column: pred\n    score_column: score", false, "candidates[0]", "must set either column", "- name: score>=0.35"},
		{"design sequential without its section", fixed, "design: fixed", "design: sequential", false, "inputs.design", "the design is sequential but the file has no sequential section", ""},
		{"unset setting", fixed, "multiplicity: bonferroni", "multiplicity: \"\"", false, "inputs.multiplicity", `"": must be one of bonferroni, holm, fixed-sequence`, ""},
		{"unknown key", fixed, "require: any", "require: any\n  requires: all", false, "inputs.requires", "is not a key of a plan file", "requires: all"},
		{"unknown rule key", fixed, "acceptance_number: 22", "acceptance_number: 22\n  acceptance: 60", false, "rule.acceptance", "is not a key of a plan file", "acceptance: 60"},
		{"design fixed with a section", seq, "design: sequential", "design: fixed", false, "sequential", "a sequential section is given but the design is fixed", "sequential:\n"},
		{"sequential: early acceptance", seq, "accept_if_errors_at_most: [-1,", "accept_if_errors_at_most: [0,", false, "sequential.accept_if_errors_at_most", "above the per-candidate risk 0.05", ""},
		{"sequential: boundaries do not meet", seq, "]\n  reject_if_errors_at_least", ", 99]\n  reject_if_errors_at_least", false, "sequential.accept_if_errors_at_most", "has 2543 entries", ""},
		{"sequential: ASN", seq, "asn_at_ceiling: ", "asn_at_ceiling: 1", false, "sequential.asn_at_ceiling", "but the inputs give", ""},
		{"sequential: fixed plan", seq, "fixed_sample_size: 1271", "fixed_sample_size: 1270", false, "sequential.fixed_sample_size", "states 1270, but the inputs give 1271", ""},
		{"sequential: rule's n", seq, "sample_size: 2542", "sample_size: 1271", false, "rule.sample_size", "states 1271, but the inputs give 2542", ""},
		{"sequential: method", seq, "method: exact", "method: hoeffding", false, "rule.model", `states "binomial", but the inputs give "hoeffding"`, "model: binomial"},
	} {
		t.Run(tc.name, func(t *testing.T) {
			bad, line := edit(t, tc.data, tc.old, tc.new, tc.last)
			if tc.at != "" {
				i := strings.Index(string(bad), tc.at)
				if i < 0 {
					t.Fatalf("%q is not in the edited plan", tc.at)
				}
				line = strings.Count(string(bad[:i]), "\n") + 1
			}
			_, err := Parse(bad, "plan.yaml")
			prefix := fmt.Sprintf("plan.yaml line %d, field %s: ", line, tc.field)
			if err == nil || !errors.Is(err, plan.ErrPlanFile) || !strings.HasPrefix(err.Error(), prefix) || !strings.Contains(err.Error(), tc.want) {
				t.Fatalf("error %v\nwant %q…%q", err, prefix, tc.want)
			}
			if !inputerr.Is(err) || inputerr.HintOf(err) == "" {
				t.Errorf("not an input error with a hint: %#v", err)
			}
		})
	}
}

// A second YAML document, appended to a valid plan, is refused at its line.
func TestSecondDocumentRefused(t *testing.T) {
	data := thresholdPlan(t)
	lines := strings.Count(string(data), "\n")
	for _, extra := range []string{"---\n", "---\nrule:\n  sample_size: 60\n", "--- {}\n"} {
		_, err := Parse(append(append([]byte{}, data...), extra...), "plan.yaml")
		want := fmt.Sprintf("plan.yaml line %d: a second YAML document follows the plan", lines+1)
		if err == nil || !strings.HasPrefix(err.Error(), want) {
			t.Errorf("%q appended: %v, want %q", extra, err, want)
		}
	}
}

// What is not YAML, or not a plan, is located too.
func TestMalformedFiles(t *testing.T) {
	for _, tc := range []struct{ text, want string }{
		{"", "p.yaml: the file is empty"},
		{"format: 1\nseed: [\n", "p.yaml line 2: not a valid YAML document: did not find expected node content"},
		{"- 1\n- 2\n", "p.yaml line 1: the document is not a plan"},
		{"format: 1\nseed: &s x\nsystem: *s\n", "p.yaml line 2, field seed: anchors and aliases are not used in plan files"},
		{"format: 1\nformat: 1\n", "p.yaml line 2, field format: mapping key \"format\" already defined at line 1"},
		{"format: x\n", "p.yaml line 1, field format: cannot unmarshal !!str `x` into int"},
	} {
		_, err := Parse([]byte(tc.text), "p.yaml")
		if err == nil || !strings.HasPrefix(err.Error(), tc.want) || !errors.Is(err, plan.ErrPlanFile) {
			t.Errorf("%q: %v, want %q", tc.text, err, tc.want)
		}
	}
}

// A risk is checked to the digits the file holds: a rounded value that
// agrees passes, one digit off does not.
func TestRiskDigits(t *testing.T) {
	data := thresholdPlan(t)
	for _, tc := range []struct {
		stated string
		ok     bool
	}{
		{"0.016557872661596158", true},
		{"0.0165578726616", true}, // 12 digits, rounded
		{"0.01656", true},
		{"0.0166", true},
		{"0.0165", false},
		{"0.01655", false},
		{"0.016557872661596", true},
		// 14 digits, off by 3e-15: within half a unit of the 13th
		// significant digit (5e-15), the most that is checked
		{"0.016557872661599", true},
		{"0.01655787266161", false}, // off by 1.4e-14 in the 13th digit
	} {
		bad, _ := edit(t, data, "consumer_risk: 0.016557872661596158", "consumer_risk: "+tc.stated, false)
		_, err := Parse(bad, "plan.yaml")
		if (err == nil) != tc.ok {
			t.Errorf("consumer_risk %s: %v", tc.stated, err)
		}
	}
}

func TestLoadForJudging(t *testing.T) {
	if _, _, err := LoadForJudging("../../testdata/draw/plan-sizing-only.yaml"); err == nil || !strings.Contains(err.Error(), "declares no candidates") {
		t.Errorf("sizing-only plan: %v", err)
	}
	p := filepath.Join(t.TempDir(), "plan.yaml")
	if err := os.WriteFile(p, thresholdPlan(t), 0o644); err != nil {
		t.Fatal(err)
	}
	f, fp, err := LoadForJudging(p)
	if err != nil || f.Rule.SampleSize != 1712 || len(fp) != 64 {
		t.Errorf("load: %v", err)
	}
	if _, _, err := Load(filepath.Join(t.TempDir(), "none.yaml")); err == nil || !inputerr.Is(err) {
		t.Errorf("missing file: %v", err)
	}
}
