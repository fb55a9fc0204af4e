package loggen

import (
	"bytes"
	"sort"
	"strings"
	"testing"
)

func gen(t *testing.T, c Config) string {
	t.Helper()
	var b bytes.Buffer
	if err := Write(&b, c); err != nil {
		t.Fatal(err)
	}
	return b.String()
}

func TestDeterministicAndShuffled(t *testing.T) {
	a := gen(t, Config{Rows: 500, Seed: 3})
	if a != gen(t, Config{Rows: 500, Seed: 3}) {
		t.Fatal("same config, different bytes")
	}
	if a == gen(t, Config{Rows: 500, Seed: 4}) {
		t.Fatal("different seeds, same bytes")
	}
	lines := strings.Split(strings.TrimSuffix(a, "\n"), "\n")
	if lines[0] != strings.Join(Columns, ",") || len(lines) != 501 {
		t.Fatalf("header %q, %d lines", lines[0], len(lines))
	}
	sh := strings.Split(strings.TrimSuffix(gen(t, Config{Rows: 500, Seed: 3, Shuffle: true}), "\n"), "\n")
	if strings.Join(sh, "\n") == strings.Join(lines, "\n") {
		t.Fatal("shuffle kept the order")
	}
	sort.Strings(lines[1:])
	sort.Strings(sh[1:])
	if strings.Join(sh, "\n") != strings.Join(lines, "\n") {
		t.Fatal("shuffled log holds different rows")
	}
	for _, l := range lines[1:] {
		if strings.Count(l, ",") != len(Columns)-1 {
			t.Fatalf("row %q", l)
		}
	}
}
