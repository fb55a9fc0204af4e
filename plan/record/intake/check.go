package intake

import (
	"errors"
	"fmt"
	"sort"
	"strings"

	"probity/plan"
	"probity/plan/inputerr"
	"probity/plan/record"
	"probity/plan/verdict"
	"probity/sampling/drawfolder"
)

// ErrIncomplete is the cause of the refusal of a worksheet whose items are
// left unlabeled or unsure without a spare to replace them, when
// Options.AllowIncomplete is not set; a caller can name its own way of
// setting it in the hint.
var ErrIncomplete = errors.New("labeling is incomplete")

// Options change how incomplete labeling is treated.
type Options struct {
	// AllowIncomplete counts every item left unlabeled or marked unsure
	// (and not replaced by a spare) as an error for every candidate,
	// instead of refusing the worksheet.
	AllowIncomplete bool
	// Prefix is for a sequential plan: the worksheet is labeled from the
	// top, so the judged items are the sample items down to the first
	// blank one; a labeled item after a blank one, and any labeled spare,
	// are refused. Unsure items in the prefix are refused unless
	// AllowIncomplete (then counted as errors).
	Prefix bool
}

// Result is a checked intake: the items to judge, the design, the
// deviations from the plan and the fingerprints of every input.
type Result struct {
	Items        []verdict.Item
	Design       verdict.Design
	Deviations   record.Deviations
	Fingerprints record.Fingerprints
	// Counted is the number of unlabeled or unsure items counted as
	// errors (only with AllowIncomplete).
	Counted int
	// order is each item's ledger row while the items are collected.
	order []int
}

// maxListed is how many differing rows an error message names.
const maxListed = 5

// Check validates the labeled worksheet against the plan and the draw
// folder and returns the items to judge. planFP is the plan file's
// SHA-256.
func Check(p *plan.File, planFP string, f *drawfolder.Folder, l *drawfolder.Labels, opts Options) (*Result, error) {
	m := f.Manifest
	if err := f.CheckPlan(planFP); err != nil {
		return nil, err
	}
	strata := make([]verdict.Stratum, len(m.Strata))
	for i, s := range m.Strata {
		strata[i] = verdict.Stratum{Label: s.Label, Population: s.Population}
	}
	index := f.StratumIndex
	if err := f.CheckLabels(l); err != nil {
		return nil, err
	}
	res := &Result{Fingerprints: record.Fingerprints{
		Plan: planFP, Log: m.Log.SHA256, Manifest: record.SHA256(f.ManifestBytes),
		Ledger: record.SHA256(f.LedgerBytes), Worksheet: f.WorksheetSHA256, Labels: record.SHA256(l.Bytes),
	}}
	judge := res.judgeable
	if opts.Prefix {
		judge = res.prefix
	}
	if err := judge(p, f, l, strata, index, opts); err != nil {
		return nil, err
	}
	res.Design = verdict.Design{Strata: strata}
	if f.LabeledInPlace {
		res.Deviations.Notes = append(res.Deviations.Notes, fmt.Sprintf("%s in the draw folder was labeled in place; with its labels removed it is the file the draw wrote", drawfolder.WorksheetFile))
	}
	return res, nil
}

func first(s []string) string {
	if len(s) <= maxListed {
		return strings.Join(s, ", ")
	}
	return strings.Join(s[:maxListed], ", ") + fmt.Sprintf(" and %d more", len(s)-maxListed)
}

