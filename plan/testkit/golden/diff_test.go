package golden

import (
	"math/rand/v2"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// lcs is the length of the longest common subsequence of a and b, by the
// textbook dynamic programme: the shortest edit script has
// len(a)+len(b)-2·lcs edits.
func lcs(a, b []string) int {
	prev := make([]int, len(b)+1)
	for i := range a {
		cur := make([]int, len(b)+1)
		for j := range b {
			switch {
			case a[i] == b[j]:
				cur[j+1] = prev[j] + 1
			case prev[j+1] >= cur[j]:
				cur[j+1] = prev[j+1]
			default:
				cur[j+1] = cur[j]
			}
		}
		prev = cur
	}
	return prev[len(b)]
}

// TestEditScriptIsShortestAndCorrect checks the edit script on random line
// lists over a small alphabet (so lines repeat): keeping the ' ' and '-'
// lines gives a, keeping ' ' and '+' gives b, and the number of edits is
// the minimum (against the LCS dynamic programme).
func TestEditScriptIsShortestAndCorrect(t *testing.T) {
	rng := rand.New(rand.NewPCG(1, 2))
	gen := func() []string {
		s := make([]string, rng.IntN(12))
		for i := range s {
			s[i] = string(rune('a' + rng.IntN(3)))
		}
		return s
	}
	for trial := 0; trial < 3000; trial++ {
		a, b := gen(), gen()
		ops := editScript(a, b, len(a)+len(b))
		var ga, gb []string
		edits := 0
		for _, e := range ops {
			if e.kind != '+' {
				ga = append(ga, e.line)
			}
			if e.kind != '-' {
				gb = append(gb, e.line)
			}
			if e.kind != ' ' {
				edits++
			}
		}
		if strings.Join(ga, "") != strings.Join(a, "") || strings.Join(gb, "") != strings.Join(b, "") {
			t.Fatalf("%q → %q: script %v does not rebuild both", a, b, ops)
		}
		if want := len(a) + len(b) - 2*lcs(a, b); edits != want {
			t.Fatalf("%q → %q: %d edits, the shortest has %d", a, b, edits, want)
		}
	}
}

func TestDiffShowsTheChangedLinesWithContext(t *testing.T) {
	want := "one\ntwo\nthree\nfour\nfive\nsix\nseven\neight\nnine\nten\n"
	got := strings.Replace(want, "five\n", "FIVE\n", 1)
	d := Diff([]byte(want), []byte(got))
	exp := "@@ golden line 2, got line 2 @@\n two\n three\n four\n-five\n+FIVE\n six\n seven\n eight\n"
	if d != exp {
		t.Errorf("diff:\n%s\nwant:\n%s", d, exp)
	}
	if d := Diff([]byte("a\nb"), []byte("a\nb\n")); !strings.Contains(d, "-b\n\\ no newline at end of file\n+b\n") {
		t.Errorf("a missing final newline is not shown:\n%s", d)
	}
	if d := Diff([]byte("\x89PNG\x00\x01"), []byte("\x89PNG\x00\x02\x03")); d != "binary data differs: golden 6 bytes, got 7 bytes; first difference at byte 5" {
		t.Errorf("binary: %s", d)
	}
	if d := Diff([]byte("same"), []byte("same")); d != "" {
		t.Errorf("equal inputs: %q", d)
	}
}

// TestCompareUpdates writes a golden file under -update (creating its
// folder) and then compares against it.
func TestCompareUpdates(t *testing.T) {
	path := filepath.Join(t.TempDir(), "sub", "x.txt")
	was := *update
	*update = true
	ok := Compare(t, path, []byte("new\n"))
	*update = was
	if !ok {
		t.Fatal("an update reported a difference")
	}
	if b, err := os.ReadFile(path); err != nil || string(b) != "new\n" {
		t.Fatalf("golden file %q, %v", b, err)
	}
	if !CompareString(t, path, "new\n") {
		t.Error("the file just written differs")
	}
	if got := rerun(t); got != "go test ./plan/testkit/golden -run '^TestCompareUpdates$' -update" {
		t.Errorf("rerun = %q", got)
	}
}
