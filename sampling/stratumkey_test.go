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
