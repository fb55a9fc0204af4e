package assemble_test

import (
	"bytes"
	"fmt"
	"strings"
	"testing"
	"time"

	"probity/plan"
	"probity/plan/chrono"
	"probity/plan/record"
	"probity/plan/record/assemble"
	"probity/plan/record/intake"
	"probity/plan/sequential"
	"probity/plan/verdict"
	"probity/sampling"
	"probity/sampling/drawfolder"
)

// The whole audit, in memory: an invented prediction log whose hidden
// truth is known (a row is an error when the model predicted "bad"; every
// decision's true label is "ok"), drawn by the real draw with a fresh
// period each repetition (sampling.Draw), rendered and read back as the
// folder the draw would write (drawfolder.OpenContent), labeled with the
// truth, checked by the record's intake (intake.Check) and judged by the
// record's judgement (verdict.Judge) — what assemble.Assemble runs, without
// the OC curve and the sign-off it adds (checked to agree on one run per
// scenario, assembleAgrees).

// pipeline is one invented audit: a plan, a log and the draw's settings.
type pipeline struct {
	name   string
	plan   *plan.File
	fp     string
	log    []byte
	strata []string // --strata
	alloc  sampling.AllocOptions
}

// newPipeline builds the plan from inputs (sized for a simple random
// sample, sequential when seq) and the log of N[h] decisions per stratum,
// the first errs[h] of each stratum wrong.
func newPipeline(t testing.TB, name string, in plan.Inputs, seq bool, N, errs []int64, alloc sampling.AllocOptions) *pipeline {
	t.Helper()
	f, err := plan.Build(in, plan.Meta{ToolVersion: "test", Created: time.Date(2026, 1, 1, 0, 0, 0, 0, time.UTC), Seed: "5eed",
		Classes: []string{"ok", "bad"}, Candidates: []plan.Candidate{{Name: "model", Column: "pred"}}})
	if err != nil {
		t.Fatal(err)
	}
	if seq {
		if _, err := sequential.Apply(f, 0); err != nil {
			t.Fatal(err)
		}
	}
	data, err := f.Marshal()
	if err != nil {
		t.Fatal(err)
	}
	var b strings.Builder
	b.WriteString("record_id,stratum,pred\n")
	for h := range N {
		for i := int64(0); i < N[h]; i++ {
			pred := "ok"
			if i < errs[h] {
				pred = "bad"
			}
			fmt.Fprintf(&b, "s%03d-%06d,s%03d,%s\n", h, i, h, pred)
		}
	}
	p := &pipeline{name: name, plan: f, fp: plan.Fingerprint(data), log: []byte(b.String()), alloc: alloc}
	if len(N) > 1 {
		p.strata = []string{"stratum"}
	}
	return p
}

// draw draws the sample of one period (drawn, as the command stamps it,
// between the plan's creation and the record's issue).
func (p *pipeline) draw(period string) (*drawfolder.Content, error) {
	c, err := sampling.Draw(sampling.DrawInput{Plan: p.plan, PlanFingerprint: p.fp, LogPath: "log.csv", Log: bytes.NewReader(p.log),
		Format: sampling.FormatCSV, Period: period, IDColumn: "record_id", StrataColumns: p.strata, Alloc: p.alloc,
		ToolVersion: "test", Workers: 1, ChunkSize: 1 << 16})
	if err != nil {
		return nil, err
	}
	drawn := chrono.FromClock(time.Date(2026, 3, 1, 0, 0, 0, 0, time.UTC))
	c.Manifest.Drawn = &drawn
	return c, nil
}

// labeled is the worksheet labeled with the truth (every sample item "ok";
// spares blank), edited by edit when not nil, as read back from its bytes.
func labeled(t testing.TB, c *drawfolder.Content, edit func(rows []drawfolder.WorksheetRow)) *drawfolder.Labels {
	t.Helper()
	rows := append([]drawfolder.WorksheetRow(nil), c.Worksheet...)
	for i := range rows {
		if !c.Ledger[i].Spare {
			rows[i].Label = "ok"
		}
	}
	if edit != nil {
		edit(rows)
	}
	var buf bytes.Buffer
	if err := drawfolder.WriteWorksheet(&buf, c.Show, rows); err != nil {
		t.Fatal(err)
	}
	l, err := drawfolder.ParseLabels(buf.Bytes(), "labels.csv")
	if err != nil {
		t.Fatal(err)
	}
	return l
}

// judge runs the record's intake and judgement on a drawn, labeled period.
func (p *pipeline) judge(f *drawfolder.Folder, l *drawfolder.Labels, allowIncomplete bool) (*verdict.Result, error) {
	checked, err := intake.Check(p.plan, p.fp, f, l, intake.Options{AllowIncomplete: allowIncomplete, Prefix: p.plan.Sequential != nil})
	if err != nil {
		return nil, err
	}
	in := verdict.Input{Plan: p.plan, Design: checked.Design, Items: checked.Items, Rates: f.Manifest.AnticipatedRates()}
	if p.plan.Sequential != nil {
		return verdict.JudgeSequential(in)
	}
	return verdict.Judge(in)
}

// run is one repetition: draw the period, label with the truth, judge;
// it reports whether the audit accepted.
func (p *pipeline) run(t testing.TB, period string) bool {
	t.Helper()
	c, err := p.draw(period)
	if err != nil {
		t.Fatal(err)
	}
	f, err := drawfolder.OpenContent(c, p.fp, []string{"model"})
	if err != nil {
		t.Fatal(err)
	}
	res, err := p.judge(f, labeled(t, c, nil), false)
	if err != nil {
		t.Fatal(err)
	}
	return res.Overall == record.Accept
}

// assembleAgrees checks, on one period, that assemble.Assemble — the
// record command's whole computation — gives the verdict the shortcut of
// run gives.
func (p *pipeline) assembleAgrees(t testing.TB, period string) {
	t.Helper()
	c, err := p.draw(period)
	if err != nil {
		t.Fatal(err)
	}
	f, err := drawfolder.OpenContent(c, p.fp, []string{"model"})
	if err != nil {
		t.Fatal(err)
	}
	l := labeled(t, c, nil)
	rec, err := assemble.Assemble(&assemble.Inputs{Plan: p.plan, PlanFP: p.fp, Folder: f, Labels: l}, assemble.Options{Use: "general", Issued: chrono.FromClock(time.Date(2026, 6, 1, 0, 0, 0, 0, time.UTC))})
	if err != nil {
		t.Fatal(err)
	}
	res, err := p.judge(f, l, false)
	if err != nil {
		t.Fatal(err)
	}
	if rec.OverallVerdict != res.Overall || rec.Method.Rule == nil || rec.Method.Rule.Name != res.Method.Rule.Name {
		t.Errorf("%s: assemble says %s (%+v), the judgement %s", p.name, rec.OverallVerdict, rec.Method.Rule, res.Overall)
	}
}

func BenchmarkPipelineRun(b *testing.B) {
	in := plan.Inputs{Ceiling: 0.05, Confidence: 0.9, CandidateCount: 1, Anticipated: ptrF(0.025), ProducerRisk: 0.1,
		Method: plan.MethodExact, Multiplicity: plan.Bonferroni, Design: plan.DesignFixed, Require: plan.RequireAll}
	N := []int64{6000, 3000, 800, 200}
	p := newPipeline(b, "bench", in, false, N, []int64{0, 0, 0, 200}, sampling.AllocOptions{Rule: sampling.Equal})
	for i := 0; b.Loop(); i++ {
		p.run(b, fmt.Sprint(i))
	}
}

func ptrF(v float64) *float64 { return &v }
