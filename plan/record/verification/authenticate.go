package verification

import (
	"path/filepath"

	"probity/plan/inputerr"
	"probity/plan/inputfile"
)

// Authenticate checks a record.json for a use that reads its numbers only
// (a trend chart): that it is a canonical record of this format, that its
// id recomputes from its content, and that the operator's seal and the
// people's signatures in its folder are valid, bound to it and made with
// keys trust vouches for, and that it carries at least one. record.pdf is
// not checked. The record is authenticated when the report has no failed
// check; the error is for a file that cannot be read.
func Authenticate(jsonPath string, trust Trust, names Names) (*Report, error) {
	js, err := inputfile.ReadFile(jsonPath, "record", inputfile.TableLimit)
	if err != nil {
		return nil, inputerr.Errorf("cannot read %s: %s", jsonPath, messageOf(err)).Wrap(err)
	}
	rep := &Report{}
	rec := checkRecord(rep, jsonPath, js)
	a := authenticate(rep, filepath.Dir(jsonPath), trust, names, rec, js, nil)
	if rec != nil {
		a.summarise(rep, names, rec)
	}
	return rep, nil
}
