// Package inputfile is the one reader of the whole files a user names
// (a plan, a manifest, a worksheet, a record, a key): it reads at most a
// stated number of bytes, so that a file that is far too large — or a
// link to a device that never ends, such as /dev/zero — is refused in one
// line instead of filling the memory. Logs are streamed, not read whole,
// and bound their lines instead (package sampling).
//
// It depends on the standard library and inputerr alone, so every package
// may import it.
package inputfile

import (
	"errors"
	"fmt"
	"io"
	"io/fs"
	"os"

	"probity/plan/inputerr"
)

// Limits for the kinds of files probity reads whole.
const (
	// SmallLimit bounds a file whose size does not grow with the sample:
	// a plan, a manifest, a key, a sign-off, anticipated errors.
	SmallLimit = 64 << 20
	// TableLimit bounds a file whose size grows with the sample: a
	// worksheet, a ledger, an adjudication file, a record and its PDF, a
	// query result.
	TableLimit = 1 << 30
)

// ErrTooLarge is wrapped by the error about a file larger than its limit.
var ErrTooLarge = errors.New("the file is larger than such a file can be")

// ReadFile reads the file at path, which must be a regular file or a pipe
// of at most limit bytes. what names the kind of file in messages ("plan
// file"). Every error is an *inputerr.Error naming path.
func ReadFile(path, what string, limit int64) ([]byte, error) {
	f, err := os.Open(path)
	if err != nil {
		return nil, inputerr.FromPath(err)
	}
	defer f.Close()
	if st, err := f.Stat(); err == nil {
		if msg := notAFile(st.Mode()); msg != "" {
			return nil, inputerr.At(path, 0, "", "%s, not a %s", msg, what).WithHint("give the path of the " + what)
		}
	}
	return read(f, path, what, limit)
}

// ReadAll reads a stream (standard input) that must hold at most limit
// bytes; name names it in messages.
func ReadAll(r io.Reader, name, what string, limit int64) ([]byte, error) {
	return read(r, name, what, limit)
}

func read(r io.Reader, name, what string, limit int64) ([]byte, error) {
	data, err := io.ReadAll(io.LimitReader(r, limit+1))
	if err != nil {
		if _, ok := errors.AsType[*fs.PathError](err); ok {
			return nil, inputerr.FromPath(err)
		}
		return nil, inputerr.At(name, 0, "", "cannot read: %v", err).Wrap(err)
	}
	if int64(len(data)) > limit {
		return nil, inputerr.At(name, 0, "", "larger than %s: too large for a %s", Size(limit), what).
			WithHint(fmt.Sprintf("check that this is the %s (a link to a device or a huge file is not)", what)).Wrap(ErrTooLarge)
	}
	return data, nil
}

// notAFile says what a path is when it is not a regular file or a pipe.
func notAFile(mode fs.FileMode) string {
	switch t := mode.Type(); {
	case t == 0, t&fs.ModeNamedPipe != 0:
		return ""
	case t&fs.ModeDir != 0:
		return "a folder"
	case t&fs.ModeCharDevice != 0:
		return "a character device"
	case t&fs.ModeDevice != 0:
		return "a block device"
	case t&fs.ModeSocket != 0:
		return "a socket"
	}
	return "not a regular file"
}

// Size writes a byte count in binary units: 64 MiB, 1 GiB, 512 bytes.
func Size(n int64) string {
	units := []string{"GiB", "MiB", "KiB"}
	for i, shift := range []uint{30, 20, 10} {
		if n >= 1<<shift && n%(1<<shift) == 0 {
			return fmt.Sprintf("%d %s", n>>shift, units[i])
		}
	}
	return fmt.Sprintf("%d bytes", n)
}
