package sqlquery

import (
	"fmt"
	"sort"
	"strconv"
	"strings"

	"probity/sampling"
)

// KindCounts is the kind of the first row of a ClickHouse counts result:
// the Spec (detail) and the table's rows. The selection result starts with
// a KindDraw row instead, whose description also names the counts file.
const KindCounts = "counts"

// ClickHouseMaxQuerySize is ClickHouse's default max_query_size: a longer
// query text (the selection query of thousands of strata lists their
// labels) is refused unless the client raises it, e.g.
// clickhouse-client --max_query_size=1000000.
const ClickHouseMaxQuerySize = 262144

// chSettings are the settings both ClickHouse queries pin, so that a
// profile's limits fail the query instead of silently cutting it short
// (an overflow mode "break" stops reading, sorting or grouping and returns
// what it has; "any" groups only the keys seen so far), and no totals or
// extremes rows are added to the CSV output. skip_unavailable_shards is
// pinned to 0 so that a profile which turns it on cannot make a shard that
// does not answer silently drop its rows from the counts and the sample.
const chSettings = "skip_unavailable_shards = 0, extremes = 0, read_overflow_mode = 'throw', group_by_overflow_mode = 'throw', " +
	"sort_overflow_mode = 'throw', result_overflow_mode = 'throw', timeout_overflow_mode = 'throw', set_overflow_mode = 'throw'"

// chQuery writes the two ClickHouse queries of a draw. Every expression
// over the table's rows is an alias in a WITH clause, which each SELECT
// reading the table repeats (with the aliases it needs). ClickHouse lets
// an alias shadow a column of the same name even where the column is
// qualified, so every alias is chosen to differ from each column the query
// reads.
type chQuery struct {
	s      *Spec
	q      *quoter
	taken  map[string]bool
	with   []withEntry
	id     string // the id as text ("" for NULL)
	in     string // whether the row is in scope
	strat  string // the stratum label
	bad    string // the first problem a draw from a file would refuse, or ""
	key    string // SHA-256 of "<seed>:<id>", raw bytes
	count  string // a count column
	first  string // a min(id) column
	values []string
	detail string // the literal of the draw description
	err    error  // the first string that could not be quoted
}

// withEntry is one "expr AS alias" of a WITH clause.
type withEntry struct{ alias, expr string }

// lit quotes a string as a literal; a string that cannot be quoted (not
// UTF-8, or holding a NUL byte) is remembered in c.err, which fails the
// query.
func (c *chQuery) lit(s string) string {
	l, err := ClickHouse.QuoteLiteral(s)
	if err != nil && c.err == nil {
		c.err = err
	}
	return l
}

// done returns the query text, or the first quoting error.
func (c *chQuery) done(b *strings.Builder) (string, error) {
	if c.err != nil {
		return "", specError("", "%w", c.err)
	}
	return b.String(), nil
}

// alias returns a name for an inner column that differs from every column
// the query reads and every alias given before.
func (c *chQuery) alias(base string) string {
	a := "probity_" + base
	for c.taken[a] {
		a += "_"
	}
	c.taken[a] = true
	return a
}

