package inputfile

import (
	"errors"
	"os"
	"path/filepath"
	"strings"
	"syscall"
	"testing"
)

// TestReadFileBounds (issue 16, item 6): a file larger than its limit, a
// link to a device and a folder are refused in one line naming the path;
// before, a record.json that was a link to /dev/zero was read forever.
func TestReadFileBounds(t *testing.T) {
	dir := t.TempDir()
	ok := filepath.Join(dir, "plan.yaml")
	os.WriteFile(ok, []byte("format: 1\n"), 0o644)
	if data, err := ReadFile(ok, "plan file", 10); err != nil || string(data) != "format: 1\n" {
		t.Fatalf("a file of exactly the limit: %q, %v", data, err)
	}
	big := filepath.Join(dir, "big.yaml")
	os.WriteFile(big, []byte(strings.Repeat("x", 2049)), 0o644)
	zero := filepath.Join(dir, "record.json")
	if err := os.Symlink("/dev/zero", zero); err != nil {
		t.Fatal(err)
	}
	cases := []struct {
		path, want string
		cause      error
	}{
		{big, big + ": larger than 2 KiB: too large for a plan file", ErrTooLarge},
		{zero, zero + ": a character device, not a plan file", nil},
		{dir, dir + ": a folder, not a plan file", nil},
		{filepath.Join(dir, "none.yaml"), filepath.Join(dir, "none.yaml") + ": no such file or directory", os.ErrNotExist},
	}
	for _, c := range cases {
		_, err := ReadFile(c.path, "plan file", 2048)
		if err == nil || err.Error() != c.want || (c.cause != nil && !errors.Is(err, c.cause)) {
			t.Errorf("ReadFile(%s): %v, want %s", c.path, err, c.want)
		}
	}
}

// TestReadFileFromAnEndlessPipe: a pipe that never ends is read only up
// to the limit.
func TestReadFileFromAnEndlessPipe(t *testing.T) {
	fifo := filepath.Join(t.TempDir(), "fifo")
	if err := syscall.Mkfifo(fifo, 0o600); err != nil {
		t.Skip("no FIFOs here:", err)
	}
	go func() {
		w, err := os.OpenFile(fifo, os.O_WRONLY, 0)
		if err != nil {
			return
		}
		defer w.Close()
		buf := make([]byte, 1<<16)
		for {
			if _, err := w.Write(buf); err != nil {
				return
			}
		}
	}()
	_, err := ReadFile(fifo, "record", 1<<20)
	if err == nil || err.Error() != fifo+": larger than 1 MiB: too large for a record" {
		t.Fatalf("endless pipe: %v", err)
	}
}

// TestSize: sizes are written in the largest binary unit that divides
// them.
func TestSize(t *testing.T) {
	for n, want := range map[int64]string{1 << 30: "1 GiB", 64 << 20: "64 MiB", 1536: "1536 bytes", 2048: "2 KiB", 7: "7 bytes"} {
		if got := Size(n); got != want {
			t.Errorf("Size(%d) = %q, want %q", n, got, want)
		}
	}
}
