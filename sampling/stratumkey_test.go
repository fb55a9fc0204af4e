package sampling

import (
	"bytes"
	"fmt"
	"strings"
	"testing"
)

func TestInternAndPackedTables(t *testing.T) {
	var it internTable
	for round := 0; round < 2; round++ {
		for i := 0; i < 1000; i++ {
			id, ok := it.find([]byte(fmt.Sprintf("v%d", i)))
			if !ok || id != int32(i) {
				t.Fatalf("round %d: value %d got id %d ok %v", round, i, id, ok)
			}
		}
	}
	var pt packedTable
	sts := make([]*wstratum, 500)
	for i := range sts {
		sts[i] = &wstratum{label: fmt.Sprint(i)}
		pt.insert(uint64(i+1)<<16|7, sts[i])
	}
	for i := range sts {
		if pt.find(uint64(i+1)<<16|7) != sts[i] {
			t.Fatalf("packed key %d lost", i)
		}
	}
	if pt.find(12345<<16|8) != nil {
		t.Fatal("found a key never inserted")
	}
}

// Five strata columns exceed the packed key: the label path must give the
// same strata as the packed path gives for the same partition.
func TestManyStrataColumnsUseLabels(t *testing.T) {
	var b strings.Builder
	b.WriteString("record_id,a,b,c,d,e,model_a,score\n")
	for i := 0; i < 400; i++ {
		fmt.Fprintf(&b, "r%d,%d,%d,x,y,z,ok,0.2\n", i, i%2, i%3)
	}
	log := []byte(b.String())
	five, err := Draw(DrawInput{Plan: testPlan("k", 60), LogPath: "l.csv", Log: bytes.NewReader(log), StrataColumns: []string{"a", "b", "c", "d", "e"}})
	if err != nil {
		t.Fatal(err)
	}
	two, err := Draw(DrawInput{Plan: testPlan("k", 60), LogPath: "l.csv", Log: bytes.NewReader(log), StrataColumns: []string{"a", "b"}})
	if err != nil {
		t.Fatal(err)
	}
	if len(five.Manifest.Strata) != 6 || len(two.Manifest.Strata) != 6 {
		t.Fatalf("strata: %d and %d, want 6", len(five.Manifest.Strata), len(two.Manifest.Strata))
	}
	for i := range five.Ledger {
		if five.Ledger[i].RecordID != two.Ledger[i].RecordID || five.Ledger[i].Stratum != two.Ledger[i].Stratum+"|x|y|z" {
			t.Fatalf("row %d: %+v vs %+v", i, five.Ledger[i], two.Ledger[i])
		}
	}
}

// TestInternLookupShortValues checks the short-value cache: values of 1 to
// 8 bytes that differ only past a shorter value's end, or only in a late
// byte, keep distinct numbers, whether or not 8 bytes can be loaded from
// their array, and lookup agrees with find (common practice, no source).
func TestInternLookupShortValues(t *testing.T) {
	var tab internTable
	vals := []string{"a", "ab", "abc", "abcdefg", "abcdefh", "abcdefgh", "b", "ba", "web", "app", "call", "wed", "\x00", "\x00\x00"}
	want := map[string]int32{}
	for round := 0; round < 3; round++ {
		for _, v := range vals {
			// The value inside a longer array (8-byte loads possible)
			// and alone (not possible), with different bytes after it.
			in := append([]byte(v), []byte("zzzzzzzz")[:round+1]...)[:len(v)]
			alone := []byte(v)[:len(v):len(v)]
			for _, b := range [][]byte{in, alone} {
				id, ok := tab.lookup(b)
				if !ok {
					t.Fatalf("lookup(%q) refused", v)
				}
				if w, seen := want[v]; seen && w != id {
					t.Fatalf("lookup(%q) = %d, earlier %d", v, id, w)
				}
				want[v] = id
				if fid, _ := tab.find(b); fid != id {
					t.Fatalf("find(%q) = %d, lookup %d", v, fid, id)
				}
			}
		}
	}
	seen := map[int32]string{}
	for v, id := range want {
		if o, dup := seen[id]; dup {
			t.Fatalf("%q and %q share number %d", v, o, id)
		}
		seen[id] = v
	}
}
