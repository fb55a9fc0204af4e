package templates

import (
	"path/filepath"

	"probity/plan/inputerr"
	"probity/sampling/safewrite"
)

// WriteDir writes every file of the set into dir (created if missing), so a
// reviewer can start amending from the wording in use. It refuses to
// overwrite: if any of the files already exists in dir, nothing is written.
// The files are written through safewrite, all or none.
func (s *Set) WriteDir(dir string) error {
	var files []safewrite.File
	for _, name := range Names() {
		files = append(files, safewrite.File{Path: filepath.Join(dir, name), Data: []byte(s.text[name])})
	}
	err := safewrite.Write(files, safewrite.Options{})
	if inputerr.Is(err) && inputerr.HintOf(err) == "" {
		return inputerr.SetHint(err, "choose an empty directory")
	}
	return err
}
