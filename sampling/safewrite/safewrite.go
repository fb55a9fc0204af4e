// Package safewrite is the one way probity writes files: every plan,
// draw folder, record folder, chart, key pair and demo goes through it.
//
// A file is written under a temporary name in its target folder, flushed
// to disk (fsync), renamed into place, and the folder is flushed so the
// rename itself survives a crash. A reader therefore sees the old file or
// the whole new one, never half of it. A folder of several files is built
// the same way: a new folder is assembled under a temporary name beside
// its target and renamed into place whole; files written into an existing
// folder are all moved into place together, under the lock that Abort
// takes, so an interrupted command never leaves a mix of old and new.
//
// What may be replaced: without Replace nothing existing is; with it, only
// a regular file. A symbolic link, a named pipe, a socket or a device is
// never written over, and neither is a file the command reads
// (Options.Protected). Refusals are *inputerr.Error values naming the path
// and what it is.
//
// Abort, called on SIGINT or SIGTERM, removes the temporaries of the writes
// in progress and the folders they created. A process killed outright
// leaves its temporaries; their names (TempPrefix, the process id) let the
// next write into the same folder remove them, or say what they are.
//
// The package never prints; it depends on the standard library and the
// error type of probity/plan/inputerr only.
package safewrite

import (
	"errors"
	"fmt"
	"io"
	"io/fs"
	"os"
	"path/filepath"
	"strings"
	"syscall"

	"probity/plan/inputerr"
)

// Sentinel causes of the refusals, so a command can add its own hint.
var (
	// ErrExists: the target exists and replacing was not asked for.
	ErrExists = errors.New("already exists")
	// ErrNotEmpty: the target folder holds files and replacing was not
	// asked for.
	ErrNotEmpty = errors.New("output folder is not empty")
	// ErrNotRegular: the target is not a regular file (or, for a folder,
	// not a folder): a symbolic link, a named pipe, a socket, a device.
	ErrNotRegular = errors.New("not a regular file")
	// ErrProtected: the target is one of the files the command reads.
	ErrProtected = errors.New("is an input of the command")
)

// defaultPerm is the mode of a file written with Perm 0.
const defaultPerm fs.FileMode = 0o644

// Options say what a write may replace.
type Options struct {
	// Replace allows writing over an existing regular file (the --force
	// of the commands); without it an existing file is refused, and a
	// file is created atomically only where none exists.
	Replace bool
	// Protected are the files the command reads: none of them is written
	// over, with or without Replace.
	Protected []string
	// InExistingFolder refuses a target whose folder does not exist,
	// instead of creating it with its missing parents.
	InExistingFolder bool
}

// ErrNoFolder: the target's folder does not exist (InExistingFolder).
var ErrNoFolder = errors.New("folder does not exist")

// File is one file to write.
type File struct {
	// Path is where it goes; for WriteFolder, its name in the folder.
	Path string
	// Data is its content, unless Stream is set.
	Data []byte
	// Stream, when set, writes the content (for large files made on the
	// fly).
	Stream func(io.Writer) error
	// Perm is its mode (0: 0644), set exactly, whatever the umask.
	Perm fs.FileMode
}

// WriteFile writes data to path with mode perm (0: 0644).
func WriteFile(path string, data []byte, perm fs.FileMode, o Options) error {
	return Write([]File{{Path: path, Data: data, Perm: perm}}, o)
}

// Write writes the files, each to its path, all or none: missing parent
// folders are created, every file is written and flushed under a
// temporary name, and only then are they moved into place together. On
// any failure nothing is left: no temporary, no created folder, and no
// file moved into place by this call.
func Write(files []File, o Options) (err error) {
	for _, f := range files {
		if err := checkTarget(f.Path, o); err != nil {
			return err
		}
	}
	w := &writer{}
	defer func() {
		if err != nil {
			w.undo()
		}
	}()
	for _, f := range files {
		dir := filepath.Dir(f.Path)
		if o.InExistingFolder {
			if st, err := os.Stat(dir); err != nil || !st.IsDir() {
				return inputerr.At(f.Path, 0, "", "%w: %s", ErrNoFolder, dir)
			}
		}
		if err := w.mkdirAll(dir); err != nil {
			return err
		}
		if left := leftoversOf(sweep(dir), filepath.Base(f.Path)); len(left) > 0 {
			return leftoverError(f.Path, left)
		}
	}
	var temps []string
	for _, f := range files {
		tmp, err := w.writeTemp(filepath.Dir(f.Path), filepath.Base(f.Path), f)
		if err != nil {
			return err
		}
		temps = append(temps, tmp)
	}
	beforePlace()
	return locked(func() error {
		var placed []string
		for i, f := range files {
			if err := place(temps[i], f.Path, o.Replace); err != nil {
				if !o.Replace { // the files placed so far are new: take them back
					for _, p := range placed {
						os.Remove(p)
					}
				}
				return err
			}
			placed = append(placed, f.Path)
		}
		for _, f := range files {
			if err := syncDir(filepath.Dir(f.Path)); err != nil {
				return writeError(f.Path, err)
			}
		}
		w.done()
		return nil
	})
}

