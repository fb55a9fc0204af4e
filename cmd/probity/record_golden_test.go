package main

import (
	"os"
	"path/filepath"
	"testing"

	"probity/plan/record"
	"probity/plan/record/verification"
	"probity/plan/testkit/golden"
)

// TestRecordGolden locks record.json's layout and numbers for the fixture
// (two candidates, three strata, proportional allocation, fixed --date):
// a change to the canonical form or to any judged number shows up here.
// Run `go test ./cmd/probity -run TestRecordGolden -update` after a
// deliberate change and review the diff.
func TestRecordGolden(t *testing.T) {
	t.Parallel()
	fx := newRecFixture(t, true, 0)
	labels := fx.labels(t, "labels.csv", nil)
	out := filepath.Join(fx.dir, "rec")
	if code, stdout, stderr := runProbity(t, "record", "--plan", fx.planPath, "--draw", fx.draw, "--labels", labels, "--out", out, "--date", "2026-12-01"); code != exitRejected {
		t.Fatalf("exit %d\n%s%s", code, stdout, stderr)
	}
	got := mustRead(t, filepath.Join(out, "record.json"))
	path := filepath.Join("..", "..", "testdata", "record", "sorter-record.json")
	if !golden.Compare(t, path, got) {
		want, _ := os.ReadFile(path)
		r := readRecord(t, out)
		w, _ := decodeRecordBytes(want)
		diffs, _ := verification.Diff(w, r)
		t.Errorf("the fields that differ: %v", diffs)
	}
}

func decodeRecordBytes(data []byte) (*record.Record, error) { return record.Decode(data) }
