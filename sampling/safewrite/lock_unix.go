//go:build unix

package safewrite

import (
	"errors"
	"os"
	"syscall"
)

// lockFile takes an exclusive advisory lock on f without waiting; a lock
// held elsewhere is ErrLocked. It is released when f is closed (or the
// process ends, however it ends).
func lockFile(f *os.File) error {
	err := syscall.Flock(int(f.Fd()), syscall.LOCK_EX|syscall.LOCK_NB)
	if errors.Is(err, syscall.EWOULDBLOCK) {
		return ErrLocked
	}
	return err
}
