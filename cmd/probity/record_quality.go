package main

import (
	"errors"
	"fmt"
	"os"
	"path/filepath"
	"slices"
	"strings"

	"github.com/spf13/cobra"

	"probity/plan"
	"probity/plan/agreement"
	"probity/plan/inputerr"
	"probity/plan/record"
	"probity/plan/record/intake"
	"probity/sampling"
)

// labelQualityOptions are the flags of `probity record` for double
// labeling: the labeled second worksheet, the adjudications, and how to
// treat open disagreements and labelers who labeled both copies.
type labelQualityOptions struct {
	second             string
	adjudicated        string
	allowUnadjudicated bool
	strict             bool
}

// addLabelQualityFlags registers the double-labeling flags on cmd and
// adds their explanation to its help.
func addLabelQualityFlags(cmd *cobra.Command, o *labelQualityOptions) {
	fs := cmd.Flags()
	fs.StringVar(&o.second, "second", "", "the labeled second worksheet (worksheet-second.csv of a draw with --double): agreement, Cohen's kappa and Gwet's AC1 on the doubled items")
	fs.StringVar(&o.adjudicated, "adjudicated", "", "adjudication CSV ("+strings.Join(agreement.AdjudicationColumns, ",")+"): the final label of each doubled item the two labelers did not agree on")
	fs.BoolVar(&o.allowUnadjudicated, "allow-unadjudicated", false, "issue the record with disagreements left without an adjudication, counting each as an error for every candidate")
	fs.BoolVar(&o.strict, "strict", false, "refuse (instead of warning about) an item labeled twice by the same person, a doubled item that does not name both labelers, or one with a blank label")
	cmd.Long += labelQualityHelp
}

// labelQualityHelp is the part of record's help on double labeling.
const labelQualityHelp = `

Double labeling (a draw made with --double k): pass the labeled
worksheet-second.csv with --second. The record then shows, on the doubled
items, the agreement table, the observed agreement, Cohen's kappa and Gwet's
AC1 with 95 % intervals, the labelers and how many rows each labeled, and
every disagreement with its resolution. Each doubled item the two labelers
did not agree on (two different classes, or a class and unsure) needs a row
in the --adjudicated file, a CSV with the header

  item,record_id,final_label,decided_by,note

(final_label one of the plan's classes, decided_by not blank, note free);
the judgement uses that label. Without a row the record is refused, unless
--allow-unadjudicated, which counts each open disagreement as an error for
every candidate. The same person giving both labels of an item is a warning,
an error with --strict.`

// validate checks the flags that only make sense with --second.
func (o labelQualityOptions) validate() error {
	if o.second != "" {
		return nil
	}
	var given []string
	if o.adjudicated != "" {
		given = append(given, "--adjudicated")
	}
	if o.allowUnadjudicated {
		given = append(given, "--allow-unadjudicated")
	}
	if o.strict {
		given = append(given, "--strict")
	}
	if len(given) == 0 {
		return nil
	}
	return inputerr.Errorf("%s only apply to double labeling, which needs --second FILE", strings.Join(given, " and ")).WithHint("pass the labeled worksheet-second.csv with --second")
}

