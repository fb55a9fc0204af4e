package safewrite

import (
	"errors"
	"fmt"
	"io/fs"
	"os"
	"path/filepath"
	"sort"
	"strings"

	"probity/plan/inputerr"
)

// FolderOptions say how a folder of files is written.
type FolderOptions struct {
	// Replace (the --force of the commands) allows writing into a folder
	// that holds files: the files of the same names are replaced (each
	// must be a regular file) and the others are left as they are.
	// Without it the folder must not exist or be empty.
	Replace bool
	// Protected are the files the command reads; none is written over.
	Protected []string
	// Stale are names removed from an existing folder when they are not
	// among the files written (a worksheet-second.csv of an earlier draw
	// that doubled items, a record.sig of an earlier signed record).
	Stale []string
}

// WriteFolder writes files (their Path is a name in the folder) into dir,
// in their order. A dir that does not exist is created with its missing
// parents: the files are written into a temporary folder beside it, which
// is renamed to dir once all are on disk. Into an existing folder the
// files are written under temporary names and moved into place together,
// then the Stale names are removed. Either way a failure or Abort leaves
// the folder as it was (or absent).
func WriteFolder(dir string, files []File, o FolderOptions) (err error) {
	for _, f := range files {
		if f.Path != filepath.Base(f.Path) || f.Path == "." || f.Path == ".." {
			return fmt.Errorf("safewrite: %q is not a file name", f.Path)
		}
	}
	st, err := os.Lstat(dir)
	switch {
	case errors.Is(err, fs.ErrNotExist):
		return writeNewFolder(dir, files)
	case err != nil:
		return writeError(dir, err)
	case !st.IsDir():
		return notFolder(dir, st.Mode())
	}
	if err := checkFolder(dir, o.Replace); err != nil {
		return err
	}
	fo := Options{Replace: true, Protected: o.Protected}
	for _, f := range files {
		path := filepath.Join(dir, f.Path)
		if err := checkTarget(path, fo); err != nil {
			return err
		}
	}
	var stale []string
	for _, name := range o.Stale {
		if containsName(files, name) {
			continue
		}
		path := filepath.Join(dir, name)
		st, err := os.Lstat(path)
		if errors.Is(err, fs.ErrNotExist) {
			continue
		}
		if err != nil {
			return writeError(path, err)
		}
		if !st.Mode().IsRegular() {
			return notRegular(path, st.Mode())
		}
		if err := checkProtected(path, o.Protected); err != nil {
			return err
		}
		stale = append(stale, path)
	}
	w := &writer{}
	defer func() {
		if err != nil {
			w.undo()
		}
	}()
	var temps []string
	for _, f := range files {
		tmp, err := w.writeTemp(dir, f.Path, f)
		if err != nil {
			return err
		}
		temps = append(temps, tmp)
	}
	beforePlace()
	return locked(func() error {
		for i, f := range files {
			if err := place(temps[i], filepath.Join(dir, f.Path), true); err != nil {
				return err
			}
		}
		for _, p := range stale {
			if err := os.Remove(p); err != nil && !errors.Is(err, fs.ErrNotExist) {
				return writeError(p, err)
			}
		}
		if err := syncDir(dir); err != nil {
			return writeError(dir, err)
		}
		w.done()
		return nil
	})
}

// writeNewFolder assembles files in a temporary folder beside dir and
// renames it to dir.
func writeNewFolder(dir string, files []File) (err error) {
	w := &writer{}
	defer func() {
		if err != nil {
			w.undo()
		}
	}()
	parent := filepath.Dir(filepath.Clean(dir))
	if err := w.mkdirAll(parent); err != nil {
		return err
	}
	sweep(parent)
	tmp, err := w.mkdirTemp(parent, filepath.Base(filepath.Clean(dir)))
	if err != nil {
		return err
	}
	for _, f := range files {
		t, err := w.writeTemp(tmp, f.Path, f)
		if err != nil {
			return err
		}
		if err := locked(func() error {
			if err := os.Rename(t, filepath.Join(tmp, f.Path)); err != nil {
				return writeError(filepath.Join(dir, f.Path), err)
			}
			untrack(t)
			return nil
		}); err != nil {
			return err
		}
	}
	if err := os.Chmod(tmp, 0o755); err != nil {
		return writeError(dir, err)
	}
	if err := syncDir(tmp); err != nil {
		return writeError(dir, err)
	}
	beforePlace()
	return locked(func() error {
		if err := os.Rename(tmp, dir); err != nil {
			if st, serr := os.Lstat(dir); serr == nil && st.IsDir() {
				return inputerr.At(dir, 0, "", "%w: it appeared while probity was writing", ErrNotEmpty)
			}
			return writeError(dir, err)
		}
		untrack(tmp)
		if err := syncDir(parent); err != nil {
			return writeError(dir, err)
		}
		w.done()
		return nil
	})
}

