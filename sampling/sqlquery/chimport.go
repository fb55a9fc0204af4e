package sqlquery

import (
	"bytes"
	"fmt"
	"io"

	"probity/plan"
	"probity/plan/inputerr"
	"probity/sampling"
	"probity/sampling/drawfolder"
)

// Counts is the result of a ClickHouse counts query that passed every
// check: it was made by the counts query this probity writes for the plan
// given, the table has no empty or repeated ids and no values a draw from
// a file would refuse, and the strata hold the rows in scope. Strata is the
// allocation sampling.Allocate gives for those counts; SelectionQuery
// writes the query that draws it.
type Counts struct {
	// Path, SHA256 and Bytes describe the counts file.
	Path   string
	SHA256 string
	Bytes  int64
	// Spec is the draw the counts were made for, with the plan's
	// candidates.
	Spec *Spec
	// Query is the counts query rebuilt from Spec and QuerySHA256 its
	// SHA-256.
	Query       string
	QuerySHA256 string
	// TableRows is the number of rows of the table; InScope those the
	// --where filters keep.
	TableRows int64
	InScope   int64
	// Strata is the allocation, sorted by label.
	Strata []sampling.StratumAllocation
	// Measures is, for a plan with measures, the design sized on these
	// strata (the manifest's measures block); nil otherwise.
	Measures *drawfolder.MeasuresInfo
}

// ReadCounts reads and checks the result of a ClickHouse counts query.
// p and fingerprint are the plan it must have been made for; stdin is read
// when path is "-". Every problem is a *inputerr.Error naming the
// file, line and column.
func ReadCounts(path string, stdin io.Reader, p *plan.File, fingerprint string) (*Counts, error) {
	data, err := readFile(path, stdin)
	if err != nil {
		return nil, err
	}
	t, err := readResult(path, data)
	if err != nil {
		return nil, err
	}
	if err := firstRowKind(t, KindCounts); err != nil {
		return nil, err
	}
	spec, countsSHA, err := checkDrawRow(t, p, fingerprint)
	if err != nil {
		return nil, err
	}
	if !spec.TwoStep() || countsSHA != "" {
		return nil, t.rowError(0, colDetail, "the counts row describes a %s draw, which has no counts query", spec.Dialect)
	}
	c := &Counts{Path: path, SHA256: drawfolder.SHA256Hex(data), Bytes: int64(len(data)), Spec: spec}
	if c.Query, err = CountsQuery(spec); err != nil {
		return nil, &inputerr.Error{File: path, Line: t.lines[0], Field: "detail", Msg: err.Error(), Err: err}
	}
	c.QuerySHA256 = drawfolder.SHA256Hex([]byte(c.Query))
	if c.TableRows, err = t.int64At(0, colStratumSize); err != nil {
		return nil, err
	}
	if err := checkValueColumns(t, spec); err != nil {
		return nil, err
	}
	for i, row := range t.rows {
		switch row[colKind] {
		case KindInScope, KindEmptyIDs, KindRepeatedRows, KindDuplicateIDs, KindDuplicateID, KindBadValue, KindStratum:
		case KindCounts:
			if i > 0 {
				return nil, t.rowError(i, colKind, "a second counts row; the file holds more than one result")
			}
		default:
			return nil, t.rowError(i, colKind, "unknown row kind %q in a counts result", row[colKind])
		}
	}
	if c.InScope, err = checkIDRows(t, spec.Dialect); err != nil {
		return nil, err
	}
	if err := checkLot(t, p, spec, c.InScope); err != nil {
		return nil, err
	}
	counts, _, err := stratumCounts(t)
	if err != nil {
		return nil, err
	}
	if c.Strata, c.Measures, err = allocateCounts(t, p, spec, counts, c.InScope, c.TableRows); err != nil {
		return nil, err
	}
	return c, nil
}

