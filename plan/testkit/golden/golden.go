// Package golden compares what a test produced with a golden file in
// testdata, and rewrites the golden file instead when the test binary runs
// with -update. It serves tests only (testkit): probity itself never
// imports it.
//
// Every package with golden files uses this one flag, so the recipe after
// a deliberate change is the same everywhere:
//
//	go test ./pdfreport -update   # the package's golden files
//	git diff                      # read the change before committing it
//
// (DEVELOPERS.md gives the command line for every package at once: a test
// binary refuses a flag it does not define, so go test ./... -update fails
// in the packages without golden files.)
//
// Golden files are written through probity's safe writer
// (sampling/safewrite), so an interrupted update never leaves half a file.
// A text difference is reported as a line diff; a binary one by its sizes
// and the first differing byte.
package golden

import (
	"bytes"
	"flag"
	"fmt"
	"os"
	"path/filepath"
	"strings"
	"testing"
	"unicode/utf8"

	"probity/sampling/safewrite"
)

var update = flag.Bool("update", false, "rewrite the golden files in testdata from the current output (then read git diff)")

// Updating reports whether the test binary runs with -update, for a test
// that writes or compares a golden file its own way.
func Updating() bool { return *update }

// Compare compares got with the golden file at path (relative to the
// package's folder). Under -update it writes got to path, creating missing
// folders, and passes. Otherwise a missing golden file stops the test and
// a difference fails it, with a diff and the command that rewrites the
// file. It reports whether got equals the golden file (true after an
// update), so a caller may add its own account of a difference.
func Compare(t testing.TB, path string, got []byte) bool {
	t.Helper()
	if *update {
		if err := Write(path, got); err != nil {
			t.Fatalf("golden: %v", err)
		}
		return true
	}
	want, err := os.ReadFile(path)
	if err != nil {
		t.Fatalf("golden: %v\n(%s writes it)", err, rerun(t))
		return false
	}
	if bytes.Equal(got, want) {
		return true
	}
	t.Errorf("%s differs from the output (- golden, + got):\n%s\nif the change is intended, %s and read git diff", path, Diff(want, got), rerun(t))
	return false
}

// CompareString is Compare for text.
func CompareString(t testing.TB, path, got string) bool {
	t.Helper()
	return Compare(t, path, []byte(got))
}

// Write writes data to the golden file at path through the safe writer,
// replacing the file and creating missing folders.
func Write(path string, data []byte) error {
	return safewrite.WriteFile(path, data, 0o644, safewrite.Options{Replace: true})
}

// rerun is the command line that rewrites the golden files of t's test.
func rerun(t testing.TB) string {
	name, _, _ := strings.Cut(t.Name(), "/")
	return fmt.Sprintf("go test %s -run '^%s$' -update", packageDir(), name)
}

// packageDir is the test's package folder as a go test argument (./a/b),
// found by walking up to go.mod; "." when that fails.
func packageDir() string {
	wd, err := os.Getwd()
	if err != nil {
		return "."
	}
	for dir := wd; ; {
		if _, err := os.Stat(filepath.Join(dir, "go.mod")); err == nil {
			rel, err := filepath.Rel(dir, wd)
			if err != nil || rel == "." {
				return "."
			}
			return "./" + filepath.ToSlash(rel)
		}
		parent := filepath.Dir(dir)
		if parent == dir {
			return "."
		}
		dir = parent
	}
}

// isText reports whether data reads as text: valid UTF-8 without NUL bytes.
func isText(data []byte) bool {
	return utf8.Valid(data) && bytes.IndexByte(data, 0) < 0
}