// newCHQuery validates s and prepares the row expressions.
func newCHQuery(s *Spec) (*chQuery, error) {
	if s.Dialect != ClickHouse {
		return nil, specError("dialect", "%s draws with one query", s.Dialect)
	}
	q, err := newQuoter(s)
	if err != nil {
		return nil, err
	}
	c := &chQuery{s: s, q: q, taken: map[string]bool{}}
	for name := range q.cols {
		c.taken[name] = true
	}
	c.taken[s.IDColumn] = true
	seedColon, err := ClickHouse.QuoteLiteral(s.SelectionSeed + ":")
	if err != nil {
		return nil, specError("selection_seed", "%w", err)
	}
	detail, err := s.MarshalDetail()
	if err != nil {
		return nil, err
	}
	if c.detail, err = ClickHouse.QuoteLiteral(string(detail)); err != nil {
		return nil, specError("", "%w", err)
	}
	null := c.lit(NullText)
	text := func(col string) string { return "ifNull(toString(t." + q.cols[col] + "), " + null + ")" }
	add := func(alias, expr string) { c.with = append(c.with, withEntry{alias, expr}) }

	c.id = c.alias("id")
	add(c.id, "ifNull(toString(t."+q.id+"), '')")
	raw := map[string]string{}
	for _, col := range q.rawColumns() {
		raw[col] = c.alias(q.raw[col])
		add(raw[col], text(col))
	}
	bands := make([]chBandValue, len(q.bands))
	if len(q.bands) > 0 {
		pattern := c.alias("score_pattern")
		add(pattern, c.lit(scoreTextPattern))
		for i, b := range q.bands {
			p := "b" + strconv.Itoa(i+1) + "_"
			v := chBandValue{x: c.alias(p + "text"), ok: c.alias(p + "ok"), parts: c.alias(p + "parts"), sign: c.alias(p + "sign"),
				digits: c.alias(p + "digits"), d: c.alias(p + "d"), p: c.alias(p + "p"), in: c.alias(p + "in_range")}
			bands[i] = v
			c.with = append(c.with, v.with(text(b.Column), pattern, c.lit)...)
		}
	}

	c.in = c.alias("in_scope")
	var conds []string
	for _, f := range q.filters {
		lits := make([]string, len(f.Values))
		for i, v := range f.Values {
			lits[i] = c.lit(v)
		}
		conds = append(conds, raw[f.Column]+" IN ("+strings.Join(lits, ", ")+")")
	}
	scope := "1"
	if len(conds) > 0 {
		scope = strings.Join(conds, " AND ")
	}
	add(c.in, scope)

	var parts []string
	for _, col := range s.Strata {
		parts = append(parts, raw[col])
	}
	for i, b := range q.bands {
		parts = append(parts, bands[i].label(b, c.lit))
	}
	c.strat = c.alias("stratum")
	switch len(parts) {
	case 0:
		add(c.strat, c.lit(sampling.AllStratum))
	case 1:
		add(c.strat, parts[0])
	default:
		add(c.strat, "concat("+strings.Join(parts, ", "+c.lit(labelSeparator)+", ")+")")
	}

	var bad []string
	for _, col := range s.Strata {
		bad = append(bad, "position("+raw[col]+", "+c.lit(labelSeparator)+") > 0, "+c.lit("strata:"+col))
	}
	for i, b := range q.bands {
		bad = append(bad, "NOT "+bands[i].in+", "+c.lit("band:"+b.Column))
	}
	c.bad = c.alias("bad")
	if len(bad) == 0 {
		add(c.bad, "''")
	} else {
		add(c.bad, "multiIf("+strings.Join(bad, ", ")+", '')")
	}

	c.key = c.alias("key")
	add(c.key, "SHA256(concat("+seedColon+", "+c.id+"))")
	for i, col := range s.valueColumns() {
		v := c.alias("v" + strconv.Itoa(i+1))
		c.values = append(c.values, v)
		add(v, text(col))
	}
	c.count = c.alias("n")
	c.first = c.alias("first_id")
	if c.err != nil {
		return nil, specError("", "%w", c.err)
	}
	return c, nil
}

// fromTable is a SELECT over the table: "WITH … SELECT cols FROM table AS
// t" and then rest, indented by ind. The WITH clause holds the entries the
// SELECT uses, directly or through other entries, in their order.
func (c *chQuery) fromTable(ind, cols, rest string) string {
	used := map[string]bool{}
	var mark func(text string)
	mark = func(text string) {
		for _, w := range c.with {
			if !used[w.alias] && mentions(text, w.alias) {
				used[w.alias] = true
				mark(w.expr)
			}
		}
	}
	mark(cols + " " + rest)
	var b strings.Builder
	var entries []string
	for _, w := range c.with {
		if used[w.alias] {
			entries = append(entries, ind+"  "+w.expr+" AS "+w.alias)
		}
	}
	if len(entries) > 0 {
		b.WriteString(ind + "WITH\n" + strings.Join(entries, ",\n") + "\n")
	}
	b.WriteString(ind + "SELECT " + cols + "\n" + ind + "FROM " + c.q.table + " AS t")
	if rest != "" {
		b.WriteString("\n" + ind + rest)
	}
	return b.String()
}

// mentions reports whether text holds the identifier name as a whole word.
func mentions(text, name string) bool {
	for i := 0; ; {
		j := strings.Index(text[i:], name)
		if j < 0 {
			return false
		}
		start, end := i+j, i+j+len(name)
		if (start == 0 || !isIdentByte(text[start-1])) && (end == len(text) || !isIdentByte(text[end])) {
			return true
		}
		i = start + 1
	}
}

