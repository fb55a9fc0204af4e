package main

import (
	"path/filepath"
	"slices"
	"strings"
	"testing"

	"probity/sampling/drawfolder"
)

// TestUnsureReadsTheSameInProgressAndRecord: a worksheet whose unsure items
// say "Unsure" and " UNSURE " is read exactly as one that says "unsure",
// by progress and by record alike (the draw folder's one label rule,
// drawfolder.ParseLabel): progress assesses it with the same result, and
// record judges it with the same unsure items replaced by the same spares.
// A class in the wrong case is refused by both.
func TestUnsureReadsTheSameInProgressAndRecord(t *testing.T) {
	t.Parallel()
	fx := newRecFixture(t, true, 0)
	// The first two sample items are marked unsure, and the first spare of
	// each one's stratum is labeled in its place.
	var marked, spares []int
	used := map[string]bool{}
	for i, r := range fx.ledger {
		if !r.Spare && len(marked) < 2 {
			marked = append(marked, i)
		}
	}
	for _, m := range marked {
		for i, r := range fx.ledger {
			if r.Spare && r.Stratum == fx.ledger[m].Stratum && !used[r.RecordID] {
				used[r.RecordID] = true
				spares = append(spares, i)
				break
			}
		}
	}
	labeled := func(name string, spelling [2]string) string {
		return fx.labels(t, name, func(rows []drawfolder.WorksheetRow) []drawfolder.WorksheetRow {
			for k, i := range marked {
				rows[i].Label = spelling[k]
			}
			for _, i := range spares {
				rows[i].Label = fx.truth[rows[i].RecordID]
			}
			return rows
		})
	}
	type outcome struct {
		progressCode, recordCode int
		progress                 string
		unsure, sparesUsed       []string
	}
	run := func(name string, spelling [2]string) outcome {
		labels := labeled(name+".csv", spelling)
		var o outcome
		var stderr string
		o.progressCode, o.progress, stderr = runProbity(t, "progress", "--plan", fx.planPath, "--draw", fx.draw, "--labels", labels, "--json")
		if o.progressCode != exitOK {
			t.Fatalf("%s: progress exit %d: %s", name, o.progressCode, stderr)
		}
		o.progress = strings.ReplaceAll(o.progress, labels, "LABELS")
		out := filepath.Join(fx.dir, "rec-"+name)
		o.recordCode, _, stderr = runProbity(t, "record", "--plan", fx.planPath, "--draw", fx.draw, "--labels", labels, "--out", out, "--date", "2026-12-01")
		if o.recordCode != exitOK && o.recordCode != exitRejected {
			t.Fatalf("%s: record exit %d: %s", name, o.recordCode, stderr)
		}
		rec := readRecord(t, out)
		o.unsure, o.sparesUsed = rec.Deviations.Unsure, rec.Deviations.SparesUsed
		return o
	}
	lower := run("lower", [2]string{"unsure", "unsure"})
	mixed := run("mixed", [2]string{"Unsure", " UNSURE "})
	if lower.progress != mixed.progress {
		t.Errorf("progress reads Unsure differently:\n--- unsure\n%s\n--- Unsure\n%s", lower.progress, mixed.progress)
	}
	if !strings.Contains(mixed.progress, "2 unsure items replaced by their spares, by the draw's rule, as the record does") {
		t.Errorf("progress does not replace the two unsure items by their spares as the record does:\n%s", mixed.progress)
	}
	if lower.recordCode != mixed.recordCode || !slices.Equal(lower.unsure, mixed.unsure) || !slices.Equal(lower.sparesUsed, mixed.sparesUsed) {
		t.Errorf("record reads Unsure differently: exit %d vs %d, unsure %v vs %v, spares %v vs %v",
			lower.recordCode, mixed.recordCode, lower.unsure, mixed.unsure, lower.sparesUsed, mixed.sparesUsed)
	}
	if len(mixed.unsure) != 2 || len(mixed.sparesUsed) != 2 {
		t.Errorf("record: unsure %v, spares used %v; want two of each", mixed.unsure, mixed.sparesUsed)
	}

	// A class in another case is no class, for both commands.
	wrongCase := fx.labels(t, "case.csv", func(rows []drawfolder.WorksheetRow) []drawfolder.WorksheetRow {
		rows[marked[0]].Label = strings.ToUpper(rows[marked[0]].Label)
		return rows
	})
	want := `label "` + strings.ToUpper(fx.truth[fx.ledger[marked[0]].RecordID]) + `" (item 1) is not one of the plan's classes (ok, defect), blank or "unsure"`
	for _, args := range [][]string{
		{"progress", "--plan", fx.planPath, "--draw", fx.draw, "--labels", wrongCase},
		{"record", "--plan", fx.planPath, "--draw", fx.draw, "--labels", wrongCase, "--out", filepath.Join(fx.dir, "rec-case")},
	} {
		code, _, stderr := runProbity(t, args...)
		if code != exitBadInput || !strings.Contains(stderr, want) {
			t.Errorf("%s on a class in capitals: exit %d: %s", args[0], code, stderr)
		}
	}
}
