//go:build !unix

package safewrite

import "os"

// lockFile cannot lock on this system: the caller must make sure one
// process appends to a log.
func lockFile(f *os.File) error { return nil }