// isIdentByte reports whether b may be part of an unquoted identifier.
func isIdentByte(b byte) bool {
	return b == '_' || b >= '0' && b <= '9' || b >= 'a' && b <= 'z' || b >= 'A' && b <= 'Z'
}

// header writes the comment lines that open a query.
func (c *chQuery) header(b *strings.Builder, what string) {
	s := c.s
	fmt.Fprintf(b, "-- probity %s, format %d, written by probity %s for %s.\n", what, QueryFormat, oneLine(s.ToolVersion), s.Dialect)
	fmt.Fprintf(b, "-- plan %s, selection seed %s.\n", oneLine(s.PlanFingerprint), oneLine(s.SelectionSeed))
}

// outer writes the final SELECT of the result's columns over the union of
// sections u, sorted by the section and the sort keys.
func (c *chQuery) outer(b *strings.Builder, u []string, sortKeys string, settings string) {
	b.WriteString("SELECT kind, record_id, stratum, stratum_size, stratum_sample, stratum_spare, stratum_rank, key, detail")
	for i := range c.values {
		fmt.Fprintf(b, ", value_%d", i+1)
	}
	b.WriteString("\nFROM (\n")
	b.WriteString(strings.Join(u, "\n  UNION ALL\n"))
	b.WriteString("\n)\nORDER BY " + sortKeys + "\n")
	b.WriteString("SETTINGS " + settings + "\n")
	b.WriteString("FORMAT CSVWithNames\n")
}

// emptyValues is the value columns of a row that has none: ", ”" per
// column, named value_i when named is set (the union's first section).
func (c *chQuery) emptyValues(named bool) string {
	var b strings.Builder
	for i := range c.values {
		b.WriteString(", ''")
		if named {
			fmt.Fprintf(&b, " AS value_%d", i+1)
		}
	}
	return b.String()
}

// CountsQuery returns the first of the two ClickHouse queries of the draw
// described by s, whose result (CSV with a header, by its FORMAT clause)
// ReadCounts reads: the table's rows, the rows in scope, the rows with an
// empty id, the rows in scope that repeat an id, and per stratum its rows
// in scope or per problem the rows a draw from a file would refuse. It
// reads the table twice. SelectionQuery then writes the second query. The
// text is a pure function of s.
//
// Repeated ids are counted as count() − uniqExact(id): uniqExact keeps a
// 128-bit hash of each id, so a collision could only report a repeat that
// is not there, never hide one; it is far lighter than grouping by id.
//
// For PostgreSQL and DuckDB (a plan with measures) it is the one query's
// checks and counts without the allocation and the selection.
func CountsQuery(s *Spec) (string, error) {
	if s.Dialect != ClickHouse {
		if !s.TwoStep() {
			return "", specError("dialect", "%s draws with one query", s.Dialect)
		}
		return sqlQuery(s, stepCounts, nil)
	}
	c, err := newCHQuery(s)
	if err != nil {
		return "", err
	}
	var b strings.Builder
	c.header(&b, "counts query (step 1 of 2)")
	b.WriteString("-- Save the result with its header, e.g.\n")
	b.WriteString("--   clickhouse-client < counts.sql > counts.csv\n")
	b.WriteString("-- then print the selection query with\n")
	b.WriteString("--   probity draw --plan PLAN --sql clickhouse --counts counts.csv > selection.sql\n")
	b.WriteString("-- Every aggregate is merged across shards (distributed_group_by_no_merge = 0).\n")
	n, id, in, st, bad := c.count, c.id, c.in, c.strat, c.bad
	row, rows := c.alias("row"), c.alias("rows")
	idIn := in + " AND " + id + " != ''"
	totals := fmt.Sprintf("[tuple(1, '%s', toInt64(count())), tuple(2, '%s', toInt64(countIf(%s))), tuple(3, '%s', toInt64(countIf(%s = ''))),\n"+
		"      tuple(4, '%s', toInt64(countIf(%s)) - toInt64(uniqExactIf(%s, %s)))] AS %s",
		KindCounts, KindInScope, in, KindEmptyIDs, id, KindRepeatedRows, idIn, id, idIn, rows)
	sec := []string{
		// One read of the table gives the four totals, one row each.
		fmt.Sprintf("  SELECT %[1]s.1 AS sec, '' AS sk, '' AS sk2, %[1]s.2 AS kind, '' AS record_id, '' AS stratum, toString(%[1]s.3) AS stratum_size,\n"+
			"    '' AS stratum_sample, '' AS stratum_spare, '' AS stratum_rank, '' AS key, if(%[1]s.1 = 1, %[2]s, '') AS detail%[3]s\n"+
			"  FROM (\n%[4]s\n  )\n  ARRAY JOIN %[5]s AS %[1]s",
			row, c.detail, c.emptyValues(true), c.fromTable("    ", totals, ""), rows),
		// One grouping by stratum and problem gives the strata (the rows
		// without a problem: a problem row's label never equals one of
		// theirs) and the problems with the first id of each.
		fmt.Sprintf("  SELECT if(%[1]s = '', 6, 5), if(%[1]s = '', %[2]s, %[1]s), %[2]s, if(%[1]s = '', '%[3]s', '%[4]s'), %[5]s,\n"+
			"    if(%[1]s = '', %[2]s, ''), toString(%[6]s), '', '', '', '', %[1]s%[7]s\n  FROM (\n%[8]s\n  )",
			bad, st, KindStratum, KindBadValue, c.first, n, c.emptyValues(false),
			c.fromTable("    ", st+", "+bad+", count() AS "+n+", minIf("+id+", "+bad+" != '') AS "+c.first,
				"WHERE "+in+"\n    GROUP BY "+st+", "+bad)),
	}
	c.outer(&b, sec, "sec, sk, sk2", "distributed_group_by_no_merge = 0, "+chSettings)
	return c.done(&b)
}

