package record

import (
	"bytes"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"testing"

	"probity/plan"
	"probity/plan/testkit/needs"
)

func fixture() *Record {
	p0 := 0.01
	adj := 0.0123
	return &Record{
		Format:      Format,
		ToolVersion: "0.1.0",
		RecordID:    "0123456789ab",
		Date:        "2026-01-31",
		System:      "Sorter <β>",
		Use:         "general",
		Plan:        PlanInfo{Method: plan.MethodExact, Ceiling: 0.02, Confidence: 0.95, Anticipated: &p0, SampleSize: 1271, AcceptanceNumber: 17, PerCandidateRisk: 0.05, ConsumerRisk: 0.049712345678901234},
		Candidates: []Candidate{{
			Name: "m1", Labeled: 1271, Errors: 9, Estimate: 9.0 / 1271, UpperBound: 0.0123456789012345678,
			BoundConfidence: 0.95, PValue: 1e-7, AdjustedPValue: &adj, Verdict: Accept,
			Confusion: Confusion{Classes: []string{"a", "b"}, Counts: [][]int{{1, 2}, {3, 4}}},
		}},
		OverallVerdict: Accept,
	}
}

func TestEncodeIsCanonicalAndStable(t *testing.T) {
	r := fixture()
	a, err := Encode(r)
	if err != nil {
		t.Fatal(err)
	}
	if !bytes.HasSuffix(a, []byte("}\n")) {
		t.Errorf("no trailing newline")
	}
	if !IsCanonical(a) {
		t.Fatalf("Encode output is not canonical:\n%s", a)
	}
	back, err := Decode(a)
	if err != nil {
		t.Fatal(err)
	}
	b, err := Encode(back)
	if err != nil {
		t.Fatal(err)
	}
	if !bytes.Equal(a, b) {
		t.Errorf("encode(decode(x)) differs:\n%s\n%s", a, b)
	}
	s := string(a)
	// Fixed formatting decided in FloatDigits (common practice, no source).
	for _, want := range []string{
		`"upper_bound": 0.0123456789012346,`,
		`"consumer_risk": 0.0497123456789012,`,
		`"p_value": 1e-07,`,
		`"spares_used": [],`,
		`"oc": [],`,
		`"system": "Sorter <β>",`,
		`"sample_size": 1271,`,
	} {
		if !strings.Contains(s, want) {
			t.Errorf("encoding lacks %s", want)
		}
	}
	if strings.Contains(s, "null,\n    \"classes\"") || strings.Contains(s, `"strata": null`) {
		t.Errorf("encoding holds null lists:\n%s", s)
	}
	if strings.Index(s, `"format"`) > strings.Index(s, `"tool_version"`) {
		t.Errorf("keys are not in struct order")
	}
	if r.Candidates[0].Strata != nil {
		t.Errorf("Encode modified the caller's record")
	}
}

func TestIsCanonicalRejectsEdits(t *testing.T) {
	a, err := Encode(fixture())
	if err != nil {
		t.Fatal(err)
	}
	edits := map[string][]byte{
		"reindented":   bytes.Replace(a, []byte("  \"format\""), []byte(" \"format\""), 1),
		"number style": bytes.Replace(a, []byte("1e-07"), []byte("0.0000001"), 1),
		"unknown key":  bytes.Replace(a, []byte("{\n"), []byte("{\n  \"x\": 1,\n"), 1),
		"no newline":   bytes.TrimSuffix(a, []byte("\n")),
	}
	for name, e := range edits {
		if bytes.Equal(e, a) {
			t.Fatalf("%s: edit did not change the bytes", name)
		}
		if IsCanonical(e) {
			t.Errorf("%s: edited record reported canonical", name)
		}
	}
}

func TestID(t *testing.T) {
	r := fixture()
	id, err := ID(r)
	if err != nil || !IsID(id) {
		t.Fatalf("id %q: %v", id, err)
	}
	// The documented preimage: the canonical record.json with an empty
	// record_id, after the domain line.
	c := *r
	c.RecordID = ""
	data, _ := Encode(&c)
	if want := SHA256(append([]byte("probity-record-id-v2\n"), data...))[:IDLength]; id != want {
		t.Errorf("ID = %s, want %s", id, want)
	}
	// The id does not depend on the id already written.
	r.RecordID = strings.Repeat("f", IDLength)
	if again, _ := ID(r); again != id {
		t.Errorf("the id depends on the record_id field")
	}
	// Whatever the record says changes it: the attacks of a shared id.
	changes := map[string]func(*Record){
		"use":           func(r *Record) { r.Use = "safety" },
		"date":          func(r *Record) { r.Date = "2026-02-01" },
		"sealing key":   func(r *Record) { r.SigningKey = "sha256:" + strings.Repeat("0", 64) },
		"bound":         func(r *Record) { r.Method.Bound = plan.BoundWeightedHoeffding },
		"wording":       func(r *Record) { r.Wording.Digest = strings.Repeat("1", 64) },
		"custom":        func(r *Record) { r.Wording.Replaced = []string{"decision-rule.md"} },
		"revision":      func(r *Record) { r.Revision, r.Supersedes = 2, id },
		"verdict":       func(r *Record) { r.Candidates[0].Verdict = Reject },
		"labels":        func(r *Record) { r.Fingerprints.Labels = "g" },
		"demonstration": func(r *Record) { r.Demonstration = true },
		"sign-off":      func(r *Record) { r.Signoff = []Signoff{{Role: "approved", Meaning: "I approve."}} },
	}
	for name, change := range changes {
		x := fixture()
		x.Candidates = append([]Candidate{}, x.Candidates...)
		change(x)
		if other, _ := ID(x); other == id {
			t.Errorf("changing the %s did not change the id", name)
		}
	}
}

// TestIDShellRecipe recomputes a record id with the README's recipe
// (sed, sha256sum), independently of this package.
func TestIDShellRecipe(t *testing.T) {
	for _, tool := range []string{"sh", "sed", "sha256sum", "cut"} {
		needs.Program(t, tool)
	}
	r := fixture()
	r.LabelQuality = &LabelQuality{Disagreements: []Disagreement{{Item: 3, RecordID: "w00311"}}}
	id, _ := ID(r)
	r.RecordID = id
	data, _ := Encode(r)
	path := filepath.Join(t.TempDir(), "record.json")
	if err := os.WriteFile(path, data, 0o644); err != nil {
		t.Fatal(err)
	}
	const recipe = `{ printf 'probity-record-id-v2\n'; sed 's/^  "record_id": "[0-9a-f]*",$/  "record_id": "",/' "$1"; } | sha256sum | cut -c1-32`
	out, err := exec.Command("sh", "-c", recipe, "sh", path).Output()
	if err != nil || strings.TrimSpace(string(out)) != id {
		t.Errorf("the recipe gives %q (%v), want %s", out, err, id)
	}
	// A record whose labels came from a label trail: the trail's
	// fingerprint and summary are part of what the id covers.
	withTrail := *r
	withTrail.RecordID = ""
	withTrail.Fingerprints.Trail = strings.Repeat("7", 64)
	withTrail.LabelTrail = &LabelTrail{Labelers: []string{"Jo Example"}, Events: 3}
	idT, _ := ID(&withTrail)
	other := withTrail
	other.LabelTrail = &LabelTrail{Labelers: []string{"Jo Example"}, Events: 3, Changed: 1}
	idO, _ := ID(&other)
	if idT == id || idO == idT {
		t.Errorf("the id does not cover the label trail: %s, %s, %s", id, idT, idO)
	}
}