// judgeable checks the labels and the use of spares, and builds the items.
func (res *Result) judgeable(p *plan.File, f *drawfolder.Folder, l *drawfolder.Labels, strata []verdict.Stratum, index map[string]int, opts Options) error {
	// Labels by ledger row (compareRows established a 1:1 match in order).
	type row struct {
		lr    drawfolder.LedgerRow
		wr    drawfolder.WorksheetRow
		state drawfolder.LabelKind
	}
	const (
		labeled = drawfolder.LabelClass
		blank   = drawfolder.LabelBlank
		unsure  = drawfolder.LabelUnsure
	)
	rows := make([]row, len(f.Ledger))
	for i, lr := range f.Ledger {
		wr := l.Rows[i]
		lab, st, err := drawfolder.RowLabel(l.Path, wr, p.Classes)
		if err != nil {
			return err
		}
		wr.Label = lab
		rows[i] = row{lr: lr, wr: wr, state: st}
	}
	// Per stratum: the sample rows in ledger order, the spares in key
	// order (the order they were drawn in).
	type bucket struct{ main, spares []int }
	buckets := make([]bucket, len(strata))
	for i, r := range rows {
		h := index[r.lr.Stratum]
		if r.lr.Spare {
			buckets[h].spares = append(buckets[h].spares, i)
		} else {
			buckets[h].main = append(buckets[h].main, i)
		}
	}
	dev := &res.Deviations
	var unresolved []string
	for h := range buckets {
		b := &buckets[h]
		sort.SliceStable(b.spares, func(x, y int) bool { return rows[b.spares[x]].lr.Key < rows[b.spares[y]].lr.Key })
		var deficits []int // main rows to replace, in ledger order
		for _, i := range b.main {
			r := rows[i]
			switch r.state {
			case labeled:
				res.add(i, r.lr, r.wr.Label, h, false)
			case blank:
				dev.Unlabeled = append(dev.Unlabeled, r.lr.RecordID)
				deficits = append(deficits, i)
			case unsure:
				dev.Unsure = append(dev.Unsure, r.lr.RecordID)
				deficits = append(deficits, i)
			}
		}
		need := len(deficits)
		firstBlank := -1
		for _, i := range b.spares {
			r := rows[i]
			if r.state == blank {
				if firstBlank < 0 {
					firstBlank = i
				}
				continue
			}
			if firstBlank >= 0 {
				prev := rows[firstBlank]
				return &inputerr.Error{File: l.Path, Line: r.wr.Line, Field: "label",
					Msg:  fmt.Sprintf("spare item %d of stratum %q is labeled, but the spare before it (item %d) is not: spares must be used in order", r.wr.Item, strata[h].Label, prev.wr.Item),
					Hint: fmt.Sprintf("label spare item %d first, or clear the label of item %d", prev.wr.Item, r.wr.Item)}
			}
			if need == 0 {
				return &inputerr.Error{File: l.Path, Line: r.wr.Line, Field: "label",
					Msg:  fmt.Sprintf("spare item %d of stratum %q is labeled, but no unlabeled or unsure item of that stratum is left for it to replace", r.wr.Item, strata[h].Label),
					Hint: "spares only replace items that cannot be labeled; clear the spare's label"}
			}
			dev.SparesUsed = append(dev.SparesUsed, r.lr.RecordID)
			if r.state == unsure {
				dev.Unsure = append(dev.Unsure, r.lr.RecordID)
				continue // the spare itself could not be labeled; the next one may replace the item
			}
			res.add(i, r.lr, r.wr.Label, h, false)
			need--
		}
		for _, i := range deficits[len(deficits)-need:] {
			r := rows[i]
			unresolved = append(unresolved, fmt.Sprintf("%d", r.wr.Item))
			if opts.AllowIncomplete {
				res.add(i, r.lr, "", h, true)
				res.Counted++
			}
		}
	}
	if len(unresolved) > 0 && !opts.AllowIncomplete {
		return &inputerr.Error{File: l.Path, Field: "label", Err: ErrIncomplete,
			Msg:  fmt.Sprintf("%s unlabeled or unsure and no spare replaces %s (%s %s)", itemsAre(len(unresolved)), pron(len(unresolved)), itemWord(len(unresolved)), first(unresolved)),
			Hint: "label them, or label the stratum's spares in order"}
	}
	if res.Counted > 0 {
		dev.AllowIncomplete = true
		dev.Notes = append(dev.Notes, fmt.Sprintf("%d unlabeled or unsure items were counted as errors for every candidate (incomplete labeling allowed)", res.Counted))
	}
	// Judge the items in ledger order (the order they were drawn in).
	perm := make([]int, len(res.Items))
	for i := range perm {
		perm[i] = i
	}
	sort.Slice(perm, func(a, b int) bool { return res.order[perm[a]] < res.order[perm[b]] })
	sorted := make([]verdict.Item, len(perm))
	for i, k := range perm {
		sorted[i] = res.Items[k]
	}
	res.Items, res.order = sorted, nil
	for i := range strata {
		strata[i].Sample = 0
	}
	for _, it := range res.Items {
		strata[it.Stratum].Sample++
	}
	for h, s := range strata {
		if s.Sample != f.Manifest.Strata[h].Sample {
			return &inputerr.Error{File: l.Path, Msg: fmt.Sprintf("stratum %q has %d judged items where the draw has n_h = %d", s.Label, s.Sample, f.Manifest.Strata[h].Sample)}
		}
	}
	return nil
}