// selectionGroups splits the strata that take rows (n_h + spares > 0) into
// groups that share one LIMIT t BY stratum on the shards, t the group's
// largest take: taking the strata by decreasing take (ties by label), a
// stratum joins the current group while the group's strata times t stays
// within twice what they take, so the shards send at most twice the rows
// needed, and strata of equal or close takes share one read of the table.
func selectionGroups(alloc []sampling.StratumAllocation) [][]sampling.StratumAllocation {
	var order []sampling.StratumAllocation
	for _, a := range alloc {
		if a.Sample+a.Spare > 0 {
			order = append(order, a)
		}
	}
	sort.SliceStable(order, func(i, j int) bool { return order[i].Sample+order[i].Spare > order[j].Sample+order[j].Spare })
	var groups [][]sampling.StratumAllocation
	for i := 0; i < len(order); {
		limit := order[i].Sample + order[i].Spare
		sum, j := 0, i
		for j < len(order) {
			t := order[j].Sample + order[j].Spare
			if j > i && (j-i+1)*limit > 2*(sum+t) {
				break
			}
			sum += t
			j++
		}
		g := append([]sampling.StratumAllocation(nil), order[i:j]...)
		sort.Slice(g, func(a, b int) bool { return g[a].Label < g[b].Label })
		groups = append(groups, g)
		i = j
	}
	return groups
}

