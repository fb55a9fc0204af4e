// Package planfile is the one way probity reads a plan file: every command
// and package that takes plan.yaml (draw, record, progress, verify) loads
// it here, and gets it only once it has been checked against its inputs.
//
// Parse decodes the one YAML document (plan.Decode: known keys only, the
// right types, each error located by line and field), checks the
// structure, recomputes the rule, the risks and the comparison from the
// inputs (plan.File.Check), verifies any sequential boundaries
// (sequential.Check), for a plan sized for a stratified design its count
// rule on the planned strata (verdict.CheckStratification), and verifies
// the measures' stored designs against their inputs (measure.Recheck:
// every risk recomputed exactly, no search run again). An edited plan — a
// sample size, an acceptance
// number, a ceiling or a risk changed by hand, a class repeated, a
// threshold that is not a number, a design without its section — is an
// input error naming the file, the line and the field; no plan file
// reaches a later step that it could break.
//
// The package computes and never prints; it reads no clock.
package planfile

import (
	"probity/plan"
	"probity/plan/inputerr"
	"probity/plan/inputfile"
	"probity/plan/measure"
	"probity/plan/sequential"
	"probity/plan/verdict"
)

// Parse decodes and checks a plan file's bytes; name is the file as the
// user named it, for errors (input errors wrapping plan.ErrPlanFile).
func Parse(data []byte, name string) (*plan.File, error) {
	f, src, err := plan.Decode(data, name)
	if err != nil {
		return nil, err
	}
	if err := f.Check(src); err != nil {
		return nil, err
	}
	if err := sequential.Check(f, src); err != nil {
		return nil, err
	}
	if err := verdict.CheckStratification(f, src); err != nil {
		return nil, err
	}
	if err := measure.Recheck(f); err != nil {
		return nil, inputerr.Errorf("%s: %v", name, err).WithHint("use the plan file written by probity plan, unedited")
	}
	return f, nil
}

// Load reads, decodes and checks a plan file and returns it with its
// fingerprint (plan.Fingerprint of its bytes).
func Load(path string) (*plan.File, string, error) {
	data, err := inputfile.ReadFile(path, "plan file", inputfile.SmallLimit)
	if err != nil {
		return nil, "", err
	}
	f, err := Parse(data, path)
	if err != nil {
		return nil, "", err
	}
	return f, plan.Fingerprint(data), nil
}

// LoadForJudging is Load for a plan a labeled sample is drawn or judged
// under: a sizing-only plan, which declares no candidates, is an input
// error.
func LoadForJudging(path string) (*plan.File, string, error) {
	f, fp, err := Load(path)
	if err != nil {
		return nil, "", err
	}
	if f.IsSizingOnly() {
		return nil, "", inputerr.Errorf("%s: the plan declares no candidates, so there is nothing to judge", path).WithHint("use the plan the sample was drawn from")
	}
	return f, fp, nil
}
