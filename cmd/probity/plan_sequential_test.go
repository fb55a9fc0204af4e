package main

import (
	"bytes"
	"encoding/json"
	"strings"
	"testing"
	"time"

	"probity/plan"
)

func planSeqExample(t *testing.T, anticipated bool) *plan.File {
	t.Helper()
	p0 := 0.01
	in := plan.Inputs{Ceiling: 0.02, Confidence: 0.95, CandidateCount: 1, ProducerRisk: 0.10,
		Method: plan.MethodExact, Multiplicity: plan.Bonferroni, Design: plan.DesignSequential, Require: plan.RequireAll}
	if anticipated {
		in.Anticipated = &p0
	}
	f, err := plan.Build(in, plan.Meta{ToolVersion: "test", Created: time.Unix(0, 0), Seed: "ab"})
	if err != nil {
		t.Fatal(err)
	}
	return f
}

// The example: ASN at p0 and at the ceiling beside the fixed n =
// 1271, and the pinned --json keys.
func TestPlanSequentialOutput(t *testing.T) {
	t.Parallel()
	f := planSeqExample(t, true)
	if err := applySequentialDesign(f); err != nil {
		t.Fatal(err)
	}
	var buf bytes.Buffer
	writeSequentialSummary(&buf, f)
	out := buf.String()
	for _, want := range []string{
		"at most 2542 labels",
		"Average labels needed (exact ASN): 774 at the anticipated error 1 %, 515 at the ceiling 2 %;",
		"the fixed plan needs 1271 labels with at most 17 errors (61 % and 41 % of it).",
		"consumer's 0.04995 (at most 0.05)",
		"t = 2542   a = ",
	} {
		if !strings.Contains(out, want) {
			t.Errorf("summary lacks %q:\n%s", want, out)
		}
	}
	data, err := json.Marshal(map[string]any{"sequential": sequentialPlanJSON(f)})
	if err != nil {
		t.Fatal(err)
	}
	var got map[string]map[string]json.RawMessage
	json.Unmarshal(data, &got)
	for _, k := range []string{"max_sample_size", "asn_at_anticipated", "asn_at_ceiling", "accept_if_errors_at_most", "reject_if_errors_at_least"} {
		if _, ok := got["sequential"][k]; !ok {
			t.Errorf("--json sequential lacks %q", k)
		}
	}
	var arr []*int
	json.Unmarshal(got["sequential"]["reject_if_errors_at_least"], &arr)
	if len(arr) != 2542 || arr[0] != nil && *arr[0] < 1 {
		t.Errorf("reject array: %d entries", len(arr))
	}
	oc, ok, err := sequentialOC(f, []float64{0.01, 0.02})
	if err != nil || !ok || oc[1] != f.Rule.ConsumerRisk {
		t.Errorf("OC %v %v %v", oc, ok, err)
	}
	if sequentialPlanJSON(planSeqExample(t, true)) != nil {
		t.Error("a fixed plan has a sequential key")
	}
}

func TestPlanSequentialNeedsAnticipated(t *testing.T) {
	t.Parallel()
	err := applySequentialDesign(planSeqExample(t, false))
	var buf bytes.Buffer
	if code := reportError(&buf, err); code != exitBadInput || !strings.Contains(buf.String(), "--design sequential needs --anticipated") || !strings.Contains(buf.String(), "hint: add --anticipated") {
		t.Errorf("exit %d: %q", code, buf.String())
	}
}
