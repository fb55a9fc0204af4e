package sqlquery

import (
	"fmt"
	"io"
	"slices"
	"strings"

	"probity/plan"
	"probity/plan/inputerr"
	"probity/sampling"
	"probity/sampling/drawfolder"
)

// Result is a query result that passed every check: it was made by the
// query this probity writes for the plan given, every key is the SHA-256
// of its seed and id, the stratum counts add up to the table's rows, the
// allocation is the one sampling.Allocate gives for those counts, and each
// stratum holds exactly its n_h + spares rows with the smallest keys, in
// key order.
type Result struct {
	// Path, SHA256 and Bytes describe the result file.
	Path   string
	SHA256 string
	Bytes  int64
	// Spec is the draw the result was made for, with the plan's
	// candidates.
	Spec *Spec
	// Query is the query text rebuilt from Spec (byte for byte what
	// `probity draw --sql` printed for it) and QuerySHA256 its SHA-256.
	Query       string
	QuerySHA256 string
	// TableRows is the number of rows the query read; InScope those the
	// --where filters kept (the lot of a finite-population plan).
	TableRows int64
	InScope   int64
	// Strata is the allocation, sorted by label.
	Strata []sampling.StratumAllocation
	// Items holds, per stratum label, the rows selected, in key order:
	// the first n_h are the sample, the rest the spares.
	Items map[string][]Item
	// Counts is the counts file a two-step (ClickHouse) selection was
	// made from; nil for the other dialects.
	Counts *Counts
}

// Item is one selected row of a result.
type Item struct {
	// Line is where the row is in the result file.
	Line     int
	RecordID string
	Stratum  string
	Key      string
	// Values are the log columns of Spec's value columns (the candidates'
	// columns, then --show), as the engine printed them.
	Values []string
}

// Import reads and checks a query result. p and fingerprint are the plan
// the result must have been made for; stdin is read when path is "-".
// Every problem is a *inputerr.Error naming the file, line and
// column. A ClickHouse result is imported with ImportSelection instead.
func Import(path string, stdin io.Reader, p *plan.File, fingerprint string) (*Result, error) {
	data, err := readFile(path, stdin)
	if err != nil {
		return nil, err
	}
	t, err := readResult(path, data)
	if err != nil {
		return nil, err
	}
	res := &Result{Path: path, SHA256: drawfolder.SHA256Hex(data), Bytes: int64(len(data)), Items: map[string][]Item{}}
	if err := firstRowKind(t, KindDraw); err != nil {
		return nil, err
	}
	spec, countsSHA, err := checkDrawRow(t, p, fingerprint)
	if err != nil {
		return nil, err
	}
	if spec.TwoStep() || countsSHA != "" {
		what := "a " + string(spec.Dialect) + " selection"
		if spec.Allocation == sampling.Measures {
			what = "the selection of a plan with measures"
		}
		return nil, t.rowError(0, colDetail, "%s is checked against the counts it was made from", what).
			WithHint("import it together with the counts file its selection query was printed from")
	}
	res.Spec = spec
	if res.Query, err = Query(res.Spec); err != nil {
		return nil, &inputerr.Error{File: path, Line: t.lines[0], Field: "detail", Msg: err.Error(), Err: err}
	}
	res.QuerySHA256 = drawfolder.SHA256Hex([]byte(res.Query))
	if res.TableRows, err = t.int64At(0, colStratumSize); err != nil {
		return nil, err
	}
	if err := checkValueColumns(t, res.Spec); err != nil {
		return nil, err
	}
	if res.InScope, err = checkIDRows(t, res.Spec.Dialect); err != nil {
		return nil, err
	}
	if err := checkLot(t, p, res.Spec, res.InScope); err != nil {
		return nil, err
	}
	if err := res.checkStrata(t, p); err != nil {
		return nil, err
	}
	if err := res.checkItems(t); err != nil {
		return nil, err
	}
	return res, nil
}

