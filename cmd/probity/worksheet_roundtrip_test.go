package main

import (
	"bytes"
	"encoding/csv"
	"fmt"
	"os"
	"path/filepath"
	"probity/sampling"
	"probity/sampling/drawfolder"
	"strings"
	"testing"
)

// smallAudit is a plan of 22 items for one label-column candidate and
// a log of 60 rows whose columns and values the test chooses.
type smallAudit struct {
	dir, plan, log string
}

func newSmallAudit(t *testing.T, header string, row func(i int) string) smallAudit {
	t.Helper()
	a := smallAudit{dir: t.TempDir()}
	a.plan = filepath.Join(a.dir, "plan.yaml")
	if code, _, stderr := runProbity(t, "plan", "--ceiling", "0.1", "--confidence", "0.9", "--candidate", "m=model_a",
		"--classes", "ok,fraud", "--seed", "5ca1ab1e", "--out", a.plan); code != exitOK {
		t.Fatal(stderr)
	}
	var b strings.Builder
	b.WriteString(header + "\n")
	for i := 0; i < 60; i++ {
		b.WriteString(row(i) + "\n")
	}
	a.log = filepath.Join(a.dir, "log.csv")
	if err := os.WriteFile(a.log, []byte(b.String()), 0o644); err != nil {
		t.Fatal(err)
	}
	return a
}

// draw draws into a new folder named name; extra flags follow.
func (a smallAudit) draw(t *testing.T, name string, extra ...string) string {
	t.Helper()
	out := filepath.Join(a.dir, name)
	if code, stdout, stderr := runProbity(t, append([]string{"draw", "--plan", a.plan, "--log", a.log, "--out", out}, extra...)...); code != exitOK {
		t.Fatalf("draw: exit %d\n%s%s", code, stdout, stderr)
	}
	return out
}

// smallN is the sample size of smallAudit's plan.
const smallN = 22

// label writes a labeled copy of the draw's worksheet (every sample item
// "ok", the spares left blank),
// after edit has changed its records (header first), as a spreadsheet
// program writes CSV; it returns its path.
func (a smallAudit) label(t *testing.T, draw, name string, edit func(recs [][]string) [][]string) string {
	t.Helper()
	data, err := os.ReadFile(filepath.Join(draw, "worksheet.csv"))
	if err != nil {
		t.Fatal(err)
	}
	recs, err := csv.NewReader(bytes.NewReader(data)).ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	h := recs[0]
	for _, r := range recs[1 : 1+smallN] {
		r[len(h)-3], r[len(h)-1] = "ok", "ann"
	}
	if edit != nil {
		recs = edit(recs)
	}
	var out bytes.Buffer
	w := csv.NewWriter(&out)
	w.WriteAll(recs)
	path := filepath.Join(a.dir, name)
	if err := os.WriteFile(path, out.Bytes(), 0o644); err != nil {
		t.Fatal(err)
	}
	return path
}

// record runs record and returns its exit code and streams.
func (a smallAudit) record(t *testing.T, draw, labels string) (int, string, string) {
	t.Helper()
	return runProbity(t, "record", "--plan", a.plan, "--draw", draw, "--labels", labels, "--out", filepath.Join(a.dir, "rec-"+filepath.Base(labels)))
}

// TestShownColumnsNamedLikeTheWorksheets (issue 16, item 2): a log column
// called note (or label, labeler, item) can be shown: the worksheet heads
// it log:note, and record takes the labeled worksheet (before, the draw
// wrote a header naming note twice, and record refused it after the
// labeling was done).
func TestShownColumnsNamedLikeTheWorksheets(t *testing.T) {
	t.Parallel()
	a := newSmallAudit(t, "record_id,model_a,note,label,item", func(i int) string {
		return fmt.Sprintf("r%02d,ok,note %d,tag %d,%d", i, i, i, i)
	})
	draw := a.draw(t, "draw", "--show", "note,label,item")
	data, _ := os.ReadFile(filepath.Join(draw, "worksheet.csv"))
	header, _, _ := strings.Cut(string(data), "\n")
	if header != "item (draw: seed 5ca1ab1e),record_id,log:note,log:label,log:item,label,note,labeler" {
		t.Fatalf("worksheet header %s", header)
	}
	if code, stdout, stderr := a.record(t, draw, a.label(t, draw, "labels.csv", nil)); code != exitOK {
		t.Fatalf("record: exit %d\n%s%s", code, stdout, stderr)
	}
}

