package plan

import (
	"encoding/json"
	"errors"
	"strings"
	"testing"

	"gopkg.in/yaml.v3"
)

// TestJSONReportRefused: a plan's JSON report is refused as such, while a
// plan file written in JSON syntax (YAML reads it) is not taken for one.
func TestJSONReportRefused(t *testing.T) {
	report := `{"sample_size": 45, "acceptance_number": 0, "plan_file": "", "fingerprint": ""}`
	_, _, err := Decode([]byte(report), "plan.json")
	if !errors.Is(err, ErrJSONReport) || !errors.Is(err, ErrPlanFile) || err.Error() != "plan.json: this is a plan's JSON report, not the plan file" {
		t.Fatalf("report: %v", err)
	}
	f := examplePlan(t)
	data, err := yaml.Marshal(f)
	if err != nil {
		t.Fatal(err)
	}
	var generic map[string]any
	if err := yaml.Unmarshal(data, &generic); err != nil {
		t.Fatal(err)
	}
	js, err := json.Marshal(generic)
	if err != nil {
		t.Fatal(err)
	}
	if _, _, err := Decode(js, "plan.json"); err != nil && strings.Contains(err.Error(), "JSON report") {
		t.Fatalf("a plan file in JSON syntax taken for a report: %v", err)
	}
}
