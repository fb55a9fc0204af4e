package safewrite

import (
	"errors"
	"fmt"
	"io/fs"
	"os"
	"path/filepath"

	"probity/plan/inputerr"
)

// ErrLocked: another process holds the append log open for writing.
var ErrLocked = errors.New("is open for writing in another process")

// AppendLog is a file that only grows, one record at a time: an audit
// trail. Append writes a record whole, in one write, and flushes the file
// to disk before it returns, so a record the caller confirms after Append
// survives a crash or a kill of the process; a record cut short by one
// can only be the last, unconfirmed one. While it is open the process
// holds an exclusive lock on the file (flock where the system has it), so
// two processes never append to one log. It is not safe for concurrent
// use: callers serialise their appends.
type AppendLog struct {
	f    *os.File
	path string
	size int64
}

// CreateAppendLog creates the log at path with its first record, which
// must not exist: the record is written and flushed under a temporary
// name and linked into place (Write without Replace), so the log appears
// whole or not at all; its folder must exist. The log is then open for
// appending.
func CreateAppendLog(path string, first []byte) (*AppendLog, error) {
	if err := Write([]File{{Path: path, Data: first}}, Options{InExistingFolder: true}); err != nil {
		return nil, err
	}
	return OpenAppendLog(path)
}

// OpenAppendLog opens the existing log at path for appending. It must be a
// regular file (never a link, a pipe or a device) that no other process
// holds open as a log.
func OpenAppendLog(path string) (*AppendLog, error) {
	st, err := os.Lstat(path)
	if err != nil {
		return nil, inputerr.FromPath(err)
	}
	if !st.Mode().IsRegular() {
		return nil, notRegular(path, st.Mode())
	}
	f, err := os.OpenFile(path, os.O_WRONLY|os.O_APPEND, 0)
	if err != nil {
		return nil, writeError(path, err)
	}
	if err := lockFile(f); err != nil {
		f.Close()
		if errors.Is(err, ErrLocked) {
			return nil, inputerr.At(path, 0, "", "%w", ErrLocked)
		}
		return nil, writeError(path, err)
	}
	if st, err = f.Stat(); err != nil {
		f.Close()
		return nil, writeError(path, err)
	}
	return &AppendLog{f: f, path: path, size: st.Size()}, nil
}

// Append writes rec at the end of the log in one write and flushes the
// file to disk (fsync). When it returns nil the record is on disk.
func (a *AppendLog) Append(rec []byte) error {
	if a.f == nil {
		return fmt.Errorf("safewrite: append to the closed log %s", a.path)
	}
	n, err := a.f.Write(rec)
	a.size += int64(n)
	if err != nil {
		return writeError(a.path, err)
	}
	if err := a.f.Sync(); err != nil {
		return writeError(a.path, err)
	}
	return nil
}

// Size is the log's length in bytes, as far as this process wrote it.
func (a *AppendLog) Size() int64 { return a.size }

// CutTail shortens the log to its first size bytes and flushes it. It is
// for removing the one record a crash left cut short (never confirmed),
// and refuses to remove more than the bytes after the last line end the
// caller found: size must not be below what the caller verified whole.
func (a *AppendLog) CutTail(size int64) error {
	if size < 0 || size > a.size {
		return fmt.Errorf("safewrite: cannot cut %s to %d bytes (it has %d)", a.path, size, a.size)
	}
	if err := a.f.Truncate(size); err != nil {
		return writeError(a.path, err)
	}
	a.size = size
	if err := a.f.Sync(); err != nil {
		return writeError(a.path, err)
	}
	return syncDir(filepath.Dir(a.path))
}

// Close releases the lock and closes the file.
func (a *AppendLog) Close() error {
	if a.f == nil {
		return nil
	}
	err := a.f.Close()
	a.f = nil
	if err != nil && !errors.Is(err, fs.ErrClosed) {
		return writeError(a.path, err)
	}
	return nil
}
