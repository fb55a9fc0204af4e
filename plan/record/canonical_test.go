package record

import (
	"bytes"
	"probity/plan"
	"strings"
	"testing"
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
	f := Fingerprints{Plan: "a", Log: "b", Manifest: "c", Ledger: "d", Worksheet: "e", Labels: "f"}
	id := ID(f, nil)
	if len(id) != IDLength {
		t.Fatalf("id %q has length %d", id, len(id))
	}
	// SHA-256 of the documented preimage, computed independently with
	// `printf 'probity-record-id-v1\nplan:a\nlog:b\nmanifest:c\nledger:d\nworksheet:e\nlabels:f\n' | sha256sum`.
	if want := SHA256([]byte("probity-record-id-v1\nplan:a\nlog:b\nmanifest:c\nledger:d\nworksheet:e\nlabels:f\n"))[:12]; id != want {
		t.Errorf("ID = %s, want %s", id, want)
	}
	g := f
	g.Labels = "g"
	if ID(g, nil) == id {
		t.Errorf("changing the labels fingerprint did not change the id")
	}
	// A record judged on double labels also depends on the second
	// worksheet and the adjudications; the preimage gains two lines.
	lq := &LabelQuality{SecondWorksheet: "s", Adjudications: "j"}
	if got, want := ID(f, lq), SHA256([]byte("probity-record-id-v1\nplan:a\nlog:b\nmanifest:c\nledger:d\nworksheet:e\nlabels:f\nsecond:s\nadjudications:j\n"))[:12]; got != want {
		t.Errorf("ID with label quality = %s, want %s", got, want)
	}
	other := *lq
	other.Adjudications = "k"
	if ID(f, &other) == ID(f, lq) {
		t.Errorf("changing the adjudications did not change the id")
	}
	// Labels derived from a label trail: the trail's SHA-256 ends the
	// preimage.
	tr := f
	tr.Trail = "t"
	if got, want := ID(tr, lq), SHA256([]byte("probity-record-id-v1\nplan:a\nlog:b\nmanifest:c\nledger:d\nworksheet:e\nlabels:f\nsecond:s\nadjudications:j\ntrail:t\n"))[:12]; got != want {
		t.Errorf("ID with a trail = %s, want %s", got, want)
	}
}
