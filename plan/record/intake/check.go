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
	// Which spare replaces which unsure item is the draw's fixed rule
	// (drawfolder.SpareRule), as on the labeling page; a labeled spare the
	// rule gives no item is unused, never an error.
	rowOf := make(map[int]int, len(rows))
	for i, r := range rows {
		rowOf[r.lr.Item] = i
	}
	use := drawfolder.NewSpareRule(f.Ledger).Assign(func(item int) drawfolder.LabelKind { return rows[rowOf[item]].state })
	dev := &res.Deviations
	for i, r := range rows {
		if r.lr.Spare {
			continue
		}
		switch r.state {
		case labeled:
			res.add(i, r.lr, r.wr.Label, index[r.lr.Stratum], false)
		case blank:
			dev.Unlabeled = append(dev.Unlabeled, r.lr.RecordID)
		case unsure:
			dev.Unsure = append(dev.Unsure, r.lr.RecordID)
		}
	}
	for _, st := range use.Steps {
		sr, ir := rows[rowOf[st.Spare]], rows[rowOf[st.Item]]
		switch st.Label {
		case labeled:
			dev.SparesUsed = append(dev.SparesUsed, sr.lr.RecordID)
			dev.Replacements = append(dev.Replacements, record.SpareReplacement{Item: ir.lr.RecordID, Spare: sr.lr.RecordID, Reason: unsureReason(ir.wr)})
			res.add(rowOf[st.Spare], sr.lr, sr.wr.Label, index[sr.lr.Stratum], false)
		case unsure:
			dev.SparesUsed = append(dev.SparesUsed, sr.lr.RecordID)
			dev.Unsure = append(dev.Unsure, sr.lr.RecordID)
		}
	}
	for _, it := range use.Unused {
		dev.SparesUnused = append(dev.SparesUnused, rows[rowOf[it]].lr.RecordID)
	}
	// Items left without a label: blank sample items, and unsure ones no
	// labeled spare replaces (in worksheet order).
	waiting := map[int]int{} // unsure item → its blank spare
	for _, st := range use.Steps {
		if st.Label == blank {
			waiting[st.Item] = st.Spare
		}
	}
	unreplaced := map[int]bool{}
	for _, it := range use.Unreplaced {
		unreplaced[it] = true
	}
	var unresolved, spareNotes []string
	for i, r := range rows {
		if r.lr.Spare || (r.state != blank && !unreplaced[r.lr.Item]) {
			continue
		}
		unresolved = append(unresolved, fmt.Sprintf("%d", r.wr.Item))
		if s, ok := waiting[r.lr.Item]; ok {
			spareNotes = append(spareNotes, fmt.Sprintf("item %d's spare by the draw's rule is item %d, which is not labeled", r.wr.Item, s))
		}
		if opts.AllowIncomplete {
			res.add(i, r.lr, "", index[r.lr.Stratum], true)
			res.Counted++
		}
	}
	if len(unresolved) > 0 && !opts.AllowIncomplete {
		return &inputerr.Error{File: l.Path, Field: "label", Err: ErrIncomplete,
			Msg:  fmt.Sprintf("%s unlabeled or unsure and no spare replaces %s (%s %s)%s", itemsAre(len(unresolved)), pron(len(unresolved)), itemWord(len(unresolved)), first(unresolved), spareList(spareNotes)),
			Hint: "label them; an item that cannot be labeled is marked unsure and replaced by a spare (the rows marked spare), so label the spares too"}
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
	res.Items = append(res.Items, verdict.Item{RecordID: lr.RecordID, Item: lr.Item, Stratum: h, Label: label, Missing: missing,
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

// spareList is "; " and the first of notes, and how many more ("" for
// none).
func spareList(notes []string) string {
	switch len(notes) {
	case 0:
		return ""
	case 1:
		return "; " + notes[0]
	}
	return fmt.Sprintf("; %s (and %d more like it)", notes[0], len(notes)-1)
}

// unsureReason is why a spare replaced an item: it was marked unsure,
// with the labeler's note when there is one.
func unsureReason(r drawfolder.WorksheetRow) string {
	if n := strings.TrimSpace(r.Note); n != "" {
		return "marked unsure: " + n
	}
	return "marked unsure"
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
