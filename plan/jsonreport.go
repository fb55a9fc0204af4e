package plan

import (
	"bytes"
	"encoding/json"
	"errors"

	"probity/plan/inputerr"
)

// ErrJSONReport is wrapped by the error about a plan's JSON report given
// where the plan file is expected.
var ErrJSONReport = errors.New("a plan's JSON report, not a plan file")

// checkNotReport refuses the JSON report that plan prints (an object with
// a sample_size and no rule section) where the plan file is expected:
// YAML reads JSON, so without this the report fails with one line per
// key the plan file does not have.
func checkNotReport(data []byte, name string) error {
	t := bytes.TrimSpace(data)
	if len(t) == 0 || t[0] != '{' || !json.Valid(t) {
		return nil
	}
	var keys map[string]json.RawMessage
	if json.Unmarshal(t, &keys) != nil {
		return nil
	}
	_, size := keys["sample_size"]
	_, rule := keys["rule"]
	if !size || rule {
		return nil
	}
	return inputerr.At(name, 0, "", "this is a plan's JSON report, not the plan file").
		WithHint("pass the YAML plan file probity plan writes (plan.yaml); the JSON it prints describes the plan but is not it").
		Wrap(errors.Join(ErrPlanFile, ErrJSONReport))
}
