package safewrite

import (
	"errors"
	"io/fs"
	"os"
	"path/filepath"
)

// writer is one write in progress: what it has made so far, in order, so
// that a failure can take it back and Abort can find it.
type writer struct {
	made []string
}

// mkdirAll creates dir and its missing parents (mode 0755), one level at
// a time under the registry's lock, recording each folder it creates.
func (w *writer) mkdirAll(dir string) error {
	st, err := os.Stat(dir)
	if err == nil {
		if !st.IsDir() {
			return notFolder(dir, st.Mode())
		}
		return nil
	}
	if !errors.Is(err, fs.ErrNotExist) {
		return writeError(dir, err)
	}
	if parent := filepath.Dir(dir); parent != dir {
		if err := w.mkdirAll(parent); err != nil {
			return err
		}
	}
	return locked(func() error {
		if err := os.Mkdir(dir, 0o755); err != nil {
			if errors.Is(err, fs.ErrExist) {
				return nil
			}
			return writeError(dir, err)
		}
		track(dir)
		w.made = append(w.made, dir)
		return nil
	})
}

// writeTemp writes f to a new temporary file in dir for the final name
// name, flushes it and sets its mode; it returns the temporary's path.
func (w *writer) writeTemp(dir, name string, f File) (string, error) {
	var t *os.File
	err := locked(func() error {
		var err error
		if t, err = os.CreateTemp(dir, tempPattern(name)); err != nil {
			return writeError(filepath.Join(dir, name), err)
		}
		track(t.Name())
		w.made = append(w.made, t.Name())
		return nil
	})
	if err != nil {
		return "", err
	}
	final := filepath.Join(dir, name)
	if f.Stream != nil {
		err = f.Stream(t)
	} else {
		_, err = t.Write(f.Data)
	}
	if err != nil {
		t.Close()
		return "", writeError(final, err)
	}
	perm := f.Perm
	if perm == 0 {
		perm = defaultPerm
	}
	if err := t.Chmod(perm); err != nil {
		t.Close()
		return "", writeError(final, err)
	}
	if err := t.Sync(); err != nil {
		t.Close()
		return "", writeError(final, err)
	}
	if err := t.Close(); err != nil {
		return "", writeError(final, err)
	}
	return t.Name(), nil
}

// mkdirTemp makes a temporary folder in parent for the final folder name.
func (w *writer) mkdirTemp(parent, name string) (string, error) {
	var dir string
	err := locked(func() error {
		var err error
		if dir, err = os.MkdirTemp(parent, tempPattern(name)); err != nil {
			return writeError(filepath.Join(parent, name), err)
		}
		track(dir)
		w.made = append(w.made, dir)
		return nil
	})
	return dir, err
}

// undo removes what the write made, newest first: temporaries, and the
// folders it created (with whatever a failed step left in them).
func (w *writer) undo() {
	pending.Lock()
	defer pending.Unlock()
	for i := len(w.made) - 1; i >= 0; i-- {
		os.RemoveAll(w.made[i])
		untrack(w.made[i])
	}
	w.made = nil
}

// done ends the write: what it made is no longer the registry's to remove.
// The caller holds the lock.
func (w *writer) done() {
	for _, p := range w.made {
		untrack(p)
	}
	w.made = nil
}
