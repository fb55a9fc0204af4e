package main

import (
	"flag"
	"os"
	"path/filepath"
	"testing"

	"probity/plan/record"
	"probity/plan/record/verification"
)

var updateRecordGolden = flag.Bool("update-record", false, "rewrite testdata/record/sorter-record.json")

// TestRecordGolden locks record.json's layout and numbers for the fixture
// (two candidates, three strata, proportional allocation, fixed --date):
// a change to the canonical form or to any judged number shows up here.
// Run `go test ./cmd/probity -run TestRecordGolden -update-record` after a
// deliberate change and review the diff.
func TestRecordGolden(t *testing.T) {
	fx := newRecFixture(t, true, 0)
	labels := fx.labels(t, "labels.csv", nil)
	out := filepath.Join(fx.dir, "rec")
	if code, stdout, stderr := runProbity(t, "record", "--plan", fx.planPath, "--draw", fx.draw, "--labels", labels, "--out", out, "--date", "2026-12-01"); code != exitRejected {
		t.Fatalf("exit %d\n%s%s", code, stdout, stderr)
	}
	got := mustRead(t, filepath.Join(out, "record.json"))
	golden := filepath.Join("..", "..", "testdata", "record", "sorter-record.json")
	if *updateRecordGolden {
		if err := os.WriteFile(golden, got, 0o644); err != nil {
			t.Fatal(err)
		}
	}
	want, err := os.ReadFile(golden)
	if err != nil {
		t.Fatalf("%v (run with -update-record to create it)", err)
	}
	if string(got) != string(want) {
		r := readRecord(t, out)
		w, _ := decodeRecordBytes(want)
		diffs, _ := verification.Diff(w, r)
		t.Errorf("record.json differs from %s: %v", golden, diffs)
	}
}

func decodeRecordBytes(data []byte) (*record.Record, error) { return record.Decode(data) }
