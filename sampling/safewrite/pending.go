package safewrite

import (
	"errors"
	"os"
	"path/filepath"
	"sync"
)

// ErrInterrupted is returned by a write that starts, or would create a
// file, after Abort: the process is about to exit.
var ErrInterrupted = errors.New("interrupted")

// pending is the cleanup registry: the temporary files and folders this
// process is writing, and the folders a write (or Claim) created, in the
// order they were made. Every change to it, and every step that moves a
// temporary into place, happens under its lock, so Abort sees either the
// temporary or the finished file, never a half-moved folder.
var pending = struct {
	sync.Mutex
	aborted bool
	paths   []string
}{}

// track adds path to the registry; the caller holds the lock. Paths are
// kept absolute, so Abort finds them whatever the working folder is by
// then.
func track(path string) {
	pending.paths = append(pending.paths, absolute(path))
}

// untrack drops path from the registry; the caller holds the lock.
func untrack(path string) {
	path = absolute(path)
	for i := len(pending.paths) - 1; i >= 0; i-- {
		if pending.paths[i] == path {
			pending.paths = append(pending.paths[:i], pending.paths[i+1:]...)
			return
		}
	}
}

// absolute is path made absolute (as it is, if that fails).
func absolute(path string) string {
	if a, err := filepath.Abs(path); err == nil {
		return a
	}
	return path
}

// locked runs f under the registry's lock, unless Abort has run.
func locked(f func() error) error {
	pending.Lock()
	defer pending.Unlock()
	if pending.aborted {
		return ErrInterrupted
	}
	return f()
}

// Abort removes every temporary file and folder a write in progress has
// made and every folder a write or Claim created and has not finished
// with, newest first, and makes later writes fail with ErrInterrupted. It
// is for a process that is about to exit on SIGINT or SIGTERM; it returns
// once nothing of the unfinished writes is left. The package never prints:
// the caller says what happened.
func Abort() {
	pending.Lock()
	defer pending.Unlock()
	pending.aborted = true
	for i := len(pending.paths) - 1; i >= 0; i-- {
		os.RemoveAll(pending.paths[i])
	}
	pending.paths = nil
}

// Claim registers dir, a folder the caller has just created and fills
// over several writes (the demo's folder), so that Abort removes it with
// everything in it. The returned function ends the claim once the folder
// is complete.
func Claim(dir string) (release func(), err error) {
	err = locked(func() error { track(dir); return nil })
	if err != nil {
		return nil, err
	}
	return func() {
		pending.Lock()
		untrack(dir)
		pending.Unlock()
	}, nil
}

// pauseBeforePlace, when set, runs once every temporary of a write is on
// disk and before any of them is moved into place (see
// SetPauseBeforePlace).
var pauseBeforePlace func()

// SetPauseBeforePlace installs f (nil: none) to run in every write between
// its temporaries being on disk and their being moved into place. It is
// for tests of the commands, which stop a process there with a signal or
// kill it, to show what an interruption leaves behind; probity itself
// never sets it.
func SetPauseBeforePlace(f func()) { pauseBeforePlace = f }

// beforePlace runs the pause, if any.
func beforePlace() {
	if pauseBeforePlace != nil {
		pauseBeforePlace()
	}
}
