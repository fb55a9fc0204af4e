package main

import (
	"bytes"
	"encoding/csv"
	"fmt"
	"os"
	"path/filepath"
	"testing"
	"time"

	"probity/plan"
	"probity/plan/chrono"
	"probity/plan/sequential"
	"probity/sampling"
	"probity/sampling/drawfolder"
	"probity/sampling/safewrite"
)

// recFixture is an invented audit, made in code with the same package
// functions `probity plan` and `probity draw` run: a prediction log of
// 1500 decisions of a parcel sorter in three depots (north 900, south 450,
// east 150), each with the true destination ("ok" or "defect") and the
// predictions of up to two candidates. "sorter-a" is never wrong; "sorter-b"
// is wrong on every third decision.
type recFixture struct {
	dir, planPath, logPath, draw string
	file                         *plan.File
	truth                        map[string]string
	ledger                       []drawfolder.LedgerRow
	worksheet                    []drawfolder.WorksheetRow
	// second is the draw's worksheet-second.csv (nil without doubled
	// items).
	second []drawfolder.WorksheetRow
	show   []string
}

// newRecFixture plans (ceiling 0.05, confidence 0.95, anticipated 0.01,
// producer's risk 0.2, proportional allocation with 2 spares per stratum)
// and draws. With both, the plan declares sorter-a and sorter-b; else only
// sorter-a. minPer > 0 draws with --min-per-stratum (unequal weights).
func newRecFixture(t *testing.T, both bool, minPer int) *recFixture {
	t.Helper()
	return buildRecFixture(t, both, minPer, false)
}

// buildRecFixture is newRecFixture; with seq the plan is sequential
// (sequential.Apply on the same inputs) and the draw has one stratum.
func buildRecFixture(t *testing.T, both bool, minPer int, seq bool) *recFixture {
	t.Helper()
	fx := &recFixture{dir: t.TempDir(), truth: map[string]string{}, show: []string{"parcel"}}
	p0 := 0.01
	in := plan.Inputs{Ceiling: 0.05, Confidence: 0.95, CandidateCount: 1, Anticipated: &p0, ProducerRisk: 0.2,
		Method: plan.MethodExact, Multiplicity: plan.Bonferroni, Design: plan.DesignFixed, Require: plan.RequireAll}
	cands := []plan.Candidate{{Name: "sorter-a", Column: "pred_a"}}
	if both {
		in.CandidateCount = 2
		cands = append(cands, plan.Candidate{Name: "sorter-b", Column: "pred_b"})
	}
	f, err := plan.Build(in, plan.Meta{ToolVersion: "test", Created: time.Date(2026, 11, 30, 9, 0, 0, 0, time.UTC), CreatedFrom: chrono.SourceClock,
		Seed: "0f1e2d3c4b5a69788796a5b4c3d2e1f0", System: "Parcel sorter", SystemVersion: "2.4",
		Classes: []string{"ok", "defect"}, Candidates: cands})
	if err != nil {
		t.Fatal(err)
	}
	if seq {
		if _, err := sequential.Apply(f, 0); err != nil {
			t.Fatal(err)
		}
	}
	fx.file = f
	data, err := f.Marshal()
	if err != nil {
		t.Fatal(err)
	}
	fx.planPath = filepath.Join(fx.dir, "plan.yaml")
	writeFile(t, fx.planPath, data)

	var buf bytes.Buffer
	w := csv.NewWriter(&buf)
	w.Write([]string{"record_id", "depot", "parcel", "pred_a", "pred_b"})
	i := 0
	for _, depot := range []struct {
		name string
		n    int
	}{{"north", 900}, {"south", 450}, {"east", 150}} {
		for k := 0; k < depot.n; k++ {
			i++
			id := fmt.Sprintf("p%05d", i)
			truth := "ok"
			if i%17 == 0 {
				truth = "defect"
			}
			b := truth
			if i%3 == 0 {
				b = map[string]string{"ok": "defect", "defect": "ok"}[truth]
			}
			fx.truth[id] = truth
			w.Write([]string{id, depot.name, fmt.Sprintf("parcel %d, %d g", i, 100+i%900), truth, b})
		}
	}
	w.Flush()
	fx.logPath = filepath.Join(fx.dir, "log.csv")
	writeFile(t, fx.logPath, buf.Bytes())

	log, err := os.Open(fx.logPath)
	if err != nil {
		t.Fatal(err)
	}
	defer log.Close()
	strata := []string{"depot"}
	if seq {
		strata = nil // a sequential plan needs one stratum
	}
	folder, err := sampling.Draw(sampling.DrawInput{Plan: f, PlanFingerprint: plan.Fingerprint(data), LogPath: "log.csv", Log: log,
		Format: "csv", IDColumn: "record_id", StrataColumns: strata, Show: fx.show,
		Alloc: sampling.AllocOptions{Rule: sampling.Proportional, Spare: 2, MinPerStratum: minPer, Rounding: sampling.RoundUp}, ToolVersion: "test"})
	if err != nil {
		t.Fatal(err)
	}
	drawn := chrono.FromClock(time.Date(2026, 11, 30, 15, 0, 0, 0, time.UTC))
	folder.Manifest.Drawn = &drawn
	fx.draw = filepath.Join(fx.dir, "draw")
	if err := drawfolder.Write(fx.draw, folder, safewrite.FolderOptions{}); err != nil {
		t.Fatal(err)
	}
	fx.ledger, fx.worksheet = folder.Ledger, folder.Worksheet
	return fx
}

// labels writes a labeled copy of the worksheet (every sample item with
// its true label, the spares blank), passed through edit, and returns its
// path.
func (fx *recFixture) labels(t *testing.T, name string, edit func(rows []drawfolder.WorksheetRow) []drawfolder.WorksheetRow) string {
	t.Helper()
	rows := make([]drawfolder.WorksheetRow, len(fx.worksheet))
	copy(rows, fx.worksheet)
	for i := range rows {
		if !fx.ledger[i].Spare {
			rows[i].Label = fx.truth[rows[i].RecordID]
		}
	}
	if edit != nil {
		rows = edit(rows)
	}
	var buf bytes.Buffer
	if err := drawfolder.WriteWorksheet(&buf, fx.show, rows); err != nil {
		t.Fatal(err)
	}
	path := filepath.Join(fx.dir, name)
	writeFile(t, path, buf.Bytes())
	return path
}

func writeFile(t *testing.T, path string, data []byte) {
	t.Helper()
	if err := os.WriteFile(path, data, 0o644); err != nil {
		t.Fatal(err)
	}
}

// runProbity runs the command line through run() with fresh test deps
// (newTestDeps: a fixed clock, 2026-12-01, and a fixed random stream).
func runProbity(t *testing.T, args ...string) (int, string, string) {
	t.Helper()
	return runTest(t, args)
}

// listDir returns the names in dir, or nil when it does not exist.
func listDir(t *testing.T, dir string) []string {
	t.Helper()
	entries, err := os.ReadDir(dir)
	if err != nil {
		return nil
	}
	var names []string
	for _, e := range entries {
		names = append(names, e.Name())
	}
	return names
}