// firstRowKind checks that the result starts with the row of the kind
// expected (the draw row, or the counts row of a ClickHouse counts
// result), and names the file it looks like otherwise.
func firstRowKind(t *resultTable, kind string) error {
	if len(t.rows) > 0 && t.rows[0][colKind] == kind {
		return nil
	}
	e := &inputerr.Error{File: t.name, Line: 2, Field: "kind", Msg: "the first row must be the " + kind + " row (kind " + kind + ")",
		Hint: "save the whole result of the query, in the order it returns"}
	switch {
	case len(t.rows) > 0 && kind == KindDraw && t.rows[0][colKind] == KindCounts:
		e.Msg = "this is the result of the counts query (step 1 of 2), not of the selection query"
		e.Hint = "print the selection query from this counts file, run it, and import its result"
	case len(t.rows) > 0 && kind == KindCounts && t.rows[0][colKind] == KindDraw:
		e.Msg = "this is the result of a selection query, not of the counts query (step 1 of 2)"
		e.Hint = "give the counts query's result as the counts and the selection query's as the selection"
	}
	return e
}

// checkValueColumns checks that the result has one value column per value
// the draw row lists.
func checkValueColumns(t *resultTable, s *Spec) error {
	if n := len(s.valueColumns()); len(t.header)-fixedColumns != n {
		return &inputerr.Error{File: t.name, Line: 1, Msg: fmt.Sprintf("%d value columns, but the draw row lists %d", len(t.header)-fixedColumns, n)}
	}
	return nil
}

// checkLot refuses rows in scope that are not the lot a finite-lot plan
// judges.
func checkLot(t *resultTable, p *plan.File, s *Spec, inScope int64) error {
	if pop := p.Inputs.Population; pop > 0 && s.Period == "" && inScope != pop {
		return (&inputerr.Error{File: t.name, Msg: fmt.Sprintf("%d rows of %s are in scope but the plan is for a lot of %d (inputs.population)", inScope, s.Table, pop)}).WithHint(fmt.Sprintf("a finite-lot plan judges exactly one lot: plan again for a lot of %d, or draw for a period to take this table as the period's lot", inScope))
	}
	return nil
}

// checkDrawRow decodes the draw row's description and checks that it names
// this plan, its seed and a selection seed that follows from them. It also
// returns the SHA-256 of the counts file the description names (a
// ClickHouse selection; "" otherwise).
func checkDrawRow(t *resultTable, p *plan.File, fingerprint string) (*Spec, string, error) {
	d, err := parseDetail(t.rows[0][colDetail])
	if err != nil {
		return nil, "", t.rowError(0, colDetail, "%v", err)
	}
	if d.Format != QueryFormat {
		return nil, "", t.rowError(0, colDetail, "the result was made by a query of format %d; this probity reads format %d", d.Format, QueryFormat).WithHint("print the query again with this probity and run it")
	}
	if d.PlanFingerprint != fingerprint {
		return nil, "", t.rowError(0, colDetail, "the result was made for another plan (fingerprint %s), not this one (%s)", short(d.PlanFingerprint), short(fingerprint)).WithHint("import it with the plan the query was printed from, or print and run the query for this plan")
	}
	if d.Seed != p.Seed {
		return nil, "", t.rowError(0, colDetail, "the result was made with seed %q, but the plan's seed is %q", d.Seed, p.Seed).WithHint("print and run the query for this plan")
	}
	want := p.Seed
	if d.Period != "" {
		want = sampling.PeriodSeed(p.Seed, d.Period)
	}
	if d.SelectionSeed != want {
		return nil, "", t.rowError(0, colDetail, "the selection seed %q does not follow from the plan's seed and period %q (expected %q)", d.SelectionSeed, d.Period, want)
	}
	if n := SampleSize(p); d.SampleSize != n {
		return nil, "", t.rowError(0, colDetail, "the result was made for a sample of %d, but the plan's is %d", d.SampleSize, n)
	}
	s := d.Spec
	s.Candidates = p.Candidates
	if got := s.valueColumns(); !slices.Equal(got, d.Values) {
		return nil, "", t.rowError(0, colDetail, "the value columns %q are not those the plan's candidates and the shown columns need (%q)", d.Values, got)
	}
	return &s, d.CountsSHA256, nil
}

