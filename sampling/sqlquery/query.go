package sqlquery

import (
	"fmt"
	"strconv"
	"strings"

	"probity/sampling"
)

// Result kinds: the value of the first column of each result row.
const (
	KindDraw         = "draw"          // one row: the Spec (detail), the table's rows, Σ n_h, Σ spares
	KindInScope      = "in_scope"      // one row: rows left by --where
	KindEmptyIDs     = "empty_ids"     // one row: rows whose id is NULL or empty
	KindDuplicateIDs = "duplicate_ids" // one row: ids in scope that occur more than once
	KindDuplicateID  = "duplicate_id"  // up to 3 rows: such an id and its count
	KindRepeatedRows = "repeated_rows" // one row (ClickHouse counts): rows in scope beyond the first of each id
	KindBadValue     = "bad_value"     // per problem: rows a draw from a file would refuse
	KindStratum      = "stratum"       // one row per stratum: N_h, n_h, spares
	KindItem         = "item"          // one row per selected item or spare
)

// maxDuplicateExamples is how many duplicate ids the result names.
const maxDuplicateExamples = 3

// ResultHeader returns the result's column names: kind, record_id,
// stratum, stratum_size, stratum_sample, stratum_spare, stratum_rank, key,
// detail, then value_1 … value_k holding the log columns listed in the
// draw row's detail ("values").
func ResultHeader(values int) []string {
	h := []string{"kind", "record_id", "stratum", "stratum_size", "stratum_sample", "stratum_spare", "stratum_rank", "key", "detail"}
	for i := 1; i <= values; i++ {
		h = append(h, "value_"+strconv.Itoa(i))
	}
	return h
}

// Query returns the SQL text of the draw described by s: one statement
// whose result, saved as CSV with a header (psql --csv, COPY … TO … CSV
// HEADER, or DuckDB's COPY), is what Import reads. The text is a pure
// function of s.
func Query(s *Spec) (string, error) {
	if s.TwoStep() {
		return "", specError("dialect", "%s draws in two steps, a counts query and a selection query", twoStepName(s))
	}
	return sqlQuery(s, stepOne, nil)
}

// twoStepName names what draws in two steps, for a message: the dialect,
// or a plan with measures.
func twoStepName(s *Spec) string {
	if s.Allocation == sampling.Measures {
		return "a plan with measures"
	}
	return string(s.Dialect)
}

// queryStep says which query sqlQuery writes.
type queryStep int

const (
	// stepOne is the one query that counts, allocates and selects.
	stepOne queryStep = iota
	// stepCounts is the first query of a two-step draw: the checks of
	// the table and the stratum counts, nothing selected.
	stepCounts
	// stepSelection is the second: the allocation computed by probity
	// from the counts file, the strata counted again, the rows selected.
	stepSelection
)

