//go:build unix

package safewrite

import (
	"errors"
	"os"
	"path/filepath"
	"strings"
	"syscall"
	"testing"
)

func TestNeverReplacesWhatIsNotARegularFile(t *testing.T) {
	dir := t.TempDir()
	fifo := filepath.Join(dir, "fifo")
	if err := syscall.Mkfifo(fifo, 0o644); err != nil {
		t.Skip("no FIFOs here:", err)
	}
	target := filepath.Join(dir, "target")
	os.WriteFile(target, []byte("keep"), 0o644)
	link := filepath.Join(dir, "link")
	if err := os.Symlink(target, link); err != nil {
		t.Fatal(err)
	}
	for _, c := range []struct{ path, kind string }{{fifo, "a named pipe (FIFO)"}, {link, "a symbolic link"}, {"/dev/null", "a character device"}} {
		err := WriteFile(c.path, []byte("x"), 0, Options{Replace: true})
		if !errors.Is(err, ErrNotRegular) || !strings.Contains(err.Error(), c.path+": is "+c.kind) {
			t.Errorf("%s: %v", c.path, err)
		}
	}
	if st, _ := os.Lstat(fifo); st.Mode().Type() != os.ModeNamedPipe {
		t.Error("the FIFO was replaced")
	}
	if st, _ := os.Lstat(link); st.Mode().Type() != os.ModeSymlink || read(t, target) != "keep" {
		t.Error("the symbolic link or its target was replaced")
	}
	if st, _ := os.Stat("/dev/null"); st.Mode().Type()&os.ModeCharDevice == 0 {
		t.Error("/dev/null is no longer a device")
	}
	// All or none: the second target refuses, so the first is not made.
	first := filepath.Join(dir, "new.png")
	err := Write([]File{{Path: first, Data: []byte("png")}, {Path: fifo, Data: []byte("pdf")}}, Options{Replace: true})
	if err == nil {
		t.Fatal("a set with a FIFO in it was written")
	}
	if _, err := os.Lstat(first); !errors.Is(err, os.ErrNotExist) {
		t.Error("the first file of a refused set was written")
	}
	// A file of a folder's set that is a FIFO is refused and nothing changes.
	folder := filepath.Join(dir, "folder")
	os.Mkdir(folder, 0o755)
	os.WriteFile(filepath.Join(folder, "worksheet.csv"), []byte("w"), 0o644)
	if err := syscall.Mkfifo(filepath.Join(folder, "fifo"), 0o644); err != nil {
		t.Fatal(err)
	}
	err = WriteFolder(folder, []File{{Path: "worksheet.csv", Data: []byte("w3")}, {Path: "fifo", Data: nil}}, FolderOptions{Replace: true})
	if !errors.Is(err, ErrNotRegular) || read(t, filepath.Join(folder, "worksheet.csv")) != "w" {
		t.Errorf("FIFO in the set: %v", err)
	}
	// A folder target that is a file or a link is refused too.
	if err := WriteFolder(target, []File{{Path: "x", Data: nil}}, FolderOptions{Replace: true}); !errors.Is(err, ErrNotRegular) {
		t.Errorf("folder over a file: %v", err)
	}
	if err := WriteFolder(link, []File{{Path: "x", Data: nil}}, FolderOptions{Replace: true}); !errors.Is(err, ErrNotRegular) {
		t.Errorf("folder over a link: %v", err)
	}
}
