package intake

import (
	"fmt"
	"os"
	"path/filepath"
	"sort"
	"testing"

	"probity/plan"
	"probity/sampling"
	"probity/sampling/drawfolder"
	"probity/sampling/safewrite"
)

// drawFixture is a small draw folder made in code: a plan with two label
// candidates (m1 predicts column pred_a, m2 pred_b), classes ok/defect, two
// strata of the log with 2 spares each. Items are in key order with the
// spares after the sample.
type drawFixture struct {
	dir    string
	plan   *plan.File
	planFP string
	folder *drawfolder.Content
}

func newDrawFixture(t *testing.T) *drawFixture {
	t.Helper()
	p := &plan.File{
		Format: plan.FileFormat, Seed: "00112233445566778899aabbccddeeff",
		Inputs:     plan.Inputs{Ceiling: 0.1, Confidence: 0.9, CandidateCount: 2, Method: plan.MethodExact, Multiplicity: plan.Bonferroni, Design: plan.DesignFixed, Require: plan.RequireAll},
		Rule:       plan.Rule{Model: plan.ModelBinomial, SampleSize: 29, AcceptanceNumber: 0, PerCandidateRisk: 0.05},
		Classes:    []string{"ok", "defect"},
		Candidates: []plan.Candidate{{Name: "m1", Column: "pred_a"}, {Name: "m2", Column: "pred_b"}},
	}
	data, err := p.Marshal()
	if err != nil {
		t.Fatal(err)
	}
	fx := &drawFixture{dir: t.TempDir(), plan: p, planFP: plan.Fingerprint(data)}
	type row struct {
		id, key, stratum string
	}
	strata := []drawfolder.StratumInfo{{Label: "a", Population: 600, Sample: 17, Spare: 2}, {Label: "b", Population: 400, Sample: 12, Spare: 2}}
	var main, spares []drawfolder.LedgerRow
	for _, s := range strata {
		var rows []row
		for i := 0; i < int(s.Population); i++ {
			id := fmt.Sprintf("%s%04d", s.Label, i)
			rows = append(rows, row{id, sampling.Key(p.Seed, id), s.Label})
		}
		sort.Slice(rows, func(i, j int) bool { return rows[i].key < rows[j].key })
		for k, r := range rows[:s.Sample+s.Spare] {
			lr := drawfolder.LedgerRow{RecordID: r.id, Stratum: s.Label, StratumSize: s.Population, StratumSample: s.Sample,
				Weight: float64(s.Population) / float64(s.Sample), Key: r.key, Spare: k >= s.Sample, Predictions: []string{"ok", "ok"}}
			if lr.Spare {
				spares = append(spares, lr)
			} else {
				main = append(main, lr)
			}
		}
	}
	sort.Slice(main, func(i, j int) bool { return main[i].Key < main[j].Key })
	sort.Slice(spares, func(i, j int) bool { return spares[i].Key < spares[j].Key })
	ledger := append(main, spares...)
	var ws []drawfolder.WorksheetRow
	for i := range ledger {
		ledger[i].Item = i + 1
		ws = append(ws, drawfolder.WorksheetRow{Item: i + 1, RecordID: ledger[i].RecordID, Show: []string{"text " + ledger[i].RecordID}})
	}
	fx.folder = &drawfolder.Content{
		Manifest: &drawfolder.Manifest{Format: drawfolder.ManifestFormat, ToolVersion: "test", PlanFingerprint: fx.planFP, Seed: p.Seed, SelectionSeed: p.Seed,
			Log:      drawfolder.LogInfo{Path: "log.csv", SHA256: "ab" + fmt.Sprintf("%062d", 0), Rows: 1000, Format: "csv", Compression: "none"},
			IDColumn: "record_id", StrataColumns: []string{"region"}, ShowColumns: []string{"text"},
			Allocation: drawfolder.AllocationInfo{Rule: "proportional", Spare: 2}, Strata: strata, SampleSize: 29, Spares: 4},
		Candidates: []string{"m1", "m2"}, Show: []string{"text"}, Ledger: ledger, Worksheet: ws,
	}
	if err := drawfolder.Write(filepath.Join(fx.dir, "draw"), fx.folder, safewrite.FolderOptions{}); err != nil {
		t.Fatal(err)
	}
	return fx
}

func (fx *drawFixture) drawDir() string { return filepath.Join(fx.dir, "draw") }

// labeled returns worksheet rows with every sample item labeled "ok" and
// the spares blank; edit them and pass them to writeLabels.
func (fx *drawFixture) labeled() []drawfolder.WorksheetRow {
	out := make([]drawfolder.WorksheetRow, len(fx.folder.Worksheet))
	copy(out, fx.folder.Worksheet)
	for i := range out {
		if !fx.folder.Ledger[i].Spare {
			out[i].Label = "ok"
		}
	}
	return out
}

func (fx *drawFixture) writeLabels(t *testing.T, rows []drawfolder.WorksheetRow) string {
	t.Helper()
	path := filepath.Join(fx.dir, "labels.csv")
	f, err := os.Create(path)
	if err != nil {
		t.Fatal(err)
	}
	if err := drawfolder.WriteWorksheet(f, []string{"text"}, rows); err != nil {
		t.Fatal(err)
	}
	if err := f.Close(); err != nil {
		t.Fatal(err)
	}
	return path
}

// check runs ReadFolder, ReadLabels and Check.
func (fx *drawFixture) check(t *testing.T, rows []drawfolder.WorksheetRow, opts Options) (*Result, error) {
	t.Helper()
	path := fx.writeLabels(t, rows)
	f, err := drawfolder.Open(fx.drawDir(), fx.planFP, []string{"m1", "m2"})
	if err != nil {
		return nil, err
	}
	l, err := drawfolder.ReadLabels(path)
	if err != nil {
		return nil, err
	}
	return Check(fx.plan, fx.planFP, f, l, opts)
}

// spareIndex returns the worksheet index of stratum s's k-th spare.
func (fx *drawFixture) spareIndex(s string, k int) int {
	for i, r := range fx.folder.Ledger {
		if r.Spare && r.Stratum == s {
			if k == 0 {
				return i
			}
			k--
		}
	}
	panic("no such spare")
}

// mainIndex returns the worksheet index of stratum s's k-th sample item.
func (fx *drawFixture) mainIndex(s string, k int) int {
	for i, r := range fx.folder.Ledger {
		if !r.Spare && r.Stratum == s {
			if k == 0 {
				return i
			}
			k--
		}
	}
	panic("no such item")
}
