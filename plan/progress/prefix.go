package progress

import (
	"fmt"
	"probity/plan/inputerr"
	"probity/sampling/drawfolder"
)

// prefix checks the labeled worksheet against the ledger and returns the
// labeled prefix of the sample (spares excluded) and the number of labeled
// spares. The worksheet must list the ledger's items, with the same
// record ids, in the same order; every label must be one of the plan's
// classes, blank or unsure (drawfolder.ParseLabel); and the labels must form a prefix: an
// unlabeled sample item followed by a labeled one breaks the rule that a
// labeled prefix is a random sample.
func prefix(in Input) ([]item, int, error) {
	name := in.WorksheetName
	ws, led := in.Worksheet, in.Ledger
	if len(ws) != len(led) {
		return nil, 0, &inputerr.Error{File: name, Msg: fmt.Sprintf("has %d items but the draw's ledger has %d", len(ws), len(led)),
			Hint: "label a copy of the worksheet.csv from the same draw folder, without adding or removing rows"}
	}
	var items []item
	spares := 0
	gap := 0 // first unlabeled sample item, 0 while none
	gapLine := 0
	for i, w := range ws {
		l := led[i]
		if w.Item != l.Item || w.RecordID != l.RecordID {
			return nil, 0, &inputerr.Error{File: name, Line: w.Line, Field: "record_id",
				Msg:  fmt.Sprintf("item %d is %q but the ledger's row %d is item %d, %q", w.Item, w.RecordID, i+1, l.Item, l.RecordID),
				Hint: "the worksheet was edited or reordered after the draw; use the worksheet.csv of the same draw folder"}
		}
		label, _, err := drawfolder.RowLabel(name, w, in.Plan.Classes)
		if err != nil {
			return nil, 0, err
		}
		if l.Spare {
			if label != "" {
				spares++
			}
			continue
		}
		if label == "" {
			if gap == 0 {
				gap, gapLine = w.Item, w.Line
			}
			continue
		}
		if gap != 0 {
			return nil, 0, &inputerr.Error{File: name, Line: w.Line, Field: "label",
				Msg: fmt.Sprintf("item %d is labeled but item %d above it (line %d) is not: the labels must be a prefix of the worksheet (every item from the top, none skipped), or the labeled items are not a random sample",
					w.Item, gap, gapLine),
				Hint: fmt.Sprintf("label item %d and every unlabeled item above item %d, then run progress again", gap, w.Item)}
		}
		if len(l.Predictions) != len(in.Plan.Candidates) {
			return nil, 0, &inputerr.Error{File: name, Line: w.Line,
				Msg: fmt.Sprintf("the ledger holds %d predictions for item %d but the plan has %d candidates", len(l.Predictions), w.Item, len(in.Plan.Candidates))}
		}
		items = append(items, item{label: label, preds: l.Predictions, stratum: l.Stratum, itemNo: l.Item})
	}
	return items, spares, nil
}

// replaceBySpares applies the draw's spare rule (drawfolder.SpareRule, as
// the record does): an unsure item of the prefix whose spare is labeled
// with a class takes the spare's label and predictions. It returns how
// many items were replaced and how many labeled spares the rule gave no
// item (unused).
func replaceBySpares(in Input, items []item) (replaced, unused int, err error) {
	labels := map[int]string{}
	for i, w := range in.Worksheet {
		label, _, lerr := drawfolder.RowLabel(in.WorksheetName, w, in.Plan.Classes)
		if lerr != nil {
			return 0, 0, lerr
		}
		labels[in.Ledger[i].Item] = label
	}
	inPrefix := map[int]int{}
	for i, it := range items {
		inPrefix[it.itemNo] = i
	}
	use := drawfolder.NewSpareRule(in.Ledger).Assign(func(no int) drawfolder.LabelKind {
		l := labels[no]
		if _, ok := inPrefix[no]; !ok && !isSpare(in.Ledger, no) {
			l = "" // a sample item below the prefix is not judged yet
		}
		switch l {
		case "":
			return drawfolder.LabelBlank
		case drawfolder.Unsure:
			return drawfolder.LabelUnsure
		}
		return drawfolder.LabelClass
	})
	preds := map[int][]string{}
	for _, l := range in.Ledger {
		preds[l.Item] = l.Predictions
	}
	for _, st := range use.Steps {
		if st.Label != drawfolder.LabelClass {
			continue
		}
		i := inPrefix[st.Item]
		items[i].label, items[i].preds, items[i].replaced = labels[st.Spare], preds[st.Spare], true
		replaced++
	}
	return replaced, len(use.Unused), nil
}

func isSpare(ledger []drawfolder.LedgerRow, no int) bool {
	return no >= 1 && no <= len(ledger) && ledger[no-1].Item == no && ledger[no-1].Spare
}
