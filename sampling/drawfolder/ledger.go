package drawfolder

import (
	"io"
	"math"
	"strconv"
)

// LedgerRow is one row of ledger.csv, kept by the audit owner. Columns, in
// order: item, record_id, stratum, stratum_size, stratum_sample, weight,
// key, spare, double, then one column per candidate (named as the
// candidate) with its prediction.
type LedgerRow struct {
	Item          int      // 1-based position in the worksheet
	RecordID      string   // the log's id
	Stratum       string   // stratum label (values joined with "|")
	StratumSize   int64    // N_h
	StratumSample int      // n_h (spares not counted)
	Weight        float64  // N_h / n_h
	Key           string   // lowercase hex SHA-256 of "<seed>:<record id>"
	Spare         bool     // drawn as a spare
	Predictions   []string // one per plan candidate, in plan order
	// Double marks an item that also goes to worksheet-second.csv for an
	// independent second label.
	Double bool
}

// LedgerFixedColumns are the first columns of ledger.csv, before one column
// per candidate.
var LedgerFixedColumns = []string{"item", "record_id", "stratum", "stratum_size", "stratum_sample", "weight", "key", "spare", "double"}

// LedgerHeader returns ledger.csv's header for the given candidate names
// (in plan order).
func LedgerHeader(candidates []string) []string {
	h := append([]string{}, LedgerFixedColumns...)
	return append(h, candidates...)
}

// WriteLedger writes ledger.csv: the header, then one line per row in the
// order given (the draw writes them in worksheet order: spares last).
func WriteLedger(w io.Writer, candidates []string, rows []LedgerRow) error {
	out := make([][]string, 0, len(rows)+1)
	out = append(out, LedgerHeader(candidates))
	for _, r := range rows {
		rec := make([]string, 0, len(LedgerFixedColumns)+len(candidates))
		rec = append(rec,
			strconv.Itoa(r.Item), CellText(r.RecordID), CellText(r.Stratum),
			strconv.FormatInt(r.StratumSize, 10), strconv.Itoa(r.StratumSample),
			formatFloat(r.Weight), r.Key, formatBool(r.Spare), formatBool(r.Double))
		rec = append(rec, cellTexts(r.Predictions)...)
		for len(rec) < len(LedgerFixedColumns)+len(candidates) {
			rec = append(rec, "")
		}
		out = append(out, rec)
	}
	return writeCSV(w, out)
}

// ReadLedger reads ledger.csv and checks its header: item, record_id,
// stratum, stratum_size, stratum_sample, weight, key, spare, double, then
// the candidate names in plan order. (A ledger without the double column,
// from before double labeling, is also read; Double is then false.) Every
// field is checked; errors are *inputerr.Error naming file, line and column.
func ReadLedger(path string, candidates []string) ([]LedgerRow, error) {
	t, err := readCSVTable(path, "ledger")
	if err != nil {
		return nil, err
	}
	return ledgerFromTable(path, t, candidates)
}

func ledgerFromTable(name string, t *CSVTable, candidates []string) ([]LedgerRow, error) {
	want := LedgerHeader(candidates)
	hasDouble := len(t.Header) != len(want)-1
	if !hasDouble {
		want = append(append([]string{}, LedgerFixedColumns[:8]...), candidates...)
	}
	if err := CheckHeader(name, t.Header, want); err != nil {
		return nil, err
	}
	first := 8
	if hasDouble {
		first = 9
	}
	rows := make([]LedgerRow, 0, len(t.Rows))
	items := map[int]int{}
	ids := map[string]int{}
	for i, rec := range t.Rows {
		line := t.Lines[i]
		var r LedgerRow
		var err error
		if r.Item, err = parseItem(name, line, "item", rec[0]); err != nil {
			return nil, err
		}
		if prev, ok := items[r.Item]; ok {
			return nil, inputErrorf(name, line, "item", "item %d appears twice (lines %d and %d)", r.Item, prev, line)
		}
		items[r.Item] = line
		r.RecordID = CellValue(rec[1])
		if r.RecordID == "" {
			return nil, inputErrorf(name, line, "record_id", "record_id is empty")
		}
		if prev, ok := ids[r.RecordID]; ok {
			return nil, inputErrorf(name, line, "record_id", "record_id %q appears twice (lines %d and %d)", r.RecordID, prev, line)
		}
		ids[r.RecordID] = line
		r.Stratum = CellValue(rec[2])
		if r.StratumSize, err = strconv.ParseInt(rec[3], 10, 64); err != nil || r.StratumSize < 1 {
			return nil, inputErrorf(name, line, "stratum_size", "%q is not a whole number of at least 1", rec[3])
		}
		if r.StratumSample, err = strconv.Atoi(rec[4]); err != nil || r.StratumSample < 0 || int64(r.StratumSample) > r.StratumSize {
			return nil, inputErrorf(name, line, "stratum_sample", "%q is not a whole number between 0 and stratum_size %d", rec[4], r.StratumSize)
		}
		if r.Weight, err = strconv.ParseFloat(rec[5], 64); err != nil || math.IsNaN(r.Weight) || math.IsInf(r.Weight, 0) || r.Weight < 0 {
			return nil, inputErrorf(name, line, "weight", "%q is not a non-negative number", rec[5])
		}
		r.Key = rec[6]
		if !isKey(r.Key) {
			return nil, inputErrorf(name, line, "key", "%q is not 64 lowercase hex digits", r.Key)
		}
		if r.Spare, err = parseBool(name, line, "spare", rec[7]); err != nil {
			return nil, err
		}
		if hasDouble {
			if r.Double, err = parseBool(name, line, "double", rec[8]); err != nil {
				return nil, err
			}
		}
		r.Predictions = cellValues(rec[first:])
		rows = append(rows, r)
	}
	return rows, nil
}
