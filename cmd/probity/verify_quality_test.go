package main

import (
	"path/filepath"
	"probity/sampling/drawfolder"
	"strings"
	"testing"
)

// TestVerifyRecomputesDoubleLabeledRecord: verify recomputes a record judged
// on adjudicated double labels when given the second worksheet and the
// adjudication file; an edited adjudication (another final label) is
// caught by its fingerprint and by the recomputed judgement; without
// --second the recomputation is skipped and said so; and two records made
// from different adjudications get different record ids.
func TestVerifyRecomputesDoubleLabeledRecord(t *testing.T) {
	t.Parallel()
	fx := newLQFixture(t)
	truth := fx.truth[fx.ledger[0].RecordID]
	first := fx.write(t, "labeled.csv", fx.worksheet, "ana", nil)
	second := fx.write(t, "labeled-second.csv", fx.second, "bea", func(rows []drawfolder.WorksheetRow) {
		rows[0].Label = other(truth)
	})
	adjTruth := fx.adjudication(t, "adj-truth.csv", [2]string{"1", truth})
	adjOther := fx.adjudication(t, "adj-other.csv", [2]string{"1", other(truth)})
	recA, recB := filepath.Join(fx.dir, "rec-a"), filepath.Join(fx.dir, "rec-b")
	key := filepath.Join(fx.dir, "key")
	if code, _, stderr := lqRun(t, "keygen", "--out", key); code != exitOK {
		t.Fatal(stderr)
	}
	base := []string{"record", "--plan", fx.planPath, "--draw", fx.draw, "--labels", first, "--second", second, "--date", "2026-12-01", "--sign-key", key}
	if code, _, stderr := lqRun(t, append(base, "--out", recA, "--adjudicated", adjTruth)...); code != exitOK {
		t.Fatalf("record: exit %d: %s", code, stderr)
	}
	if code, _, stderr := lqRun(t, append(base, "--out", recB, "--adjudicated", adjOther)...); code != exitRejected {
		t.Fatalf("record B: exit %d: %s", code, stderr)
	}
	if a, b := lqRecord(t, recA).RecordID, lqRecord(t, recB).RecordID; a == b {
		t.Errorf("records from different adjudications share the id %s", a)
	}

	inputs := []string{"--pub", key + ".pub", "--plan", fx.planPath, "--draw", fx.draw, "--labels", first}
	code, stdout, stderr := lqRun(t, append(append([]string{"verify", recA}, inputs...), "--second", second, "--adjudicated", adjTruth)...)
	if code != exitOK || !strings.Contains(stdout, "judgement recomputed from the inputs: every field of record.json agrees") ||
		!strings.Contains(stdout, "matches the record's second-worksheet fingerprint") ||
		!strings.Contains(stdout, "matches the record's adjudications fingerprint") {
		t.Errorf("verify with --second --adjudicated: exit %d\n%s%s", code, stdout, stderr)
	}

	code, stdout, _ = lqRun(t, append(append([]string{"verify", recA}, inputs...), "--second", second, "--adjudicated", adjOther)...)
	if code != exitRejected || !strings.Contains(stdout, "is not the record's adjudications fingerprint") ||
		!strings.Contains(stdout, "candidates[0].errors") {
		t.Errorf("verify with another adjudication: exit %d\n%s", code, stdout)
	}

	code, stdout, _ = lqRun(t, append([]string{"verify", recA}, inputs...)...)
	if code != exitOK || !strings.Contains(stdout, "pass --second (and --adjudicated) as well") {
		t.Errorf("verify without --second: exit %d\n%s", code, stdout)
	}
	code, stdout, _ = lqRun(t, append(append([]string{"verify", recA}, inputs...), "--second", second)...)
	if code != exitRejected || !strings.Contains(stdout, "pass it with --adjudicated") {
		t.Errorf("verify without the adjudication file: exit %d\n%s", code, stdout)
	}
}
