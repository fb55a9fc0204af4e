package sqlquery

import (
	"slices"
	"sort"

	"probity/plan/inputerr"
	"probity/sampling"
	"probity/sampling/drawfolder"
)

// Folder turns a checked result into the draw folder's content, laid out
// as the draw from a file lays it out: the sample in ascending key order,
// then the spares in key order; the first Spec.Double sample items marked
// for a second label; each candidate's prediction from its column's value.
// The manifest records the engine, the table and the query's SHA-256 (for
// a two-step draw also those of the counts file and query), and describes
// the result file as the log that was read (with the table's row count).
func (res *Result) Folder(toolVersion string) (*drawfolder.Content, error) {
	s := res.Spec
	values := s.valueColumns()
	var sample, spares []*Item
	var sampleRows, spareRows []drawfolder.LedgerRow
	for _, a := range res.Strata {
		for j := range res.Items[a.Label] {
			it := &res.Items[a.Label][j]
			lr := drawfolder.LedgerRow{RecordID: it.RecordID, Stratum: a.Label, StratumSize: a.Population, StratumSample: a.Sample,
				Weight: a.Weight, Key: it.Key, Spare: j >= a.Sample}
			if lr.Spare {
				spares, spareRows = append(spares, it), append(spareRows, lr)
			} else {
				sample, sampleRows = append(sample, it), append(sampleRows, lr)
			}
		}
	}
	sortByKey(sampleRows, sample)
	sortByKey(spareRows, spares)
	rows := append(sampleRows, spareRows...)
	items := append(sample, spares...)

	f := &drawfolder.Content{Show: append([]string{}, s.Show...)}
	for _, c := range s.Candidates {
		f.Candidates = append(f.Candidates, c.Name)
	}
	for i := range rows {
		it := items[i]
		rows[i].Item = i + 1
		rows[i].Double = !rows[i].Spare && i < s.Double
		rows[i].Predictions = make([]string, len(s.Candidates))
		for ci, c := range s.Candidates {
			vi := slices.Index(values, c.Columns()[0])
			v, err := c.Predict(it.Values[vi])
			if err != nil {
				return nil, &inputerr.Error{File: res.Path, Line: it.Line, Field: ResultHeader(vi + 1)[fixedColumns+vi],
					Msg: "candidate " + c.Name + ": " + err.Error()}
			}
			rows[i].Predictions[ci] = v
		}
		w := drawfolder.WorksheetRow{Item: i + 1, RecordID: it.RecordID, Spare: rows[i].Spare}
		for _, col := range s.Show {
			w.Show = append(w.Show, it.Values[slices.Index(values, col)])
		}
		f.Worksheet = append(f.Worksheet, w)
		if rows[i].Double {
			f.Second = append(f.Second, w)
		}
	}
	f.Ledger = rows
	f.Manifest = res.manifest(toolVersion, len(sampleRows), len(spareRows))
	return f, nil
}

// manifest describes the draw, with the same fields as a draw from a file
// plus the engine.
func (res *Result) manifest(toolVersion string, sample, spares int) *drawfolder.Manifest {
	s := res.Spec
	m := &drawfolder.Manifest{
		Format: drawfolder.ManifestFormat, ToolVersion: toolVersion, PlanFingerprint: s.PlanFingerprint,
		Seed: s.Seed, SelectionSeed: s.SelectionSeed, KeyDefinition: sampling.KeyDefinition,
		Log: drawfolder.LogInfo{Path: res.Path, SHA256: res.SHA256, Bytes: res.Bytes, Rows: res.TableRows,
			Format: "csv", Compression: "none"},
		IDColumn:      s.IDColumn,
		StrataColumns: append([]string{}, s.Strata...),
		Bands:         append([]string(nil), s.Bands...),
		Where:         append([]string(nil), s.Where...),
		ShowColumns:   append([]string{}, s.Show...),
		Allocation:    drawfolder.AllocationInfo{Rule: ruleName(s.Allocation), MinPerStratum: s.MinPerStratum, Spare: s.Spare, Rounding: s.roundingName()},
		Double:        s.Double,
		LotSize:       res.InScope,
		SampleSize:    sample,
		Spares:        spares,
		Engine:        &drawfolder.EngineInfo{Dialect: string(s.Dialect), Table: s.Table, QuerySHA256: res.QuerySHA256},
	}
	if c := res.Counts; c != nil {
		m.Engine.CountsSHA256, m.Engine.CountsQuerySHA256 = c.SHA256, c.QuerySHA256
		m.Measures = c.Measures
	}
	if s.Period != "" {
		m.Period = s.Period
		m.PeriodSeed = s.SelectionSeed
	}
	for _, a := range res.Strata {
		m.Strata = append(m.Strata, drawfolder.StratumInfo{Label: a.Label, Population: a.Population, Sample: a.Sample,
			Spare: a.Spare, Weight: a.Weight})
	}
	m.Allocation.Note = sampling.AllocationNote(res.Strata, s.SampleSize, s.MinPerStratum, s.roundingName())
	return m
}

// ruleName is the allocation rule as the manifest names it.
func ruleName(r string) string {
	if r == "" {
		return sampling.Proportional
	}
	return r
}

// sortByKey orders ledger rows and their items by key (lowercase hex of
// equal length, so string order is key order).
func sortByKey(rows []drawfolder.LedgerRow, items []*Item) {
	idx := make([]int, len(rows))
	for i := range idx {
		idx[i] = i
	}
	sort.Slice(idx, func(a, b int) bool { return items[idx[a]].Key < items[idx[b]].Key })
	r2 := make([]drawfolder.LedgerRow, len(rows))
	i2 := make([]*Item, len(items))
	for i, j := range idx {
		r2[i], i2[i] = rows[j], items[j]
	}
	copy(rows, r2)
	copy(items, i2)
}
