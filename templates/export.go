package templates

import (
	"errors"
	"fmt"
	"io/fs"
	"os"
	"path/filepath"
)

// WriteDir writes every file of the set into dir (created if missing), so a
// reviewer can start amending from the wording in use. It refuses to
// overwrite: if any of the files already exists in dir, nothing is written.
// Each file is written to a temporary name and renamed.
func (s *Set) WriteDir(dir string) error {
	if err := os.MkdirAll(dir, 0o755); err != nil {
		return err
	}
	for _, name := range Names() {
		path := filepath.Join(dir, name)
		if _, err := os.Lstat(path); err == nil {
			return fileError(path, "already exists; choose an empty directory")
		} else if !errors.Is(err, fs.ErrNotExist) {
			return err
		}
	}
	for _, name := range Names() {
		path := filepath.Join(dir, name)
		tmp, err := os.CreateTemp(dir, "."+name+".tmp-*")
		if err != nil {
			return err
		}
		_, werr := tmp.WriteString(s.text[name])
		cerr := tmp.Close()
		if werr == nil {
			werr = cerr
		}
		if werr == nil {
			werr = os.Chmod(tmp.Name(), 0o644)
		}
		if werr == nil {
			werr = os.Rename(tmp.Name(), path)
		}
		if werr != nil {
			os.Remove(tmp.Name())
			return fmt.Errorf("writing %s: %w", path, werr)
		}
	}
	return nil
}