// sqlQuery writes a PostgreSQL or DuckDB query: the one query of a draw
// (stepOne), or either query of a two-step draw (a plan with measures,
// whose allocation is computed by probity from the counts: see
// CountsQuery and SelectionQuery). counts is set for stepSelection.
func sqlQuery(s *Spec, step queryStep, counts *Counts) (string, error) {
	q, err := newQuoter(s)
	if err != nil {
		return "", err
	}
	d := s.Dialect
	countsSHA := ""
	if counts != nil {
		countsSHA = counts.SHA256
	}
	detail, err := s.marshalDetail(countsSHA)
	if err != nil {
		return "", err
	}
	detailLit, err := d.QuoteLiteral(string(detail))
	if err != nil {
		return "", specError("", "%w", err)
	}
	seedLit, err := d.QuoteLiteral(s.SelectionSeed + ":")
	if err != nil {
		return "", specError("selection_seed", "%w", err)
	}
	label, err := q.labelExpr()
	if err != nil {
		return "", err
	}
	var alloc string
	switch step {
	case stepOne:
		alloc, err = allocationCTEs(s)
	case stepSelection:
		alloc, err = givenAllocationCTEs(d, counts)
	}
	if err != nil {
		return "", err
	}
	values := s.valueColumns()
	txt := d.textType()

	var b strings.Builder
	w := func(format string, args ...any) { fmt.Fprintf(&b, format, args...) }
	switch step {
	case stepOne:
		w("-- probity draw query, format %d, written by probity %s for %s.\n", QueryFormat, oneLine(s.ToolVersion), d)
		w("-- plan %s, selection seed %s.\n", oneLine(s.PlanFingerprint), oneLine(s.SelectionSeed))
		w("-- Save the result as CSV with a header and import it with\n")
		w("--   probity draw --plan PLAN --selected RESULT.csv --out DIR\n")
	case stepCounts:
		w("-- probity counts query (step 1 of 2), format %d, written by probity %s for %s.\n", QueryFormat, oneLine(s.ToolVersion), d)
		w("-- plan %s, selection seed %s.\n", oneLine(s.PlanFingerprint), oneLine(s.SelectionSeed))
		w("-- Save the result as CSV with a header and print the selection query with\n")
		w("--   probity draw --plan PLAN --sql %s --counts counts.csv > selection.sql\n", d)
	case stepSelection:
		w("-- probity selection query (step 2 of 2), format %d, written by probity %s for %s.\n", QueryFormat, oneLine(s.ToolVersion), d)
		w("-- plan %s, selection seed %s.\n", oneLine(s.PlanFingerprint), oneLine(s.SelectionSeed))
		w("-- counts file sha256 %s: %d strata, %d rows in scope of %d.\n", counts.SHA256, len(counts.Strata), counts.InScope, counts.TableRows)
		w("-- Save the result as CSV with a header and import it with\n")
		w("--   probity draw --plan PLAN --counts counts.csv --selected RESULT.csv --out DIR\n")
	}
	w("-- The import rebuilds this text from the result's first row; an edited\n")
	w("-- query gives a result whose manifest names a query that was not run.\n")
	w("WITH RECURSIVE\n")
	// raw: each column the draw reads, as text, and each band value as a
	// number, computed once per row (OFFSET 0 keeps the planner from
	// copying these expressions into every use); base: whether the row is
	// in scope, its stratum label and the first problem a draw from a file
	// would refuse.
	w("base AS (\n  SELECT r.record_id,\n    %s AS in_scope,\n    %s AS stratum,\n    %s AS bad", q.scopeExpr(), d.binaryText(label), q.badExpr())
	for i := range values {
		w(",\n    r.v%d", i+1)
	}
	w("\n  FROM (\n    SELECT %s AS record_id", d.binaryText(d.text("t."+q.id)))
	for _, c := range q.rawColumns() {
		w(",\n      %s AS %s", d.binaryText(q.valueText(c)), q.raw[c])
	}
	for i, b := range q.bands {
		w(",\n      %s AS b%d", q.bandNumber(b), i+1)
	}
	for i, c := range values {
		w(",\n      %s AS v%d", q.valueText(c), i+1)
	}
	w("\n    FROM %s AS t\n    OFFSET 0\n  ) AS r\n),\n", q.table)
	w("src AS (\n  SELECT * FROM base WHERE in_scope\n),\n")
	if step != stepCounts {
		w("keyed AS (\n  SELECT s.*, %s AS k\n  FROM src AS s\n),\n", d.keyExpr(seedLit, "s.record_id"))
	}
	w("counts AS (\n  SELECT stratum, count(*) AS n_pop\n  FROM src\n  GROUP BY stratum\n),\n")
	b.WriteString(alloc)
	if step != stepCounts {
		// ranked sorts the rows in scope by stratum and key with their
		// values: one sort, and no join back to the table, whose plan
		// would depend on the planner's row estimates.
		w("ranked AS (\n  SELECT y.*, row_number() OVER (PARTITION BY y.stratum ORDER BY y.k) AS rnk\n  FROM keyed AS y\n),\n")
	}
	if step != stepSelection {
		w("dups AS (\n  SELECT record_id, count(*) AS n\n  FROM src\n  WHERE record_id <> ''\n  GROUP BY record_id\n  HAVING count(*) > 1\n),\n")
		w("bads AS (\n  SELECT bad, count(*) AS n, min(record_id%s) AS first_id\n  FROM src\n  WHERE bad IS NOT NULL\n  GROUP BY bad\n),\n", d.byteOrder())
	}
	w("tally AS (\n  SELECT count(*) AS n_all, sum(CASE WHEN in_scope THEN 1 ELSE 0 END) AS n_scope,\n")
	w("    sum(CASE WHEN record_id IS NULL OR record_id = '' THEN 1 ELSE 0 END) AS n_empty\n  FROM base\n),\n")
	// out: every result row with a section number and a sort key.
	nulls := func(n int) string { return strings.Repeat(", NULL", n) }
	w("out AS (\n")
	first := KindDraw
	sums := "    CAST((SELECT COALESCE(sum(n_sample), 0) FROM alloc) AS bigint) AS stratum_sample,\n" +
		"    CAST((SELECT COALESCE(sum(n_spare), 0) FROM alloc) AS bigint) AS stratum_spare,\n"
	if step == stepCounts {
		first = KindCounts
		sums = "    CAST(NULL AS bigint) AS stratum_sample, CAST(NULL AS bigint) AS stratum_spare,\n"
	}
	w("  SELECT 1 AS sec, CAST(NULL AS %s) AS sk, '%s' AS kind, CAST(NULL AS %s) AS record_id, CAST(NULL AS %s) AS stratum,\n", txt, first, txt, txt)
	w("    CAST((SELECT n_all FROM tally) AS bigint) AS stratum_size,\n")
	b.WriteString(sums)
	w("    CAST(NULL AS bigint) AS stratum_rank, CAST(NULL AS %s) AS key, CAST(%s AS %s) AS detail%s\n", txt, detailLit, txt, valueNulls(len(values), txt))
	if step != stepSelection {
		w("  UNION ALL\n  SELECT 2, NULL, '%s', NULL, NULL, CAST(COALESCE((SELECT n_scope FROM tally), 0) AS bigint), NULL, NULL, NULL, NULL, NULL%s\n", KindInScope, nulls(len(values)))
		w("  UNION ALL\n  SELECT 3, NULL, '%s', NULL, NULL, CAST(COALESCE((SELECT n_empty FROM tally), 0) AS bigint), NULL, NULL, NULL, NULL, NULL%s\n", KindEmptyIDs, nulls(len(values)))
		w("  UNION ALL\n  SELECT 4, NULL, '%s', NULL, NULL, (SELECT count(*) FROM dups), NULL, NULL, NULL, NULL, NULL%s\n", KindDuplicateIDs, nulls(len(values)))
		w("  UNION ALL\n  SELECT 5, e.record_id, '%s', e.record_id, NULL, e.n, NULL, NULL, NULL, NULL, NULL%s\n", KindDuplicateID, nulls(len(values)))
		w("  FROM (SELECT record_id, n FROM dups ORDER BY record_id%s LIMIT %d) AS e\n", d.byteOrder(), maxDuplicateExamples)
		w("  UNION ALL\n  SELECT 6, x.bad, '%s', x.first_id, NULL, x.n, NULL, NULL, NULL, NULL, x.bad%s\n  FROM bads AS x\n", KindBadValue, nulls(len(values)))
	}
	if step == stepCounts {
		w("  UNION ALL\n  SELECT 7, c.stratum, '%s', NULL, c.stratum, c.n_pop, NULL, NULL, NULL, NULL, NULL%s\n  FROM counts AS c\n)\n", KindStratum, nulls(len(values)))
	} else {
		w("  UNION ALL\n  SELECT 7, a.stratum, '%s', NULL, a.stratum, a.n_pop, a.n_sample, a.n_spare, NULL, NULL, NULL%s\n  FROM alloc AS a\n", KindStratum, nulls(len(values)))
		w("  UNION ALL\n  SELECT 8, %s, '%s', r.record_id, r.stratum, a.n_pop, a.n_sample, a.n_spare, r.rnk, %s, NULL", d.hex("r.k"), KindItem, d.hex("r.k"))
		for i := range values {
			w(", r.v%d", i+1)
		}
		w("\n  FROM ranked AS r\n  JOIN alloc AS a ON a.stratum = r.stratum\n  WHERE r.rnk <= a.n_sample + a.n_spare\n)\n")
	}
	w("SELECT kind, record_id, stratum, stratum_size, stratum_sample, stratum_spare, stratum_rank, key, detail")
	for i := range values {
		w(", v%d AS value_%d", i+1, i+1)
	}
	w("\nFROM out\nORDER BY sec, sk%s;\n", d.byteOrder())
	return b.String(), nil
}

