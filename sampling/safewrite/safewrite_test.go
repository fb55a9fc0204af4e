package safewrite

import (
	"errors"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"sort"
	"strings"
	"testing"

	"probity/plan/inputerr"
)

// names lists dir (nil when it does not exist).
func names(t *testing.T, dir string) []string {
	t.Helper()
	entries, err := os.ReadDir(dir)
	if err != nil {
		return nil
	}
	var out []string
	for _, e := range entries {
		out = append(out, e.Name())
	}
	sort.Strings(out)
	return out
}

func read(t *testing.T, path string) string {
	t.Helper()
	b, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	return string(b)
}

func TestWriteFileReplacesOnlyARegularFile(t *testing.T) {
	dir := t.TempDir()
	path := filepath.Join(dir, "a", "b", "plan.yaml")
	if err := WriteFile(path, []byte("one"), 0, Options{}); err != nil {
		t.Fatal(err)
	}
	if read(t, path) != "one" {
		t.Fatal("not written")
	}
	if st, _ := os.Stat(path); st.Mode().Perm() != 0o644 {
		t.Errorf("mode %v, want 0644", st.Mode().Perm())
	}
	err := WriteFile(path, []byte("two"), 0, Options{})
	if !errors.Is(err, ErrExists) || !inputerr.Is(err) || read(t, path) != "one" {
		t.Fatalf("existing file without Replace: %v", err)
	}
	if err := WriteFile(path, []byte("two"), 0o600, Options{Replace: true}); err != nil || read(t, path) != "two" {
		t.Fatalf("Replace: %v", err)
	}
	if st, _ := os.Stat(path); st.Mode().Perm() != 0o600 {
		t.Errorf("mode %v, want 0600", st.Mode().Perm())
	}
	if got := names(t, filepath.Dir(path)); len(got) != 1 {
		t.Errorf("temporaries left: %v", got)
	}
	// Never over an input, even with Replace.
	err = WriteFile(path, []byte("three"), 0, Options{Replace: true, Protected: []string{filepath.Join(dir, "a", "..", "a", "b", "plan.yaml")}})
	if !errors.Is(err, ErrProtected) || read(t, path) != "two" {
		t.Errorf("protected input: %v", err)
	}
}

func TestWriteWithoutReplaceIsExclusive(t *testing.T) {
	dir := t.TempDir()
	key, pub := filepath.Join(dir, "k"), filepath.Join(dir, "k.pub")
	os.WriteFile(pub, []byte("old"), 0o644)
	err := Write([]File{{Path: key, Data: []byte("secret"), Perm: 0o600}, {Path: pub, Data: []byte("new")}}, Options{})
	if !errors.Is(err, ErrExists) {
		t.Fatalf("err = %v", err)
	}
	if got := names(t, dir); strings.Join(got, ",") != "k.pub" || read(t, pub) != "old" {
		t.Errorf("after a refused pair: %v", got)
	}
}

func TestWriteFolder(t *testing.T) {
	root := t.TempDir()
	dir := filepath.Join(root, "x", "draw")
	files := []File{{Path: "worksheet.csv", Data: []byte("w")}, {Path: "manifest.json", Data: []byte("m")}}
	if err := WriteFolder(dir, files, FolderOptions{}); err != nil {
		t.Fatal(err)
	}
	if got := strings.Join(names(t, dir), ","); got != "manifest.json,worksheet.csv" {
		t.Errorf("folder holds %s", got)
	}
	if got := names(t, filepath.Dir(dir)); len(got) != 1 {
		t.Errorf("temporaries left beside the folder: %v", got)
	}
	err := WriteFolder(dir, files, FolderOptions{})
	if !errors.Is(err, ErrNotEmpty) || !strings.Contains(err.Error(), "it holds manifest.json, worksheet.csv") {
		t.Errorf("second write without Replace: %v", err)
	}
	os.WriteFile(filepath.Join(dir, "keep.txt"), []byte("k"), 0o644)
	os.WriteFile(filepath.Join(dir, "old.sig"), []byte("s"), 0o644)
	files[0].Data = []byte("w2")
	if err := WriteFolder(dir, files, FolderOptions{Replace: true, Stale: []string{"old.sig"}}); err != nil {
		t.Fatal(err)
	}
	if got := strings.Join(names(t, dir), ","); got != "keep.txt,manifest.json,worksheet.csv" || read(t, filepath.Join(dir, "worksheet.csv")) != "w2" {
		t.Errorf("after Replace the folder holds %s", got)
	}
	// Writing into an existing empty folder.
	empty := filepath.Join(root, "empty")
	os.Mkdir(empty, 0o755)
	if err := WriteFolder(empty, files, FolderOptions{}); err != nil {
		t.Fatal(err)
	}
}