// labelQualityAdjust prepares the judgement of a record with double
// labeling and returns the hook assemble calls after the intake checks
// (nil without --second). It reads the second worksheet and the
// adjudications, resolves the final label of every doubled item
// (agreement.Resolve) and writes the final labels into l.Rows, so that the
// intake checks (unlabeled, unsure, spares) see the labels the judgement
// uses. The hook then marks every disagreement left open under
// --allow-unadjudicated as an error for every candidate and returns the
// label-quality summary for record.json.
func labelQualityAdjust(o labelQualityOptions, p *plan.File, f *intake.Folder, l *intake.Labels) (func(*intake.Result) (*record.LabelQuality, error), error) {
	if err := o.validate(); err != nil {
		return nil, err
	}
	if o.second == "" {
		return nil, nil
	}
	secondBytes, err := os.ReadFile(o.second)
	if err != nil {
		return nil, inputerr.FromPath(err)
	}
	secondHeader, second, err := sampling.ReadWorksheet(o.second)
	if err != nil {
		return nil, err
	}
	if err := matchSecondToDraw(f, o.second, secondHeader, second); err != nil {
		return nil, err
	}
	in := agreement.Input{
		Classes: p.Classes,
		Ledger:  f.Ledger, LedgerFile: filepath.Join(f.Dir, sampling.LedgerFile),
		First: l.Rows, FirstFile: l.Path,
		Second: second, SecondFile: o.second,
		Strict: o.strict, AllowUnadjudicated: o.allowUnadjudicated,
		Ceiling: p.Inputs.Ceiling,
	}
	adjSHA := ""
	if o.adjudicated != "" {
		data, err := os.ReadFile(o.adjudicated)
		if err != nil {
			return nil, inputerr.FromPath(err)
		}
		if in.Adjudications, err = agreement.ParseAdjudications(data, o.adjudicated, p.Classes); err != nil {
			return nil, err
		}
		in.AdjudicationFile, adjSHA = o.adjudicated, record.SHA256(data)
	}
	resolved, err := agreement.Resolve(in)
	if errors.Is(err, agreement.ErrUnadjudicated) {
		fix := "or pass --allow-unadjudicated to count them as errors for every candidate"
		if o.adjudicated == "" {
			return nil, inputerr.SetHint(err, inputerr.HintOf(err)+" and pass --adjudicated FILE, "+fix)
		}
		return nil, inputerr.SetHint(err, inputerr.HintOf(err)+", "+fix)
	}
	if err != nil {
		return nil, err
	}
	// An item to be counted as an error keeps a class label here (one of
	// its two labels is a class), so that the intake neither replaces it by
	// a spare nor calls it unlabeled; the hook marks it Missing.
	counted := map[string]bool{}
	secondLabel := map[int]string{}
	for _, r := range second {
		secondLabel[r.Item] = r.Label
	}
	for i := range l.Rows {
		fin := resolved.Labels[i]
		if fin.CountsAsError() {
			counted[fin.RecordID] = true
			l.Rows[i].Label = firstClass(p.Classes, l.Rows[i].Label, secondLabel[fin.Item])
			continue
		}
		l.Rows[i].Label = fin.Label
	}
	q := resolved.Quality
	q.SecondWorksheet, q.Adjudications = record.SHA256(secondBytes), adjSHA
	return func(res *intake.Result) (*record.LabelQuality, error) {
		marked := 0
		for i := range res.Items {
			if counted[res.Items[i].RecordID] {
				res.Items[i].Missing = true
				marked++
			}
		}
		if marked != len(counted) {
			return nil, &internalError{msg: fmt.Sprintf("%d unadjudicated items to count as errors, %d found among the judged items", len(counted), marked)}
		}
		if marked > 0 {
			note := fmt.Sprintf("%d doubled items whose two labels disagree were not adjudicated and were counted as errors for every candidate (unadjudicated disagreements allowed)", marked)
			if marked == 1 {
				note = "1 doubled item whose two labels disagree was not adjudicated and was counted as an error for every candidate (unadjudicated disagreements allowed)"
			}
			res.Deviations.Notes = append(res.Deviations.Notes, note)
		}
		lq := q
		lq.UnsureTreatment = unsureTreatment(f, res)
		return &lq, nil
	}, nil
}

// firstClass returns the first of labels that is a class.
func firstClass(classes []string, labels ...string) string {
	for _, l := range labels {
		if l = strings.TrimSpace(l); slices.Contains(classes, l) {
			return l
		}
	}
	return classes[0]
}

