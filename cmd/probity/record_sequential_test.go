package main

import (
	"path/filepath"
	"strings"
	"testing"

	"probity/plan"
	"probity/plan/record"
	"probity/plan/sequential"
	"probity/sampling/drawfolder"
)

// TestRecordSequentialPlan: each candidate is judged where the plan's
// boundaries decide on the worksheet labeled from the top; the verdict and
// stopping point agree with sequential.Judge run here on the same items.
func TestRecordSequentialPlan(t *testing.T) {
	t.Parallel()
	fx := buildRecFixture(t, true, 0, true)
	// Decide where each candidate stops, independently of record.
	var errsA, errsB []bool
	for i, lr := range fx.ledger {
		if lr.Spare {
			continue
		}
		truth := fx.truth[fx.worksheet[i].RecordID]
		errsA = append(errsA, lr.Predictions[0] != truth)
		errsB = append(errsB, lr.Predictions[1] != truth)
	}
	dA, atA, err := sequential.Judge(fx.file.Sequential, errsA)
	if err != nil {
		t.Fatal(err)
	}
	dB, atB, _ := sequential.Judge(fx.file.Sequential, errsB)
	if dA != sequential.Accept || dB != sequential.Reject {
		t.Fatalf("fixture: sorter-a %s at %d, sorter-b %s at %d", dA, atA, dB, atB)
	}
	last := max(atA, atB)
	// Label from the top down to where both have decided; leave the rest blank.
	labels := fx.labels(t, "top.csv", func(r []drawfolder.WorksheetRow) []drawfolder.WorksheetRow {
		for i := last; i < len(r); i++ {
			r[i].Label = ""
		}
		return r
	})
	out := filepath.Join(fx.dir, "rec")
	key := filepath.Join(fx.dir, "key")
	runProbity(t, "keygen", "--out", key)
	code, stdout, stderr := runProbity(t, "record", "--plan", fx.planPath, "--draw", fx.draw, "--labels", labels, "--out", out, "--date", "2026-12-01", "--sign-key", key)
	if code != exitRejected {
		t.Fatalf("exit %d\n%s%s", code, stdout, stderr)
	}
	r := readRecord(t, out)
	a, b := r.Candidates[0], r.Candidates[1]
	if a.Verdict != record.Accept || a.StoppedAt != atA || b.Verdict != record.Reject || b.StoppedAt != atB || b.Labeled != atB {
		t.Errorf("sorter-a %s at %d (want %d), sorter-b %s at %d (want %d)", a.Verdict, a.StoppedAt, atA, b.Verdict, b.StoppedAt, atB)
	}
	if r.Method.Bound != plan.BoundSequential || r.Method.Approximate || len(r.OC) == 0 {
		t.Errorf("method %+v, %d OC points", r.Method, len(r.OC))
	}
	// The bound and p-value are the stage-wise exact ones of the plan's
	// boundaries, recomputed here from the stopping points.
	for i, c := range []record.Candidate{a, b} {
		d := []sequential.Decision{dA, dB}[i]
		errs := [][]bool{errsA, errsB}[i]
		o := sequential.Outcome{T: c.StoppedAt, D: d}
		for _, e := range errs[:c.StoppedAt] {
			if e {
				o.E++
			}
		}
		ub, err := sequential.UpperBound(fx.file.Sequential, o, c.BoundConfidence)
		if err != nil {
			t.Fatal(err)
		}
		pv, _ := sequential.PValue(fx.file.Sequential, o, fx.file.Inputs.Ceiling)
		if !approxEqual(c.UpperBound, ub, 1e-12) || !approxEqual(c.PValue, pv, 1e-12) {
			t.Errorf("%s: bound %v p %v, want stage-wise %v and %v", c.Name, c.UpperBound, c.PValue, ub, pv)
		}
		if c.Verdict == record.Accept && !(c.UpperBound < fx.file.Inputs.Ceiling) {
			t.Errorf("%s accepted with a stage-wise bound %v not below the ceiling", c.Name, c.UpperBound)
		}
	}
	// verify recomputes the same record.
	if code, stdout, _ := runProbity(t, "verify", out, "--pub", key+".pub", "--plan", fx.planPath, "--draw", fx.draw, "--labels", labels); code != exitOK {
		t.Errorf("verify: exit %d\n%s", code, stdout)
	}

	// Too few labels: sorter-a has not decided yet.
	short := fx.labels(t, "short.csv", func(r []drawfolder.WorksheetRow) []drawfolder.WorksheetRow {
		for i := atA - 1; i < len(r); i++ {
			r[i].Label = ""
		}
		return r
	})
	code, _, stderr = runProbity(t, "record", "--plan", fx.planPath, "--draw", fx.draw, "--labels", short, "--out", filepath.Join(fx.dir, "r2"))
	if code != exitBadInput || !strings.Contains(stderr, "candidate sorter-a has 0 errors in the") || !strings.Contains(stderr, "probity progress") {
		t.Errorf("undecided: exit %d: %s", code, stderr)
	}
	// A gap in the labels.
	gap := fx.labels(t, "gap.csv", func(r []drawfolder.WorksheetRow) []drawfolder.WorksheetRow { r[1].Label = ""; return r })
	code, _, stderr = runProbity(t, "record", "--plan", fx.planPath, "--draw", fx.draw, "--labels", gap, "--out", filepath.Join(fx.dir, "r3"))
	if code != exitBadInput || !strings.Contains(stderr, "item 3 is labeled after the unlabeled item 2") {
		t.Errorf("gap: exit %d: %s", code, stderr)
	}
}

// approxEqual reports |a − b| ≤ tol·max(|a|, |b|, 1e-300); record.json keeps
// 15 significant digits.
func approxEqual(a, b, tol float64) bool {
	d := a - b
	if d < 0 {
		d = -d
	}
	m := max(a, b, -a, -b, 1e-300)
	return d <= tol*m
}