// scopeExpr is true for the rows every --where filter keeps: the column's
// text (NULL read as NullText) is one of the listed values.
func (q *quoter) scopeExpr() string {
	if len(q.filters) == 0 {
		return "true"
	}
	var conds []string
	for _, f := range q.filters {
		lits := make([]string, len(f.Values))
		for i, v := range f.Values {
			lits[i], _ = q.s.Dialect.QuoteLiteral(v)
		}
		conds = append(conds, "(r."+q.raw[f.Column]+" IN ("+strings.Join(lits, ", ")+"))")
	}
	return strings.Join(conds, " AND ")
}

// valueNulls is the typed NULL value columns of the first result row,
// which fix the union's column types.
func valueNulls(n int, txt string) string {
	var b strings.Builder
	for i := 1; i <= n; i++ {
		fmt.Fprintf(&b, ", CAST(NULL AS %s) AS v%d", txt, i)
	}
	return b.String()
}

// oneLine keeps a value printed in a comment on one line.
func oneLine(s string) string {
	return strings.NewReplacer("\n", `\n`, "\r", `\r`).Replace(s)
}

// quoter holds the parsed bands and filters and the quoted names a query
// uses.
type quoter struct {
	s       *Spec
	table   string
	id      string
	cols    map[string]string
	bands   []sampling.Band
	filters []sampling.Filter
	// raw names the inner column holding each strata or --where column's
	// text (s1, s2, …).
	raw map[string]string
}