// unsureTreatment says what the judgement did with the items whose final
// label is unsure: main items replaced by a spare, or (with
// --allow-incomplete) counted as errors.
func unsureTreatment(f *intake.Folder, res *intake.Result) string {
	spare := map[string]bool{}
	for _, r := range f.Ledger {
		spare[r.RecordID] = r.Spare
	}
	missing := map[string]bool{}
	for _, it := range res.Items {
		if it.Missing {
			missing[it.RecordID] = true
		}
	}
	unsure, replaced, spares := 0, 0, 0
	for _, id := range res.Deviations.Unsure {
		switch {
		case spare[id]:
			spares++
		case missing[id]:
			unsure++
		default:
			unsure++
			replaced++
		}
	}
	s := agreement.UnsureTreatment(unsure, replaced, res.Deviations.AllowIncomplete)
	if spares > 0 {
		s += fmt.Sprintf("; %s also marked unsure and passed over", qualityPlural(spares, "spare was", "spares were"))
	}
	return s
}

// qualityPlural is "1 thing" or "n things".
func qualityPlural(n int, one, many string) string {
	if n == 1 {
		return "1 " + one
	}
	return fmt.Sprintf("%d %s", n, many)
}

// matchSecondToDraw checks the labeled second worksheet against the draw's
// worksheet-second.csv, when the folder has one: the same shown columns
// and, for every item, the same record id and shown values.
func matchSecondToDraw(f *intake.Folder, path string, header []string, rows []sampling.WorksheetRow) error {
	drawPath := filepath.Join(f.Dir, sampling.WorksheetSecondFile)
	if _, err := os.Stat(drawPath); err != nil {
		return nil
	}
	dh, drows, err := sampling.ReadWorksheet(drawPath)
	if err != nil {
		return err
	}
	if got, want := shownColumns(header), shownColumns(dh); !slices.Equal(got, want) {
		return &inputerr.Error{File: path, Line: 1,
			Msg:  fmt.Sprintf("the shown columns are %s, but the draw's %s has %s", strings.Join(got, ","), sampling.WorksheetSecondFile, strings.Join(want, ",")),
			Hint: "label a copy of the worksheet-second.csv written by probity draw without adding, removing or renaming columns"}
	}
	want := map[int]sampling.WorksheetRow{}
	for _, r := range drows {
		want[r.Item] = r
	}
	for _, r := range rows {
		w, ok := want[r.Item]
		if ok && (w.RecordID != r.RecordID || !slices.Equal(w.Show, r.Show)) {
			return &inputerr.Error{File: path, Line: r.Line, Field: "item",
				Msg:  fmt.Sprintf("item %d differs from the draw's %s (record id or shown values)", r.Item, sampling.WorksheetSecondFile),
				Hint: "label a copy of the worksheet-second.csv written by probity draw without editing its rows"}
		}
	}
	return nil
}

// shownColumns returns the columns between record_id and label of a
// worksheet header (item, record_id, shown…, label, note[, labeler]).
func shownColumns(h []string) []string {
	end := len(h)
	if end > 0 && h[end-1] == "labeler" {
		end--
	}
	if end < 4 {
		return nil
	}
	return h[2 : end-2]
}

// reportLabelQuality prints the label-quality line of a record to stdout
// (when summary is set: not with --json) and its warnings to stderr;
// nothing without double labeling.
func reportLabelQuality(d deps, q *record.LabelQuality, summary bool) {
	if q == nil {
		return
	}
	for _, w := range q.Warnings {
		fmt.Fprintf(d.stderr, "probity: warning: %s\n", w)
	}
	if !summary {
		return
	}
	coef := func(a record.Agreement) string {
		if !a.Defined {
			return "undefined"
		}
		return fmt.Sprintf("%.3f [%.3f, %.3f]", a.Value, a.Lower, a.Upper)
	}
	fmt.Fprintf(d.stdout, "label quality: %d doubled, %d compared, agreement %.4f, kappa %s, AC1 %s; %d disagreements (%d adjudicated, %d counted as errors)\n",
		q.Doubled, q.Compared, q.ObservedAgreement, coef(q.Kappa), coef(q.AC1), len(q.Disagreements), q.Adjudicated, q.Unadjudicated)
}