// CheckFolder refuses, before any work is done, a dir that a write with
// these options would refuse: a path that is not a folder, or a folder
// that holds files when replace is false. A missing dir is fine.
// Temporaries that probity processes no longer running left in dir are
// removed first; the others are named in the refusal with what they are.
func CheckFolder(dir string, replace bool) error {
	st, err := os.Lstat(dir)
	switch {
	case errors.Is(err, fs.ErrNotExist):
		return nil
	case err != nil:
		return writeError(dir, err)
	case !st.IsDir():
		return notFolder(dir, st.Mode())
	}
	return checkFolder(dir, replace)
}

// checkFolder sweeps dir and refuses it when it is not empty (and replace
// is false) or when a running write is in it.
func checkFolder(dir string, replace bool) error {
	left := sweep(dir)
	for _, l := range left {
		if l.Running {
			return inputerr.At(dir, 0, "", "another write is in progress: it holds %s", l).
				WithHint(fmt.Sprintf("wait for the other probity to finish; if none is running, remove %s", l.Path))
		}
	}
	if replace {
		return nil
	}
	entries, err := os.ReadDir(dir)
	if err != nil {
		return writeError(dir, err)
	}
	if len(entries) == 0 {
		return nil
	}
	if len(left) > 0 && len(left) == len(entries) {
		return inputerr.At(dir, 0, "", "%w: it holds %s", ErrNotEmpty, left[0]).
			WithHint(fmt.Sprintf("remove it (rm -r '%s') and run again", left[0].Path))
	}
	return inputerr.At(dir, 0, "", "%w: it holds %s", ErrNotEmpty, listNames(entries, 4))
}

// PrepareFolder makes dir, an empty folder that the caller fills over many
// writes (the demo), and claims it (see Claim) so that Abort removes it.
// A dir that holds files is refused, unless replace is set and mine says
// the files are what an earlier run of the same caller wrote: then they
// are removed first. Anything else stays refused, so replace never empties
// a folder probity did not fill.
func PrepareFolder(dir string, replace bool, mine func(names []string) bool) (release func(), err error) {
	st, err := os.Lstat(dir)
	switch {
	case errors.Is(err, fs.ErrNotExist):
		w := &writer{}
		if err := w.mkdirAll(dir); err != nil {
			w.undo()
			return nil, err
		}
		if len(w.made) == 0 { // made meanwhile by someone else
			return func() {}, nil
		}
		top := w.made[0] // the outermost folder this call created
		pending.Lock()
		w.done()
		pending.Unlock()
		return Claim(top)
	case err != nil:
		return nil, writeError(dir, err)
	case !st.IsDir():
		return nil, notFolder(dir, st.Mode())
	}
	if err := checkFolder(dir, true); err != nil {
		return nil, err
	}
	entries, err := os.ReadDir(dir)
	if err != nil {
		return nil, writeError(dir, err)
	}
	if len(entries) > 0 {
		names := make([]string, len(entries))
		for i, e := range entries {
			names[i] = e.Name()
		}
		if !replace {
			return nil, inputerr.At(dir, 0, "", "%w: it holds %s", ErrNotEmpty, listNames(entries, 4))
		}
		if !mine(names) {
			return nil, inputerr.At(dir, 0, "", "%w, and its files (%s) are not what probity wrote there", ErrNotEmpty, listNames(entries, 4)).
				WithHint("name a new folder")
		}
		for _, e := range entries {
			if err := os.RemoveAll(filepath.Join(dir, e.Name())); err != nil {
				return nil, writeError(filepath.Join(dir, e.Name()), err)
			}
		}
	}
	return func() {}, nil
}

// notFolder is the refusal of a folder path that is something else.
func notFolder(path string, mode fs.FileMode) error {
	return inputerr.At(path, 0, "", "exists and is %s, not a folder", Kind(mode)).Wrap(ErrNotRegular).
		WithHint("name a folder, or a new path")
}

// listNames lists up to n entry names, then "and k more".
func listNames(entries []os.DirEntry, n int) string {
	names := make([]string, len(entries))
	for i, e := range entries {
		names[i] = e.Name()
		if e.IsDir() {
			names[i] += "/"
		}
	}
	sort.Strings(names)
	if len(names) <= n {
		return strings.Join(names, ", ")
	}
	return fmt.Sprintf("%s and %d more", strings.Join(names[:n], ", "), len(names)-n)
}

func containsName(files []File, name string) bool {
	for _, f := range files {
		if f.Path == name {
			return true
		}
	}
	return false
}