// checkIDRows reads the rows that count the table's rows in scope, its
// empty and repeated ids and its values a draw from a file would refuse,
// and refuses the result when there are any; it returns the rows in scope.
// Repeated ids are refused wherever they are (a draw inside the engine has
// no log order in which to keep a first copy). A two-step (ClickHouse)
// result counts the rows that repeat an id instead of the ids repeated.
func checkIDRows(t *resultTable, d Dialect) (int64, error) {
	counts := map[string]int64{}
	var dupLines []int
	var dupExamples []string
	required := []string{KindInScope, KindEmptyIDs, KindDuplicateIDs}
	if d.TwoStep() {
		required[2] = KindRepeatedRows
	}
	for i, row := range t.rows {
		switch row[colKind] {
		case KindInScope, KindEmptyIDs, KindDuplicateIDs, KindRepeatedRows:
			n, err := t.int64At(i, colStratumSize)
			if err != nil {
				return 0, err
			}
			counts[row[colKind]] = n
		case KindDuplicateID:
			dupLines = append(dupLines, t.lines[i])
			dupExamples = append(dupExamples, fmt.Sprintf("%q (%s times)", row[colRecordID], row[colStratumSize]))
		case KindBadValue:
			return 0, badValueError(t, i)
		}
	}
	for _, k := range required {
		if _, ok := counts[k]; !ok {
			return 0, &inputerr.Error{File: t.name, Msg: "the " + k + " row is missing", Hint: "save the whole result of the query"}
		}
	}
	if n := counts[KindEmptyIDs]; n > 0 {
		return 0, (&inputerr.Error{File: t.name, Field: "record_id", Msg: fmt.Sprintf("the table has %d %s whose id is NULL or empty", n, plural(n, "row", "rows"))}).WithHint("every row needs an id; fill them in or leave those rows out of the table or view")
	}
	if n := counts[KindDuplicateIDs]; n > 0 || len(dupExamples) > 0 {
		line := 0
		if len(dupLines) > 0 {
			line = dupLines[0]
		}
		return 0, (&inputerr.Error{File: t.name, Line: line, Field: "record_id", Msg: fmt.Sprintf("%d %s more than once in the table, e.g. %s", n, plural(n, "id occurs", "ids occur"), joinList(dupExamples))}).WithHint("ids must be unique; a draw inside the engine cannot keep a first copy (draw from an export of the table, keeping the first row of each id)")
	}
	if n := counts[KindRepeatedRows]; n > 0 {
		return 0, (&inputerr.Error{File: t.name, Field: "record_id", Msg: fmt.Sprintf("%d %s in scope %s the id of another row", n, plural(n, "row", "rows"), plural(n, "repeats", "repeat"))}).
			WithHint("ids must be unique; list the repeated ones with SELECT id, count() FROM table GROUP BY id HAVING count() > 1, or draw from an export of the table, keeping the first row of each id")
	}
	return counts[KindInScope], nil
}

// badValueError describes a bad_value row: rows in scope whose stratum or
// band value a draw from a file refuses.
func badValueError(t *resultTable, i int) error {
	row := t.rows[i]
	n := row[colStratumSize]
	what, col, _ := strings.Cut(row[colDetail], ":")
	rows := "rows in scope have"
	if n == "1" {
		rows = "row in scope has"
	}
	e := &inputerr.Error{File: t.name, Line: t.lines[i], Field: "detail"}
	switch what {
	case "strata":
		e.Msg = fmt.Sprintf("column %s: %s %s a value holding a |, which separates stratum values in labels (first id %q)", col, n, rows, row[colRecordID])
		e.Hint = "stratify by a column whose values hold no |"
	case "band":
		e.Msg = fmt.Sprintf("band column %s: %s %s a value that is not a number in [0, 1] (first id %q; NULL reads as %s)", col, n, rows, row[colRecordID], NullText)
		e.Hint = "a band splits a score in [0, 1]; leave the other rows out with a filter or a view"
	default:
		e.Msg = fmt.Sprintf("unknown problem %q", row[colDetail])
	}
	return e
}

// plural picks the singular or plural wording for n.
func plural(n int64, one, many string) string {
	if n == 1 {
		return one
	}
	return many
}

// short abbreviates a fingerprint for a message.
func short(s string) string {
	if len(s) > 12 {
		return s[:12] + "…"
	}
	return s
}

// joinList joins items with ", ".
func joinList(items []string) string {
	out := ""
	for i, s := range items {
		if i > 0 {
			out += ", "
		}
		out += s
	}
	return out
}
