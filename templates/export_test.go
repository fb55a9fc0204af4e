package templates

import (
	"os"
	"path/filepath"
	"strings"
	"testing"
)

func TestWriteDirRoundTrips(t *testing.T) {
	s, err := Load("")
	if err != nil {
		t.Fatal(err)
	}
	dir := filepath.Join(t.TempDir(), "wording")
	if err := s.WriteDir(dir); err != nil {
		t.Fatal(err)
	}
	entries, _ := os.ReadDir(dir)
	if len(entries) != len(Names()) {
		t.Errorf("wrote %d files, want %d", len(entries), len(Names()))
	}
	back, err := Load(dir)
	if err != nil {
		t.Fatal(err)
	}
	if back.Fingerprint() != s.Fingerprint() {
		t.Error("the written set does not load back to the same wording")
	}
	if len(back.Overridden()) != len(Names()) {
		t.Errorf("Overridden = %v", back.Overridden())
	}
	// A second export into the same directory is refused and changes nothing.
	before, _ := os.ReadFile(filepath.Join(dir, Scope))
	os.WriteFile(filepath.Join(dir, Scope), []byte("amended"), 0o644)
	if err := s.WriteDir(dir); err == nil || !strings.Contains(err.Error(), "already exists") {
		t.Errorf("second WriteDir: err = %v", err)
	}
	after, _ := os.ReadFile(filepath.Join(dir, Scope))
	if string(after) != "amended" || len(before) == 0 {
		t.Error("a refused WriteDir overwrote a file")
	}
}
