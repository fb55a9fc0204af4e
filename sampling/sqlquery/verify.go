package sqlquery

import (
	"errors"
	"fmt"

	"probity/plan"
	"probity/plan/inputerr"
	"probity/sampling"
	"probity/sampling/drawfolder"
)

// stratumCounts reads the stratum rows: each label once, in byte order,
// with at least one row. rows[i] is the result row of counts[i].
func stratumCounts(t *resultTable) (counts []sampling.StratumCount, rows []int, err error) {
	seen := map[string]bool{}
	for i, row := range t.rows {
		if row[colKind] != KindStratum {
			continue
		}
		label := row[colStratum]
		if seen[label] {
			return nil, nil, t.rowError(i, colStratum, "stratum %q is listed twice", label)
		}
		seen[label] = true
		if n := len(counts); n > 0 && label < counts[n-1].Label {
			return nil, nil, t.rowError(i, colStratum, "stratum %q comes after %q; the rows are not in the query's order", label, counts[n-1].Label)
		}
		pop, err := t.int64At(i, colStratumSize)
		if err != nil {
			return nil, nil, err
		}
		if pop < 1 {
			return nil, nil, t.rowError(i, colStratumSize, "stratum %q has no rows", label)
		}
		counts = append(counts, sampling.StratumCount{Label: label, Population: pop})
		rows = append(rows, i)
	}
	return counts, rows, nil
}

// allocateCounts checks that the strata hold the rows in scope and
// allocates the sample among them as the draw from a file does.
func allocateCounts(t *resultTable, p *plan.File, s *Spec, counts []sampling.StratumCount, inScope, tableRows int64) ([]sampling.StratumAllocation, *drawfolder.MeasuresInfo, error) {
	if len(counts) == 0 {
		return nil, nil, &inputerr.Error{File: t.name, Msg: "the table " + s.Table + " has no rows in scope", Hint: "check the table name and the filter"}
	}
	var total int64
	for _, c := range counts {
		total += c.Population
	}
	if total != inScope {
		return nil, nil, &inputerr.Error{File: t.name, Field: "stratum_size", Msg: fmt.Sprintf("%d rows are in scope but the strata add up to %d", inScope, total)}
	}
	if inScope > tableRows {
		return nil, nil, t.rowError(0, colStratumSize, "the table has %d rows but %d are in scope", tableRows, inScope)
	}
	if s.Allocation == sampling.Measures {
		if p.Measures == nil {
			return nil, nil, t.rowError(0, colDetail, "the result was made for a plan with measures, but the plan has none")
		}
		bands := make([]sampling.Band, len(s.Bands))
		for i, text := range s.Bands {
			b, err := sampling.ParseBand(text)
			if err != nil {
				return nil, nil, t.rowError(0, colDetail, "band %q: %v", text, err)
			}
			bands[i] = b
		}
		alloc, info, err := sampling.AllocateMeasures(p, s.Strata, bands, s.Spare, counts)
		if err != nil {
			return nil, nil, inputerr.InFile(err, t.name)
		}
		return alloc, info, nil
	}
	if p.Measures != nil {
		return nil, nil, t.rowError(0, colDetail, "the plan has measures, but the result was made for a draw without them")
	}
	alloc, err := sampling.Allocate(counts, s.SampleSize, sampling.AllocOptions{Rule: s.Allocation, MinPerStratum: s.MinPerStratum, Spare: s.Spare, Rounding: s.Rounding})
	if err != nil {
		e := &inputerr.Error{File: t.name, Msg: err.Error(), Err: err}
		if errors.Is(err, sampling.ErrSampleTooLarge) {
			e.Msg = fmt.Sprintf("the plan needs a sample of %d but only %d rows are in scope", s.SampleSize, inScope)
			e.Hint = "check the table and the filters"
		}
		return nil, nil, e
	}
	return alloc, nil, nil
}

// checkClaims checks the n_h and spares each stratum row claims (rows[i]
// is the row of alloc[i]) and their sums on the draw row.
func checkClaims(t *resultTable, alloc []sampling.StratumAllocation, rows []int) error {
	var sumSample, sumSpare int64
	for i, a := range alloc {
		r := rows[i]
		sample, err := t.int64At(r, colStratumSample)
		if err != nil {
			return err
		}
		spare, err := t.int64At(r, colStratumSpare)
		if err != nil {
			return err
		}
		if sample != int64(a.Sample) {
			return t.rowError(r, colStratumSample, "stratum %q: the result allocates %d items but its %d rows get %d", a.Label, sample, a.Population, a.Sample)
		}
		if spare != int64(a.Spare) {
			return t.rowError(r, colStratumSpare, "stratum %q: the result draws %d spares but should draw %d", a.Label, spare, a.Spare)
		}
		sumSample += int64(a.Sample)
		sumSpare += int64(a.Spare)
	}
	for _, f := range []struct {
		col  int
		want int64
	}{{colStratumSample, sumSample}, {colStratumSpare, sumSpare}} {
		got, err := t.int64At(0, f.col)
		if err != nil {
			return err
		}
		if got != f.want {
			return t.rowError(0, f.col, "the draw row says %d, but the strata add up to %d", got, f.want)
		}
	}
	return nil
}

