package agreement

import (
	"slices"

	"probity/plan/inputerr"
	"probity/sampling/drawfolder"
)

// indexLedger maps items to ledger rows and returns the doubled items in
// item order.
func indexLedger(in Input) (map[int]drawfolder.LedgerRow, []int, error) {
	ledger := make(map[int]drawfolder.LedgerRow, len(in.Ledger))
	var doubled []int
	for _, r := range in.Ledger {
		ledger[r.Item] = r
		if r.Double {
			doubled = append(doubled, r.Item)
		}
	}
	slices.Sort(doubled)
	if len(doubled) == 0 {
		return nil, nil, inputerr.At(in.LedgerFile, 0, "double", "no item is marked for a second label").WithHint("draw with items marked for a second label, or judge without a second worksheet")
	}
	return ledger, doubled, nil
}

// rowLabel reads a worksheet row's label cell under the draw folder's one
// rule (drawfolder.ParseLabel) and returns the row with the label in its
// normal form, or the refusal of a cell that is no class, blank or unsure.
func rowLabel(file string, r drawfolder.WorksheetRow, classes []string) (drawfolder.WorksheetRow, error) {
	l, _, err := drawfolder.RowLabel(file, r, classes)
	r.Label = l
	return r, err
}

// indexFirst maps the doubled items to their rows in the first worksheet,
// checking they are there with the ledger's record id and a valid label.
func indexFirst(in Input, ledger map[int]drawfolder.LedgerRow, doubled []int, tb *Table) (map[int]drawfolder.WorksheetRow, error) {
	rows := make(map[int]drawfolder.WorksheetRow, len(in.First))
	for _, r := range in.First {
		rows[r.Item] = r
	}
	out := make(map[int]drawfolder.WorksheetRow, len(doubled))
	for _, item := range doubled {
		r, ok := rows[item]
		if !ok {
			return nil, inputerr.At(in.FirstFile, 0, "item", "item %d (record_id %q) is in the ledger but not in the worksheet", item, ledger[item].RecordID).WithHint("use the worksheet written by probity draw, with every row")
		}
		if r.RecordID != ledger[item].RecordID {
			return nil, inputerr.At(in.FirstFile, r.Line, "record_id", "item %d has record_id %q, but the ledger has %q", item, r.RecordID, ledger[item].RecordID).WithHint("the worksheet was edited after the draw; use the original file")
		}
		r, err := rowLabel(in.FirstFile, r, tb.Classes)
		if err != nil {
			return nil, err
		}
		out[item] = r
	}
	return out, nil
}

// indexSecond checks the second worksheet: every row a doubled ledger item
// with its record id and a valid label, every doubled item present.
func indexSecond(in Input, ledger map[int]drawfolder.LedgerRow, doubled []int, tb *Table) (map[int]drawfolder.WorksheetRow, error) {
	const again = "use the worksheet-second.csv written by probity draw for this draw folder"
	out := make(map[int]drawfolder.WorksheetRow, len(in.Second))
	for _, r := range in.Second {
		r, labelErr := rowLabel(in.SecondFile, r, tb.Classes)
		l, ok := ledger[r.Item]
		switch {
		case !ok:
			return nil, inputerr.At(in.SecondFile, r.Line, "item", "item %d is not in the ledger", r.Item).WithHint(again)
		case r.RecordID != l.RecordID:
			return nil, inputerr.At(in.SecondFile, r.Line, "record_id", "item %d has record_id %q, but the ledger has %q", r.Item, r.RecordID, l.RecordID).WithHint(again)
		case !l.Double:
			return nil, inputerr.At(in.SecondFile, r.Line, "item", "item %d (record_id %q) was not drawn for a second label", r.Item, r.RecordID).WithHint(again)
		case labelErr != nil:
			return nil, labelErr
		}
		out[r.Item] = r
	}
	var missing []int
	for _, item := range doubled {
		if _, ok := out[item]; !ok {
			missing = append(missing, item)
		}
	}
	if len(missing) > 0 {
		return nil, inputerr.At(in.SecondFile, 0, "item", "%d doubled items are missing: items %s", len(missing), itemList(missing, 10)).WithHint(again)
	}
	return out, nil
}

// indexAdjudications checks every adjudication row names a ledger item by
// its record id and a doubled one; rows for agreed items are refused by
// Resolve.
func indexAdjudications(in Input, ledger map[int]drawfolder.LedgerRow) (map[int]Adjudication, error) {
	out := make(map[int]Adjudication, len(in.Adjudications))
	for _, a := range in.Adjudications {
		l, ok := ledger[a.Item]
		switch {
		case !ok:
			return nil, inputerr.At(in.AdjudicationFile, a.Line, "item", "item %d is not in the ledger", a.Item).WithHint("remove the row or correct the item number")
		case a.RecordID != l.RecordID:
			return nil, inputerr.At(in.AdjudicationFile, a.Line, "record_id", "item %d has record_id %q, but the ledger has %q", a.Item, a.RecordID, l.RecordID).WithHint("correct the item number or the record_id")
		case !l.Double:
			return nil, inputerr.At(in.AdjudicationFile, a.Line, "item", "item %d was not doubled; only doubled items the labelers did not agree on are adjudicated", a.Item).WithHint("remove the row")
		}
		out[a.Item] = a
	}
	return out, nil
}