// deadPID is a process id no process has (above Linux's largest).
const deadPID = 2147483646

func TestLeftoversOfAKilledRun(t *testing.T) {
	dir := filepath.Join(t.TempDir(), "draw")
	os.Mkdir(dir, 0o755)
	// A temporary of a process that is gone is removed; the folder then
	// counts as empty.
	dead := filepath.Join(dir, fmt.Sprintf("%s%d-123-worksheet.csv", TempPrefix, deadPID))
	os.WriteFile(dead, []byte("half"), 0o600)
	if err := CheckFolder(dir, false); err != nil {
		t.Fatalf("a dead run's temporary: %v", err)
	}
	if _, err := os.Stat(dead); !errors.Is(err, os.ErrNotExist) {
		t.Error("the dead run's temporary is still there")
	}
	// A temporary of a running process (this one) is named, with its pid.
	live := filepath.Join(dir, fmt.Sprintf("%s%d-123-ledger.csv", TempPrefix, os.Getpid()))
	os.WriteFile(live, []byte("half"), 0o600)
	err := CheckFolder(dir, true)
	if !inputerr.Is(err) || !strings.Contains(err.Error(), fmt.Sprintf("probity process %d, which is still running", os.Getpid())) {
		t.Errorf("a running write's temporary: %v", err)
	}
	os.Remove(live)
	// An older version's temporary: said what it is and how to remove it.
	older := filepath.Join(dir, ".worksheet.csv.tmp-2837465")
	os.WriteFile(older, []byte("half"), 0o600)
	err = CheckFolder(dir, false)
	if !errors.Is(err, ErrNotEmpty) || !strings.Contains(err.Error(), "looks like a temporary file an earlier probity version left") ||
		!strings.Contains(inputerr.HintOf(err), "rm -r '"+older+"'") {
		t.Errorf("an older temporary: %v (hint %q)", err, inputerr.HintOf(err))
	}
}

func TestAbortRemovesTheWriteInProgress(t *testing.T) {
	defer func() { pending.Lock(); pending.aborted = false; pending.Unlock() }()
	dir := filepath.Join(t.TempDir(), "new", "record")
	err := WriteFolder(dir, []File{
		{Path: "record.json", Data: []byte("{}")},
		{Path: "record.pdf", Stream: func(w io.Writer) error { Abort(); _, err := w.Write([]byte("%PDF")); return err }},
	}, FolderOptions{})
	if err == nil {
		t.Fatal("an aborted write succeeded")
	}
	if got := names(t, filepath.Dir(filepath.Dir(dir))); len(got) != 0 {
		t.Errorf("after Abort the parent holds %v", got)
	}
	if err := WriteFile(filepath.Join(t.TempDir(), "after"), nil, 0, Options{}); !errors.Is(err, ErrInterrupted) {
		t.Errorf("a write after Abort: %v", err)
	}
}

func TestPrepareFolder(t *testing.T) {
	dir := filepath.Join(t.TempDir(), "demo")
	release, err := PrepareFolder(dir, false, nil)
	if err != nil {
		t.Fatal(err)
	}
	release()
	os.WriteFile(filepath.Join(dir, "commands.txt"), nil, 0o644)
	os.WriteFile(filepath.Join(dir, "mine.txt"), nil, 0o644)
	if _, err := PrepareFolder(dir, false, nil); !errors.Is(err, ErrNotEmpty) {
		t.Errorf("non-empty without replace: %v", err)
	}
	notMine := func([]string) bool { return false }
	if _, err := PrepareFolder(dir, true, notMine); !errors.Is(err, ErrNotEmpty) || len(names(t, dir)) != 2 {
		t.Errorf("replace of a folder that is not ours: %v", err)
	}
	mine := func(n []string) bool { return len(n) > 0 && n[0] == "commands.txt" }
	if _, err := PrepareFolder(dir, true, mine); err != nil || len(names(t, dir)) != 0 {
		t.Errorf("replace of our folder: %v, left %v", err, names(t, dir))
	}
}
