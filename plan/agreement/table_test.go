package agreement

import (
	"errors"
	"testing"
)

func TestNewTableRejectsBadClasses(t *testing.T) {
	for _, classes := range [][]string{nil, {"ok"}, {"a", "a"}, {"a", ""}} {
		if _, err := NewTable(classes); !errors.Is(err, ErrClasses) {
			t.Errorf("NewTable(%q) error = %v, want ErrClasses", classes, err)
		}
	}
}

func TestTableAddCountsAndAgreement(t *testing.T) {
	tb, err := NewTable([]string{"cat", "dog", "fox"})
	if err != nil {
		t.Fatal(err)
	}
	pairs := [][2]string{{"cat", "cat"}, {"cat", "dog"}, {"dog", "dog"}, {"fox", "fox"}, {"fox", "cat"}}
	for _, p := range pairs {
		if err := tb.Add(p[0], p[1]); err != nil {
			t.Fatal(err)
		}
	}
	if err := tb.Add("cat", "unsure"); err == nil {
		t.Error("Add accepted a label outside the classes")
	}
	want := [][]int{{1, 1, 0}, {0, 1, 0}, {1, 0, 1}}
	for i := range want {
		for j := range want[i] {
			if tb.Counts[i][j] != want[i][j] {
				t.Errorf("Counts[%d][%d] = %d, want %d", i, j, tb.Counts[i][j], want[i][j])
			}
		}
	}
	if tb.N() != 5 || tb.Agreed() != 3 {
		t.Errorf("N, Agreed = %d, %d, want 5, 3", tb.N(), tb.Agreed())
	}
	// 3 of 5 on the diagonal: exact arithmetic, no source needed.
	if got := tb.ObservedAgreement(); got != 0.6 {
		t.Errorf("ObservedAgreement = %v, want 0.6", got)
	}
}

func TestTableFromCountsValidates(t *testing.T) {
	cl := []string{"a", "b"}
	bad := [][][]int{
		{{1, 2}},
		{{1, 2}, {3}},
		{{1, -1}, {0, 0}},
	}
	for _, c := range bad {
		if _, err := TableFromCounts(cl, c); err == nil {
			t.Errorf("TableFromCounts(%v) accepted a bad matrix", c)
		}
	}
	src := [][]int{{1, 2}, {3, 4}}
	tb, err := TableFromCounts(cl, src)
	if err != nil {
		t.Fatal(err)
	}
	src[0][0] = 99
	if tb.Counts[0][0] != 1 {
		t.Error("TableFromCounts did not copy its input")
	}
}
