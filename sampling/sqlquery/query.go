package sqlquery

import (
	"fmt"
	"strconv"
	"strings"
)

// Result kinds: the value of the first column of each result row.
const (
	KindDraw         = "draw"          // one row: the Spec (detail) and the table's row count
	KindEmptyIDs     = "empty_ids"     // one row: rows whose id is NULL or empty
	KindDuplicateIDs = "duplicate_ids" // one row: ids that occur more than once
	KindDuplicateID  = "duplicate_id"  // up to 3 rows: such an id and its count
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
	q, err := newQuoter(s)
	if err != nil {
		return "", err
	}
	d := s.Dialect
	detail, err := s.MarshalDetail()
	if err != nil {
		return "", err
	}
	detailLit, err := d.QuoteLiteral(string(detail))
	if err != nil {
		return "", err
	}
	seedLit, err := d.QuoteLiteral(s.SelectionSeed + ":")
	if err != nil {
		return "", fmt.Errorf("%w: seed: %v", ErrSpec, err)
	}
	label, err := q.labelExpr()
	if err != nil {
		return "", err
	}
	values := s.valueColumns()

	var b strings.Builder
	w := func(format string, args ...any) { fmt.Fprintf(&b, format, args...) }
	w("-- probity draw query, format %d, written by probity %s for %s.\n", QueryFormat, s.ToolVersion, d)
	w("-- plan %s, selection seed %s.\n", s.PlanFingerprint, oneLine(s.SelectionSeed))
	w("-- Save the result as CSV with a header and import it with\n")
	w("--   probity draw --plan PLAN --selected RESULT.csv --out DIR\n")
	w("-- Any edit to this text makes the import refuse the result.\n")
	w("WITH RECURSIVE\n")
	// src: the rows in scope with their id as text and their stratum label.
	w("src AS (\n  SELECT %s AS record_id,\n    %s AS stratum", d.text("t."+q.id), label)
	for i, c := range values {
		w(",\n    %s AS v%d", d.text("t."+q.cols[c]), i+1)
	}
	w("\n  FROM %s AS t\n),\n", q.table)
	// keyed: the selection key of each row.
	w("keyed AS (\n  SELECT s.*, %s AS k\n  FROM src AS s\n),\n", d.keyExpr(seedLit, "s.record_id"))
	w("counts AS (\n  SELECT stratum, count(*) AS n_pop\n  FROM src\n  GROUP BY stratum\n),\n")
	alloc, err := allocationCTEs(s)
	if err != nil {
		return "", err
	}
	b.WriteString(alloc)
	w("ranked AS (\n  SELECT y.*, row_number() OVER (PARTITION BY y.stratum ORDER BY y.k) AS rnk\n  FROM keyed AS y\n),\n")
	w("dups AS (\n  SELECT record_id, count(*) AS n\n  FROM src\n  WHERE record_id <> ''\n  GROUP BY record_id\n  HAVING count(*) > 1\n),\n")
	// out: every result row with a section number and a sort key.
	nulls := func(n int) string { return strings.Repeat(", NULL", n) }
	txt := d.textType()
	w("out AS (\n")
	w("  SELECT 1 AS sec, CAST(NULL AS %s) AS sk, '%s' AS kind, CAST(NULL AS %s) AS record_id, CAST(NULL AS %s) AS stratum,\n", txt, KindDraw, txt, txt)
	w("    (SELECT count(*) FROM src) AS stratum_size, (SELECT sum(n_sample) FROM alloc) AS stratum_sample, (SELECT sum(n_spare) FROM alloc) AS stratum_spare,\n")
	w("    CAST(NULL AS bigint) AS stratum_rank, CAST(NULL AS %s) AS key, CAST(%s AS %s) AS detail%s\n", txt, detailLit, txt, valueNulls(len(values), txt))
	w("  UNION ALL\n  SELECT 2, NULL, '%s', NULL, NULL, (SELECT count(*) FROM src WHERE record_id IS NULL OR record_id = ''), NULL, NULL, NULL, NULL, NULL%s\n", KindEmptyIDs, nulls(len(values)))
	w("  UNION ALL\n  SELECT 3, NULL, '%s', NULL, NULL, (SELECT count(*) FROM dups), NULL, NULL, NULL, NULL, NULL%s\n", KindDuplicateIDs, nulls(len(values)))
	w("  UNION ALL\n  SELECT 4, e.record_id, '%s', e.record_id, NULL, e.n, NULL, NULL, NULL, NULL, NULL%s\n", KindDuplicateID, nulls(len(values)))
	w("  FROM (SELECT record_id, n FROM dups ORDER BY record_id%s LIMIT %d) AS e\n", d.byteOrder(), maxDuplicateExamples)
	w("  UNION ALL\n  SELECT 5, a.stratum, '%s', NULL, a.stratum, a.n_pop, a.n_sample, a.n_spare, NULL, NULL, NULL%s\n  FROM alloc AS a\n", KindStratum, nulls(len(values)))
	w("  UNION ALL\n  SELECT 6, %s, '%s', r.record_id, r.stratum, a.n_pop, a.n_sample, a.n_spare, r.rnk, %s, NULL", d.hex("r.k"), KindItem, d.hex("r.k"))
	for i := range values {
		w(", r.v%d", i+1)
	}
	w("\n  FROM ranked AS r\n  JOIN alloc AS a ON a.stratum = r.stratum\n  WHERE r.rnk <= a.n_sample + a.n_spare\n)\n")
	w("SELECT kind, record_id, stratum, stratum_size, stratum_sample, stratum_spare, stratum_rank, key, detail")
	for i := range values {
		w(", v%d AS value_%d", i+1, i+1)
	}
	w("\nFROM out\nORDER BY sec, sk%s;\n", d.byteOrder())
	return b.String(), nil
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

// quoter holds the quoted names a query uses.
type quoter struct {
	s     *Spec
	table string
	id    string
	cols  map[string]string
}

// newQuoter validates and quotes every name of s.
func newQuoter(s *Spec) (*quoter, error) {
	if _, err := ParseDialect(string(s.Dialect)); err != nil {
		return nil, fmt.Errorf("%w: %v", ErrSpec, err)
	}
	q := &quoter{s: s, cols: map[string]string{}}
	var err error
	if q.table, err = s.Dialect.QuoteTable(s.Table); err != nil {
		return nil, fmt.Errorf("%w: --table: %v", ErrSpec, err)
	}
	if q.id, err = s.Dialect.QuoteIdent(s.IDColumn); err != nil {
		return nil, fmt.Errorf("%w: --id: %v", ErrSpec, err)
	}
	names := append([]string{}, s.Strata...)
	for _, b := range s.Bands {
		names = append(names, b.Column)
	}
	names = append(names, s.valueColumns()...)
	for _, n := range names {
		qn, err := s.Dialect.QuoteIdent(n)
		if err != nil {
			return nil, fmt.Errorf("%w: column: %v", ErrSpec, err)
		}
		q.cols[n] = qn
	}
	return q, nil
}