// SelectionQuery returns the second ClickHouse query of a draw, for the
// counts read by ReadCounts: the n_h + spares rows with the smallest keys
// of each stratum, and each stratum's rows counted again, so that the
// import notices a table that changed between the two queries. Strata are
// read in groups (see selectionGroups); each group's ORDER BY stratum, key
// LIMIT t BY stratum runs on every shard over its own rows
// (distributed_group_by_no_merge = 1 keeps the shards from sending all
// their rows to the initiator), and the initiator keeps, per stratum, the
// n_h + spares smallest keys of what the shards sent (arraySort and
// arraySlice: this version has no window functions). Rows are ordered by
// the raw SHA-256 bytes; only the selected keys are written as lowercase
// hex. The text is a pure function of the counts.
//
// For PostgreSQL and DuckDB (a plan with measures) it is the one query
// with the allocation written as literals from the counts (see
// givenAllocationCTEs), the strata counted again and the rows ranked by
// key, without the table's checks the counts query made.
func SelectionQuery(counts *Counts) (string, error) {
	s := counts.Spec
	if s.Dialect != ClickHouse {
		if !s.TwoStep() {
			return "", specError("dialect", "%s draws with one query", s.Dialect)
		}
		return sqlQuery(s, stepSelection, counts)
	}
	c, err := newCHQuery(s)
	if err != nil {
		return "", err
	}
	// The description names the counts file it was made from.
	detail, err := s.marshalDetail(counts.SHA256)
	if err != nil {
		return "", err
	}
	if c.detail, err = ClickHouse.QuoteLiteral(string(detail)); err != nil {
		return "", specError("", "%w", err)
	}
	var labels, pops, samples, spares, takes []string
	var sumSample, sumSpare int
	for _, a := range counts.Strata {
		labels = append(labels, c.lit(a.Label))
		pops = append(pops, "'"+strconv.FormatInt(a.Population, 10)+"'")
		samples = append(samples, "'"+strconv.Itoa(a.Sample)+"'")
		spares = append(spares, "'"+strconv.Itoa(a.Spare)+"'")
		takes = append(takes, strconv.Itoa(a.Sample+a.Spare))
		sumSample += a.Sample
		sumSpare += a.Spare
	}
	n, st, k, id := c.count, c.strat, c.key, c.id
	lookup := func(to []string, none string) string {
		return "transform(" + st + ", [" + strings.Join(labels, ", ") + "], [" + strings.Join(to, ", ") + "], " + none + ")"
	}

	var b strings.Builder
	c.header(&b, "selection query (step 2 of 2)")
	fmt.Fprintf(&b, "-- counts file sha256 %s: %d strata, %d rows in scope of %d.\n", counts.SHA256, len(counts.Strata), counts.InScope, counts.TableRows)
	b.WriteString("-- Save the result with its header, e.g.\n")
	b.WriteString("--   clickhouse-client < selection.sql > selected.csv\n")
	b.WriteString("-- and import it with\n")
	b.WriteString("--   probity draw --plan PLAN --counts counts.csv --selected selected.csv --out DIR\n")
	sec := []string{
		fmt.Sprintf("  SELECT 1 AS sec, '' AS sk, '' AS sk2, '%s' AS kind, '' AS record_id, '' AS stratum, toString(sum(%s)) AS stratum_size,\n"+
			"    '%d' AS stratum_sample, '%d' AS stratum_spare, '' AS stratum_rank, '' AS key, %s AS detail%s\n"+
			"  FROM (\n    SELECT count() AS %s\n    FROM %s AS t\n  )", KindDraw, n, sumSample, sumSpare, c.detail, c.emptyValues(true), n, c.q.table),
		fmt.Sprintf("  SELECT 2, %s, '', '%s', '', %s, toString(sum(%s)), %s, %s, '', '', ''%s\n  FROM (\n%s\n  )\n  GROUP BY %s",
			st, KindStratum, st, n, lookup(samples, "''"), lookup(spares, "''"), c.emptyValues(false),
			c.fromTable("    ", st+", count() AS "+n, "WHERE "+c.in+"\n    GROUP BY "+st), st),
	}
	cols, tuple := st+", "+k+", "+id, k+", "+id
	for _, v := range c.values {
		cols += ", " + v
		tuple += ", " + v
	}
	var reads []string
	for _, g := range selectionGroups(counts.Strata) {
		limit := 0
		in := make([]string, len(g))
		for i, a := range g {
			in[i] = c.lit(a.Label)
			limit = max(limit, a.Sample+a.Spare)
		}
		reads = append(reads, c.fromTable("      ", cols, fmt.Sprintf("WHERE %s AND %s IN (%s)\n      ORDER BY %s, %s\n      LIMIT %d BY %s",
			c.in, st, strings.Join(in, ", "), st, k, limit, st)))
	}
	r, rs := c.alias("r"), c.alias("rs")
	item := fmt.Sprintf("  SELECT 3, %s, lower(hex(%s.1)), '%s', %s.2, %s, %s, %s, %s, '', lower(hex(%s.1)), ''",
		st, r, KindItem, r, st, lookup(pops, "''"), lookup(samples, "''"), lookup(spares, "''"), r)
	for i := range c.values {
		item += fmt.Sprintf(", %s.%d", r, i+3)
	}
	item += fmt.Sprintf("\n  FROM (\n    SELECT %s, arraySlice(arraySort(groupArray(tuple(%s))), 1, %s) AS %s\n    FROM (\n%s\n    )\n    GROUP BY %s\n  )\n  ARRAY JOIN %s AS %s",
		st, tuple, lookup(takes, "0"), rs, strings.Join(reads, "\n      UNION ALL\n"), st, rs, r)
	sec = append(sec, item)
	c.outer(&b, sec, "sec, sk, sk2", "distributed_group_by_no_merge = 1, "+chSettings)
	return c.done(&b)
}