// ImportSelection reads and checks the result of the ClickHouse selection
// query printed for counts: it must name that counts file, count the same
// rows in the table and in each stratum (a table that changed between the
// two queries, or a shard that did not answer, gives other counts), hold
// the allocation computed from the counts, and hold in each stratum
// exactly its n_h + spares rows with the smallest keys, in key order, each
// key the SHA-256 of its seed and id. p and fingerprint are the plan; stdin
// is read when path is "-".
func ImportSelection(path string, stdin io.Reader, p *plan.File, fingerprint string, counts *Counts) (*Result, error) {
	data, err := readFile(path, stdin)
	if err != nil {
		return nil, err
	}
	t, err := readResult(path, data)
	if err != nil {
		return nil, err
	}
	if err := firstRowKind(t, KindDraw); err != nil {
		return nil, err
	}
	spec, countsSHA, err := checkDrawRow(t, p, fingerprint)
	if err != nil {
		return nil, err
	}
	if countsSHA != counts.SHA256 {
		return nil, t.rowError(0, colDetail, "the result was made from the counts file with SHA-256 %s, not from %s (%s)", short(countsSHA), counts.Path, short(counts.SHA256)).
			WithHint("import it with the counts file its selection query was printed from")
	}
	got, err := spec.MarshalDetail()
	if err != nil {
		return nil, err
	}
	want, err := counts.Spec.MarshalDetail()
	if err != nil {
		return nil, err
	}
	if !bytes.Equal(got, want) {
		return nil, t.rowError(0, colDetail, "the result describes another draw than its counts file %s", counts.Path)
	}
	res := &Result{Path: path, SHA256: drawfolder.SHA256Hex(data), Bytes: int64(len(data)), Items: map[string][]Item{},
		Spec: counts.Spec, TableRows: counts.TableRows, InScope: counts.InScope, Strata: counts.Strata, Counts: counts}
	if res.Query, err = SelectionQuery(counts); err != nil {
		return nil, &inputerr.Error{File: path, Line: t.lines[0], Field: "detail", Msg: err.Error(), Err: err}
	}
	res.QuerySHA256 = drawfolder.SHA256Hex([]byte(res.Query))
	if err := checkValueColumns(t, res.Spec); err != nil {
		return nil, err
	}
	for i, row := range t.rows {
		switch row[colKind] {
		case KindDraw, KindStratum, KindItem:
		default:
			return nil, t.rowError(i, colKind, "row kind %q does not belong in a selection result", row[colKind])
		}
	}
	const changed = "the table changed between the two queries, or a shard did not answer; check the cluster, then run both queries again"
	rows, err := t.int64At(0, colStratumSize)
	if err != nil {
		return nil, err
	}
	if rows != counts.TableRows {
		return nil, t.rowError(0, colStratumSize, "the selection query read %d rows of %s, but the counts query read %d", rows, res.Spec.Table, counts.TableRows).WithHint(changed)
	}
	recount, rowIdx, err := stratumCounts(t)
	if err != nil {
		return nil, err
	}
	if err := sameCounts(t, recount, rowIdx, counts); err != nil {
		return nil, err.WithHint(changed)
	}
	if err := checkClaims(t, counts.Strata, rowIdx); err != nil {
		return nil, err
	}
	if err := res.checkItems(t); err != nil {
		return nil, err
	}
	return res, nil
}

// sameCounts compares the strata the selection query counted with those
// of the counts file.
func sameCounts(t *resultTable, recount []sampling.StratumCount, rows []int, counts *Counts) *inputerr.Error {
	for i, a := range counts.Strata {
		if i >= len(recount) {
			return &inputerr.Error{File: t.name, Field: "stratum", Msg: fmt.Sprintf("stratum %q (%d rows when counted) has no rows in the selection result", a.Label, a.Population)}
		}
		r := recount[i]
		switch {
		case r.Label < a.Label:
			return t.rowError(rows[i], colStratum, "stratum %q is not among the strata counted in %s", r.Label, counts.Path)
		case r.Label > a.Label:
			return t.rowError(rows[i], colStratum, "stratum %q (%d rows when counted) has no rows in the selection result", a.Label, a.Population)
		case r.Population != a.Population:
			return t.rowError(rows[i], colStratumSize, "stratum %q has %d rows in the selection query, but %d when counted", a.Label, r.Population, a.Population)
		}
	}
	if len(recount) > len(counts.Strata) {
		i := len(counts.Strata)
		return t.rowError(rows[i], colStratum, "stratum %q is not among the strata counted in %s", recount[i].Label, counts.Path)
	}
	return nil
}