// checkStrata reads the stratum rows and checks them against the table's
// row count and against sampling.Allocate on the same counts.
func (res *Result) checkStrata(t *resultTable, p *plan.File) error {
	counts, rows, err := stratumCounts(t)
	if err != nil {
		return err
	}
	alloc, _, err := allocateCounts(t, p, res.Spec, counts, res.InScope, res.TableRows)
	if err != nil {
		return err
	}
	if err := checkClaims(t, alloc, rows); err != nil {
		return err
	}
	res.Strata = alloc
	return nil
}

// checkItems reads the selected rows and checks each key against its id
// and seed, each row's stratum figures, and that every stratum holds
// exactly its n_h + spares rows, ranked 1, 2, … in increasing key order.
func (res *Result) checkItems(t *resultTable) error {
	byLabel := map[string]sampling.StratumAllocation{}
	for _, a := range res.Strata {
		byLabel[a.Label] = a
	}
	seen := map[string]int{}
	for i, row := range t.rows {
		switch row[colKind] {
		case KindDraw, KindInScope, KindEmptyIDs, KindDuplicateIDs, KindDuplicateID, KindBadValue, KindStratum:
			if i > 0 && row[colKind] == KindDraw {
				return t.rowError(i, colKind, "a second draw row; the file holds more than one result")
			}
			continue
		case KindItem:
		default:
			return t.rowError(i, colKind, "unknown row kind %q", row[colKind])
		}
		id, label, key := row[colRecordID], row[colStratum], row[colKey]
		if prev, ok := seen[id]; ok {
			return t.rowError(i, colRecordID, "record %q is selected twice (also line %d)", id, prev)
		}
		seen[id] = t.lines[i]
		a, ok := byLabel[label]
		if !ok {
			return t.rowError(i, colStratum, "record %q is in stratum %q, which has no stratum row", id, label)
		}
		if want := sampling.Key(res.Spec.SelectionSeed, id); key != want {
			return t.rowError(i, colKey, "the key of record %q is not SHA-256(\"<selection seed>:%s\") (expected %s)", id, id, want).WithHint("the result was edited, or made by another query; run the printed query again")
		}
		for _, f := range []struct {
			col  int
			want int64
		}{{colStratumSize, a.Population}, {colStratumSample, int64(a.Sample)}, {colStratumSpare, int64(a.Spare)}} {
			got, err := t.int64At(i, f.col)
			if err != nil {
				return err
			}
			if got != f.want {
				return t.rowError(i, f.col, "record %q: %d, but stratum %q has %d", id, got, label, f.want)
			}
		}
		items := res.Items[label]
		// A two-step (ClickHouse) result has no ranks: without window
		// functions the engine writes each stratum's rows in key order,
		// and the rank is the row's place among them.
		rank := int64(len(items) + 1)
		if !res.Spec.Dialect.TwoStep() {
			r, err := t.int64At(i, colStratumRank)
			if err != nil {
				return err
			}
			rank = r
		}
		if rank != int64(len(items)+1) {
			return t.rowError(i, colStratumRank, "record %q has rank %d in stratum %q, expected %d (rows missing, repeated or out of order)", id, rank, label, len(items)+1)
		}
		if n := len(items); n > 0 && key <= items[n-1].Key {
			return t.rowError(i, colKey, "record %q has a key not above that of rank %d in its stratum", id, n)
		}
		if rank > int64(a.Sample+a.Spare) {
			return t.rowError(i, colStratumRank, "stratum %q has more rows than its %d items and %d spares", label, a.Sample, a.Spare)
		}
		res.Items[label] = append(items, Item{Line: t.lines[i], RecordID: id, Stratum: label, Key: key, Values: append([]string(nil), row[fixedColumns:]...)})
	}
	for _, a := range res.Strata {
		if got := len(res.Items[a.Label]); got != a.Sample+a.Spare {
			return &inputerr.Error{File: t.name, Field: "stratum", Msg: fmt.Sprintf("stratum %q has %d rows in the result, but its %d items and %d spares need %d", a.Label, got, a.Sample, a.Spare, a.Sample+a.Spare),
				Hint: "save the whole result of the query"}
		}
	}
	return nil
}
