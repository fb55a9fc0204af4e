package sqlquery

import (
	"fmt"
	"strconv"
	"strings"

	"probity/sampling"
)

// NullText is how the query reads a NULL in any column it takes from the
// table other than the id: a stratum value, a --where value, a
// candidate's prediction or score, a --show value. A NULL stratum value is
// thus its own stratum, labelled "(null)" (e.g. "north|(null)"). An export
// written with COPY … (FORMAT csv, HEADER, NULL '(null)') gives a log on
// which the draw from a file selects the same rows with the same labels.
// A NULL or empty id is refused, as an empty id is by the draw from a file.
const NullText = "(null)"

// labelSeparator joins a stratum's values into its label (as the draw
// from a file does).
const labelSeparator = "|"

// scoreSyntax is the decimal number syntax a band value must have before
// the query casts it (so that a malformed value is reported, not an engine
// error): optional spaces, sign, digits with an optional point, optional
// exponent.
const scoreSyntax = `^ *[+-]?([0-9]+(\.[0-9]*)?|\.[0-9]+)([eE][+-]?[0-9]+)? *$`

// valueText is a column read as text, NULL as NullText.
func (q *quoter) valueText(col string) string {
	null, _ := q.s.Dialect.QuoteLiteral(NullText)
	return "COALESCE(" + q.s.Dialect.text("t."+q.cols[col]) + ", " + null + ")"
}

// labelExpr is the SQL expression of a row's stratum label: the --strata
// values then the --band intervals, joined with "|"; sampling.AllStratum
// without either. It is NULL when a band value is not a number in [0, 1]
// (a row badExpr reports).
func (q *quoter) labelExpr() (string, error) {
	d := q.s.Dialect
	var parts []string
	for _, c := range q.s.Strata {
		parts = append(parts, "r."+q.raw[c])
	}
	for i, b := range q.bands {
		parts = append(parts, q.bandExpr(b, "r.b"+strconv.Itoa(i+1)))
	}
	if len(parts) == 0 {
		lit, _ := d.QuoteLiteral(sampling.AllStratum)
		return lit, nil
	}
	sep, _ := d.QuoteLiteral(labelSeparator)
	return strings.Join(parts, " || "+sep+" || "), nil
}

// bandNumber is a band column read as a number, NULL when its text is not
// a decimal number.
func (q *quoter) bandNumber(b sampling.Band) string {
	d := q.s.Dialect
	x := q.valueText(b.Column)
	return "CASE WHEN " + d.matches(x, scoreSyntax) + " THEN CAST(trim(" + x + ") AS double precision) END"
}

// bandExpr is the interval label of a band value x (made by bandNumber):
// interval i of sampling.Band.Labels holds [e_{i−1}, e_i), the last one
// [e_k, 1]; NULL outside [0, 1] or when x is NULL.
func (q *quoter) bandExpr(b sampling.Band, x string) string {
	d := q.s.Dialect
	labels := b.Labels()
	var e strings.Builder
	fmt.Fprintf(&e, "CASE WHEN %s >= 0 AND %s <= 1 THEN CASE", x, x)
	for i, edge := range b.Edges {
		lit, _ := d.QuoteLiteral(labels[i])
		fmt.Fprintf(&e, " WHEN %s < %s THEN %s", x, floatLit(edge), lit)
	}
	last, _ := d.QuoteLiteral(labels[len(labels)-1])
	fmt.Fprintf(&e, " ELSE %s END END", last)
	return e.String()
}

// badExpr names the first problem of a row that the draw from a file
// would refuse — a stratum value holding "|", or a band value that is not
// a number in [0, 1] — as "strata:COLUMN" or "band:COLUMN"; NULL when
// there is none.
func (q *quoter) badExpr() string {
	d := q.s.Dialect
	var b strings.Builder
	b.WriteString("CASE")
	n := 0
	for _, c := range q.s.Strata {
		lit, _ := d.QuoteLiteral("strata:" + c)
		fmt.Fprintf(&b, " WHEN %s THEN %s", d.contains("r."+q.raw[c], labelSeparator), lit)
		n++
	}
	for i, band := range q.bands {
		lit, _ := d.QuoteLiteral("band:" + band.Column)
		x := "r.b" + strconv.Itoa(i+1)
		fmt.Fprintf(&b, " WHEN %s IS NULL OR NOT (%s >= 0 AND %s <= 1) THEN %s", x, x, x, lit)
		n++
	}
	if n == 0 {
		return "CAST(NULL AS " + d.textType() + ")"
	}
	b.WriteString(" END")
	return b.String()
}

// floatLit writes a float64 as a SQL double literal that reads back as the
// same value (shortest round-trip decimal, cast from text).
func floatLit(v float64) string {
	return "CAST('" + strconv.FormatFloat(v, 'g', -1, 64) + "' AS double precision)"
}