// TestFormulasInTheLog (issue 16, item 9): values a spreadsheet would run
// reach the worksheet behind an apostrophe, and the labeled worksheet is
// taken back whether the spreadsheet kept the apostrophes or saved the
// values as plain text.
func TestFormulasInTheLog(t *testing.T) {
	t.Parallel()
	texts := []string{`=HYPERLINK("http://invalid.example/x","open")`, "@SUM(1+1)", "+1+2", "-3-4", "\tcmd", "'quoted", "-5", "plain"}
	a := newSmallAudit(t, "record_id,model_a,text", func(i int) string {
		id := fmt.Sprintf("r%02d", i)
		if i%7 == 3 {
			id = "=r" + id // an id a spreadsheet would run
		}
		var b strings.Builder
		w := csv.NewWriter(&b)
		w.Write([]string{id, "ok", texts[i%len(texts)]})
		w.Flush()
		return strings.TrimSuffix(b.String(), "\n")
	})
	draw := a.draw(t, "draw", "--show", "text", "--spare", "15")
	data, _ := os.ReadFile(filepath.Join(draw, "worksheet.csv"))
	recs, err := csv.NewReader(bytes.NewReader(data)).ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	if got := strings.Join(recs[0][1:4], ","); got != "record_id,spare,text" {
		t.Fatalf("worksheet columns %s, want record_id, the spare mark and text", got)
	}
	const text = 3 // item, record_id, spare, text
	drawn := map[string]bool{}
	for _, r := range recs[1:] {
		drawn[drawfolder.CellValue(r[text])] = true
	}
	for _, x := range texts {
		if !drawn[x] {
			t.Errorf("no drawn row shows %q", x)
		}
	}
	for _, r := range recs[1:] {
		for _, cell := range []string{r[1], r[text]} {
			if cell != "" && strings.ContainsRune("=@+\t\r", rune(cell[0])) || strings.HasPrefix(cell, "-") && cell != "-5" {
				t.Errorf("worksheet cell %q would run in a spreadsheet", cell)
			}
		}
	}
	kept := a.label(t, draw, "kept.csv", nil)
	stripped := a.label(t, draw, "stripped.csv", func(recs [][]string) [][]string {
		for _, r := range recs[1:] {
			for _, j := range []int{1, text} {
				r[j] = strings.TrimPrefix(r[j], "'")
			}
		}
		return recs
	})
	for _, labels := range []string{kept, stripped} {
		if code, stdout, stderr := a.record(t, draw, labels); code != exitOK {
			t.Errorf("record on %s: exit %d\n%s%s", filepath.Base(labels), code, stdout, stderr)
		}
	}
}

// TestWorksheetOfAnotherDraw (issue 16, item 10): the labeled worksheet
// of another period's draw is refused saying which draw it belongs to.
func TestWorksheetOfAnotherDraw(t *testing.T) {
	t.Parallel()
	a := newSmallAudit(t, "record_id,model_a", func(i int) string { return fmt.Sprintf("r%02d,ok", i) })
	oct, nov := a.draw(t, "oct", "--period", "2026-10"), a.draw(t, "nov", "--period", "2026-11")
	labels := a.label(t, oct, "october.csv", nil)
	code, _, stderr := a.record(t, nov, labels)
	want := fmt.Sprintf("probity: %s line 1: this is the worksheet of another draw (period 2026-10, seed %s), not of the draw in %s (period 2026-11, seed %s)\nhint: pass the labeled copy of %s\n",
		labels, periodSeedStart("5ca1ab1e", "2026-10"), nov, periodSeedStart("5ca1ab1e", "2026-11"), filepath.Join(nov, "worksheet.csv"))
	if code != exitBadInput || stderr != want {
		t.Fatalf("exit %d\n%s\nwant\n%s", code, stderr, want)
	}
}

// TestShownValueReformatted (issue 16, item 11): a shown date a
// spreadsheet reformatted is named with its column and both values, and a
// labeled worksheet saved with ';' between fields is named as such.
func TestShownValueReformatted(t *testing.T) {
	t.Parallel()
	a := newSmallAudit(t, "record_id,model_a,date", func(i int) string { return fmt.Sprintf("r%02d,ok,2026-11-%02d", i, i%28+1) })
	draw := a.draw(t, "draw", "--show", "date")
	var was string
	labels := a.label(t, draw, "labels.csv", func(recs [][]string) [][]string {
		was = recs[2][2]
		recs[2][2] = "11/" + was[8:] + "/2026"
		return recs
	})
	code, _, stderr := a.record(t, draw, labels)
	want := fmt.Sprintf("probity: %s: rows differ from the draw's worksheet — line 3: item 2's date is %q, the draw's worksheet has %q\nhint: a spreadsheet may have reformatted the value (a date, a number, a leading zero): keep the shown columns as text, or copy the labels into the draw's worksheet.csv\n",
		labels, "11/"+was[8:]+"/2026", was)
	if code != exitBadInput || stderr != want {
		t.Fatalf("exit %d\n%s\nwant\n%s", code, stderr, want)
	}
	semi := a.label(t, draw, "semi.csv", nil)
	data, _ := os.ReadFile(semi)
	os.WriteFile(semi, bytes.ReplaceAll(data, []byte(","), []byte(";")), 0o644)
	code, _, stderr = a.record(t, draw, semi)
	want = "probity: " + semi + " line 1: its fields are separated by ';', not ','\nhint: save it as CSV with ',' as the field separator (in the spreadsheet's CSV export options)\n"
	if code != exitBadInput || stderr != want {
		t.Fatalf("';' file: exit %d\n%s\nwant\n%s", code, stderr, want)
	}
}

// periodSeedStart is the start of a period's selection seed, as a
// worksheet's header shows it.
func periodSeedStart(seed, period string) string {
	return sampling.PeriodSeed(seed, period)[:12]
}
