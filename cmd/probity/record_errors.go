package main

import (
	"errors"
	"io/fs"

	"probity/plan"
	"probity/plan/record/assemble"
	"probity/plan/verdict"
	"probity/sampling"
	"probity/templates"
)

// recordInputError maps an error from reading or checking the record's
// inputs to a user error with its hint: the messages already name the
// file, line and field. Anything else is an internal error.
func recordInputError(err error, path string) error {
	var ie *sampling.InputError
	var pe *fs.PathError
	switch {
	case errors.As(err, &ie):
		if ie.Hint != "" {
			return withHint(badInput(err), ie.Hint)
		}
		return badInput(err)
	case errors.Is(err, plan.ErrPlanFile):
		return withHint(badInput(err), "use the plan file written by probity plan, unedited")
	case errors.As(err, &pe):
		return withHint(usageErrorf("cannot read %s: %v", pe.Path, pe.Err), "check the path")
	case errors.Is(err, verdict.ErrInput), errors.Is(err, verdict.ErrDesign), errors.Is(err, assemble.ErrInput), errors.Is(err, templates.ErrTemplate):
		return badInput(err)
	case errors.Is(err, verdict.ErrUndecided):
		return withHint(badInput(err), "'probity progress' says how many more labels each candidate can need")
	}
	return &internalError{msg: err.Error()}
}
