package demolog

import (
	"fmt"
	"probity/sampling/drawfolder"
)

// Labeler is an invented person who labels in the demo.
const Labeler = "Maren Tøllefsen"

// unsureNote is what the simulated labeler writes beside an item it cannot
// judge.
const unsureNote = "scan trace too noisy to judge; sent back for a rescan"

// LabelingSummary says what the simulated labeling did.
type LabelingSummary struct {
	// Labeled counts items given a class label (main items and spares).
	Labeled int
	// Unsure lists the record ids marked unsure.
	Unsure []string
	// SparesUsed lists the spare record ids labeled in their place.
	SparesUsed []string
}

// Label fills a worksheet the way a careful expert would: every main item
// gets its hidden true label, except the main items at the 1-based
// positions in unsureAt (counted among main items), which are marked
// `unsure`; each of those is replaced by the next unused spare of its
// stratum, in key order, which is labeled. ledger gives each item's stratum
// and whether it is a spare; rows are the worksheet's rows in order.
func (s Scenario) Label(rows []drawfolder.WorksheetRow, ledger []drawfolder.LedgerRow, unsureAt []int) ([]drawfolder.WorksheetRow, LabelingSummary, error) {
	var sum LabelingSummary
	if len(rows) != len(ledger) {
		return nil, sum, fmt.Errorf("worksheet has %d rows but the ledger %d", len(rows), len(ledger))
	}
	unsure := map[int]bool{}
	for _, p := range unsureAt {
		unsure[p] = true
	}
	out := make([]drawfolder.WorksheetRow, len(rows))
	copy(out, rows)
	needSpare := map[string]int{} // stratum → spares still to label
	main := 0
	for i := range out {
		l := ledger[i]
		if out[i].RecordID != l.RecordID {
			return nil, sum, fmt.Errorf("worksheet item %d is %s but the ledger has %s", out[i].Item, out[i].RecordID, l.RecordID)
		}
		if l.Spare {
			continue
		}
		main++
		if unsure[main] {
			out[i].Label, out[i].Note, out[i].Labeler = drawfolder.Unsure, unsureNote, Labeler
			sum.Unsure = append(sum.Unsure, l.RecordID)
			needSpare[l.Stratum]++
			continue
		}
		if err := s.labelRow(&out[i]); err != nil {
			return nil, sum, err
		}
		sum.Labeled++
	}
	// Spares are used in key order within their stratum, as the record step
	// requires; the worksheet is already in key order.
	for i := range out {
		l := ledger[i]
		if !l.Spare || needSpare[l.Stratum] == 0 {
			continue
		}
		needSpare[l.Stratum]--
		if err := s.labelRow(&out[i]); err != nil {
			return nil, sum, err
		}
		sum.Labeled++
		sum.SparesUsed = append(sum.SparesUsed, l.RecordID)
	}
	for stratum, left := range needSpare {
		if left > 0 {
			return nil, sum, fmt.Errorf("stratum %s ran out of spares (%d more needed)", stratum, left)
		}
	}
	return out, sum, nil
}

func (s Scenario) labelRow(r *drawfolder.WorksheetRow) error {
	t := s.Truth(r.RecordID)
	if t == "" {
		return fmt.Errorf("record %s is not in the scenario's log", r.RecordID)
	}
	r.Label, r.Labeler = t, Labeler
	return nil
}