// rawColumns lists the strata and --where columns, each once, in order.
func (q *quoter) rawColumns() []string {
	var cols []string
	seen := map[string]bool{}
	for _, c := range q.s.Strata {
		if !seen[c] {
			seen[c] = true
			cols = append(cols, c)
		}
	}
	for _, f := range q.filters {
		if !seen[f.Column] {
			seen[f.Column] = true
			cols = append(cols, f.Column)
		}
	}
	return cols
}

// newQuoter validates s and quotes every name it uses.
func newQuoter(s *Spec) (*quoter, error) {
	if _, err := ParseDialect(string(s.Dialect)); err != nil {
		return nil, specError("dialect", "%w", err)
	}
	if err := s.validate(); err != nil {
		return nil, err
	}
	q := &quoter{s: s, cols: map[string]string{}}
	var err error
	if q.table, err = s.Dialect.QuoteTable(s.Table); err != nil {
		return nil, specError("table", "%s: %w", s.Table, err)
	}
	if q.id, err = s.Dialect.QuoteIdent(s.IDColumn); err != nil {
		return nil, specError("id_column", "%s: %w", s.IDColumn, err)
	}
	for _, t := range s.Bands {
		b, err := sampling.ParseBand(t)
		if err != nil {
			return nil, specError("bands", "%w", err)
		}
		q.bands = append(q.bands, b)
	}
	for _, t := range s.Where {
		f, err := sampling.ParseFilter(t)
		if err != nil {
			return nil, specError("where", "%w", err)
		}
		q.filters = append(q.filters, f)
	}
	names := append([]string{}, s.Strata...)
	for _, b := range q.bands {
		names = append(names, b.Column)
	}
	for _, f := range q.filters {
		names = append(names, f.Column)
	}
	names = append(names, s.valueColumns()...)
	q.raw = map[string]string{}
	for i, c := range q.rawColumns() {
		q.raw[c] = "s" + strconv.Itoa(i+1)
	}
	for _, n := range names {
		qn, err := s.Dialect.QuoteIdent(n)
		if err != nil {
			return nil, specError("", "column: %w", err)
		}
		q.cols[n] = qn
	}
	return q, nil
}