func (res *Result) add(row int, lr drawfolder.LedgerRow, label string, h int, missing bool) {
	res.order = append(res.order, row)
	res.Items = append(res.Items, verdict.Item{RecordID: lr.RecordID, Stratum: h, Label: label, Missing: missing,
		Predictions: append([]string(nil), lr.Predictions...)})
}

// prefix builds the items of a worksheet labeled from the top (a
// sequential plan).
func (res *Result) prefix(p *plan.File, f *drawfolder.Folder, l *drawfolder.Labels, strata []verdict.Stratum, index map[string]int, opts Options) error {
	dev := &res.Deviations
	firstBlank := 0
	var unsure []string
	for i, lr := range f.Ledger {
		wr := l.Rows[i]
		lab, kind, err := drawfolder.RowLabel(l.Path, wr, p.Classes)
		if lr.Spare {
			if kind != drawfolder.LabelBlank {
				return &inputerr.Error{File: l.Path, Line: wr.Line, Field: "label",
					Msg:  fmt.Sprintf("spare item %d is labeled, but a sequential plan uses no spares", wr.Item),
					Hint: "label the sample items from the top and leave the spares blank; mark an item that cannot be labeled unsure"}
			}
			continue
		}
		switch {
		case kind == drawfolder.LabelBlank:
			if firstBlank == 0 {
				firstBlank = wr.Item
			}
			continue
		case firstBlank != 0:
			return &inputerr.Error{File: l.Path, Line: wr.Line, Field: "label",
				Msg:  fmt.Sprintf("item %d is labeled after the unlabeled item %d: a sequential plan is labeled from the top without gaps", wr.Item, firstBlank),
				Hint: fmt.Sprintf("label item %d (and any other gap) or clear the labels after it", firstBlank)}
		case err != nil:
			return err
		case kind == drawfolder.LabelUnsure:
			dev.Unsure = append(dev.Unsure, lr.RecordID)
			unsure = append(unsure, fmt.Sprint(wr.Item))
			if opts.AllowIncomplete {
				res.add(i, lr, "", index[lr.Stratum], true)
				res.Counted++
			}
			continue
		}
		res.add(i, lr, lab, index[lr.Stratum], false)
	}
	if len(unsure) > 0 && !opts.AllowIncomplete {
		return &inputerr.Error{File: l.Path, Field: "label", Err: ErrIncomplete,
			Msg:  fmt.Sprintf("%d %s labeled from the top marked unsure (%s %s); a sequential plan cannot skip %s", len(unsure), map[bool]string{true: "item is", false: "items are"}[len(unsure) == 1], itemWord(len(unsure)), first(unsure), pron(len(unsure))),
			Hint: "label them"}
	}
	if len(res.Items) == 0 {
		return &inputerr.Error{File: l.Path, Field: "label", Msg: "no item is labeled", Hint: "label the worksheet from the top"}
	}
	if res.Counted > 0 {
		dev.AllowIncomplete = true
		dev.Notes = append(dev.Notes, fmt.Sprintf("%d unsure items were counted as errors for every candidate (incomplete labeling allowed)", res.Counted))
	}
	dev.Notes = append(dev.Notes, fmt.Sprintf("labeled from the top: %d of the %d sample items", len(res.Items), len(f.Ledger)-f.Manifest.Spares))
	for i := range strata {
		strata[i].Sample = 0
	}
	for _, it := range res.Items {
		strata[it.Stratum].Sample++
	}
	res.order = nil
	return nil
}

// itemsAre is "1 item is" or "k items are".
func itemsAre(k int) string {
	if k == 1 {
		return "1 item is"
	}
	return fmt.Sprintf("%d items are", k)
}

// itemWord is "item" or "items".
func itemWord(k int) string {
	if k == 1 {
		return "item"
	}
	return "items"
}

// pron is "it" or "them".
func pron(k int) string {
	if k == 1 {
		return "it"
	}
	return "them"
}
