package main

import (
	"os"
	"os/exec"
	"path/filepath"
	"regexp"
	"strings"
	"testing"

	"probity/plan/record"
	"probity/plan/testkit/needs"
	"probity/sampling/drawfolder"
)

// flagSpelling matches a command-line flag ("--allow-incomplete") but not a
// dash used as punctuation.
var flagSpelling = regexp.MustCompile(`(^|[^-\w])--[a-z][a-z-]*`)

// TestRecordArtifactsNameNoFlag: record.json and the text of record.pdf
// never spell a command-line flag, in every deviation and label-quality
// state the fixtures reach: complete labels, spares used, unlabeled and
// unsure items counted as errors, a sequential prefix with an unsure item,
// unequal weights under the stratified count rule, adjudicated and unadjudicated
// disagreements, unsure double labels, the same labeler twice (a warning)
// and enforced labeler independence, a planned second labeling not done. The flags belong to the command line;
// the signed artifacts speak of what was decided.
func TestRecordArtifactsNameNoFlag(t *testing.T) {
	t.Parallel()
	type run struct {
		name string
		args []string
		exit []int
	}
	var runs []run
	accepted := []int{exitOK, exitRejected}

	fx := newRecFixture(t, true, 0)
	spareOf := func(rows []drawfolder.WorksheetRow, stratum string) int {
		for i, l := range fx.ledger {
			if l.Spare && l.Stratum == stratum {
				return i
			}
		}
		t.Fatalf("no spare in stratum %s", stratum)
		return -1
	}
	base := func(labels string) []string {
		return []string{"record", "--plan", fx.planPath, "--draw", fx.draw, "--labels", labels, "--date", "2026-12-01"}
	}
	runs = append(runs,
		run{"complete", base(fx.labels(t, "complete.csv", nil)), accepted},
		run{"spare used", base(fx.labels(t, "spare.csv", func(r []drawfolder.WorksheetRow) []drawfolder.WorksheetRow {
			r[0].Label = "unsure"
			s := spareOf(r, fx.ledger[0].Stratum)
			r[s].Label = fx.truth[r[s].RecordID]
			return r
		})), accepted},
		run{"unlabeled counted", append(base(fx.labels(t, "unlabeled.csv", func(r []drawfolder.WorksheetRow) []drawfolder.WorksheetRow {
			r[1].Label = ""
			return r
		})), "--allow-incomplete"), accepted},
		run{"unsure counted", append(base(fx.labels(t, "unsure.csv", func(r []drawfolder.WorksheetRow) []drawfolder.WorksheetRow {
			r[2].Label, r[3].Label = "unsure", ""
			return r
		})), "--allow-incomplete", "--use", "safety"), accepted},
	)
	weighted := newRecFixture(t, false, 40)
	runs = append(runs, run{"unequal weights", []string{"record", "--plan", weighted.planPath, "--draw", weighted.draw,
		"--labels", weighted.labels(t, "w.csv", nil), "--date", "2026-12-01"}, accepted})
	seq := buildRecFixture(t, false, 0, true)
	runs = append(runs, run{"sequential prefix", []string{"record", "--plan", seq.planPath, "--draw", seq.draw,
		"--labels", seq.labels(t, "seq.csv", func(r []drawfolder.WorksheetRow) []drawfolder.WorksheetRow {
			r[1].Label = "unsure"
			return r
		}), "--allow-incomplete", "--date", "2026-12-01"}, accepted})

	lq := newLQFixture(t)
	truth := lq.truth[lq.ledger[0].RecordID]
	first := lq.write(t, "first.csv", lq.worksheet, "ana", nil)
	disagree := lq.write(t, "second-disagree.csv", lq.second, "bea", func(r []drawfolder.WorksheetRow) { r[0].Label = other(truth) })
	unsure := lq.write(t, "second-unsure.csv", lq.second, "bea", func(r []drawfolder.WorksheetRow) { r[1].Label = "unsure" })
	same := lq.write(t, "second-same.csv", lq.second, "Ana", nil)
	agree := lq.write(t, "second-agree.csv", lq.second, "bea", nil)
	lqBase := []string{"record", "--plan", lq.planPath, "--draw", lq.draw, "--labels", first, "--date", "2026-12-01"}
	with := func(extra ...string) []string { return append(append([]string{}, lqBase...), extra...) }
	runs = append(runs,
		run{"adjudicated", with("--second", disagree, "--adjudicated", lq.adjudication(t, "adj.csv", [2]string{"1", truth})), accepted},
		run{"unadjudicated allowed", with("--second", disagree, "--allow-unadjudicated"), accepted},
		run{"unsure second label", with("--second", unsure, "--allow-unadjudicated", "--allow-incomplete"), accepted},
		run{"same labeler warned", with("--second", same), accepted},
		run{"independence enforced", with("--second", agree, "--strict"), accepted},
		run{"second labeling planned, not done", with(), accepted},
	)

	for _, r := range runs {
		out := filepath.Join(t.TempDir(), "rec")
		code, stdout, stderr := runProbity(t, append(r.args, "--out", out)...)
		if !containsInt(r.exit, code) {
			t.Errorf("%s: exit %d\n%s%s", r.name, code, stdout, stderr)
			continue
		}
		js, err := os.ReadFile(filepath.Join(out, record.JSONFile))
		if err != nil {
			t.Fatal(err)
		}
		if m := flagSpelling.FindString(string(js)); m != "" {
			t.Errorf("%s: record.json names the flag %q:\n%s", r.name, m[strings.Index(m, "--"):], js)
		}
		t.Run(r.name+"/record.pdf", func(t *testing.T) {
			txt, err := exec.Command(needs.Program(t, "pdftotext"), "-layout", filepath.Join(out, record.PDFFile), "-").Output()
			if err != nil {
				t.Fatal(err)
			}
			if m := flagSpelling.FindString(string(txt)); m != "" {
				t.Errorf("record.pdf names the flag %q", m[strings.Index(m, "--"):])
			}
		})
	}
}

func containsInt(xs []int, x int) bool {
	for _, v := range xs {
		if v == x {
			return true
		}
	}
	return false
}