// place moves the temporary tmp to path: a rename when replacing is
// allowed, else a hard link, which fails if path exists (so a file that
// appears meanwhile is not replaced either). The caller holds the lock.
func place(tmp, path string, replace bool) error {
	if replace {
		if err := os.Rename(tmp, path); err != nil {
			return writeError(path, err)
		}
		untrack(tmp)
		return nil
	}
	err := os.Link(tmp, path)
	if errors.Is(err, fs.ErrExist) {
		return inputerr.At(path, 0, "", "%w", ErrExists)
	}
	if err != nil {
		// A file system without hard links: check, then rename.
		if _, serr := os.Lstat(path); serr == nil {
			return inputerr.At(path, 0, "", "%w", ErrExists)
		}
		if err := os.Rename(tmp, path); err != nil {
			return writeError(path, err)
		}
		untrack(tmp)
		return nil
	}
	os.Remove(tmp)
	untrack(tmp)
	return nil
}

// checkTarget refuses a target that is a protected input, is not a regular
// file, or exists when replacing was not asked for.
func checkTarget(path string, o Options) error {
	st, err := os.Lstat(path)
	if errors.Is(err, fs.ErrNotExist) {
		return nil
	}
	if err != nil {
		return writeError(path, err)
	}
	if err := checkProtected(path, o.Protected); err != nil {
		return err
	}
	if !st.Mode().IsRegular() {
		return notRegular(path, st.Mode())
	}
	if !o.Replace {
		return inputerr.At(path, 0, "", "%w", ErrExists)
	}
	return nil
}

// checkProtected refuses path when it is one of the protected files (the
// same file, whatever the name it is reached by).
func checkProtected(path string, protected []string) error {
	st, err := os.Stat(path)
	if err != nil {
		return nil
	}
	for _, p := range protected {
		if ps, err := os.Stat(p); err == nil && os.SameFile(st, ps) {
			return inputerr.At(path, 0, "", "%w; probity never writes over a file it reads", ErrProtected).
				WithHint("choose an output name that is not one of the command's inputs")
		}
	}
	return nil
}

// notRegular is the refusal of a target that is not a regular file.
func notRegular(path string, mode fs.FileMode) error {
	return inputerr.At(path, 0, "", "is %s; probity replaces only regular files", Kind(mode)).Wrap(ErrNotRegular).
		WithHint("name a regular file or a new path")
}

// Kind names the type of a file in words ("a named pipe (FIFO)").
func Kind(mode fs.FileMode) string {
	switch t := mode.Type(); {
	case t&fs.ModeSymlink != 0:
		return "a symbolic link"
	case t&fs.ModeNamedPipe != 0:
		return "a named pipe (FIFO)"
	case t&fs.ModeSocket != 0:
		return "a socket"
	case t&fs.ModeCharDevice != 0:
		return "a character device"
	case t&fs.ModeDevice != 0:
		return "a block device"
	case t&fs.ModeDir != 0:
		return "a folder"
	case mode.IsRegular():
		return "a regular file"
	}
	return "not a regular file"
}

// writeError is a failure to create, write or move a file: the user can
// fix it (permissions, a full disk, a path through a file), so it is an
// input error naming the path.
func writeError(path string, err error) error {
	if errors.Is(err, ErrInterrupted) {
		return err
	}
	var pe *fs.PathError
	var le *os.LinkError
	reason := err.Error()
	switch {
	case errors.As(err, &pe):
		reason = pe.Err.Error()
		if parent := filepath.Dir(pe.Path); creates[pe.Op] && errors.Is(err, fs.ErrNotExist) && isDir(parent) {
			// The folder is there but refuses a new entry: a special
			// file system such as /proc.
			return inputerr.At(path, 0, "", "cannot write: %s exists but does not take new files or folders", parent).
				WithHint("choose a folder on an ordinary disk").Wrap(err)
		}
	case errors.As(err, &le):
		reason = le.Err.Error()
	}
	return inputerr.At(path, 0, "", "cannot write: %s", reason).Wrap(err)
}

// creates are the operations (as *fs.PathError names them) that make a
// new entry in an existing folder.
var creates = map[string]bool{"mkdir": true, "mkdirtemp": true, "createtemp": true, "open": true}

// isDir reports whether path is a folder.
func isDir(path string) bool {
	st, err := os.Stat(path)
	return err == nil && st.IsDir()
}

// leftoversOf keeps the leftovers that stand in the way of writing name:
// temporaries of name itself (a running write of the same file, or an
// older version's) are reported; others are left alone.
func leftoversOf(left []Leftover, name string) []Leftover {
	var out []Leftover
	for _, l := range left {
		base := filepath.Base(l.Path)
		if l.Running && strings.HasSuffix(base, "-"+name) {
			out = append(out, l)
		}
	}
	return out
}

// leftoverError refuses to write where another write may be in progress.
func leftoverError(path string, left []Leftover) error {
	return inputerr.At(path, 0, "", "another write is in progress: %s", left[0]).
		WithHint(fmt.Sprintf("wait for the other probity to finish; if none is running, remove %s", left[0].Path))
}

// syncDir flushes a folder, so that the renames in it are on disk. File
// systems that cannot flush a folder (EINVAL) are taken as they are.
func syncDir(dir string) error {
	d, err := os.Open(dir)
	if err != nil {
		return err
	}
	defer d.Close()
	if err := d.Sync(); err != nil && !errors.Is(err, syscall.EINVAL) && !errors.Is(err, syscall.ENOTSUP) {
		return err
	}
	return nil
}
