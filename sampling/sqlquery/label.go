package sqlquery

import (
	"fmt"
	"strconv"
	"strings"
)

// NullLabel is the label part of a NULL stratum value.
const NullLabel = "(null)"

// labelSeparator joins a stratum's values into its label.
const labelSeparator = "|"

// wholeLogLabel is the label of the only stratum of an unstratified draw.
const wholeLogLabel = "all"

// labelExpr is the SQL expression of a row's stratum label: the --strata
// values then the --band intervals, joined with "|".
func (q *quoter) labelExpr() (string, error) {
	d := q.s.Dialect
	var parts []string
	for _, c := range q.s.Strata {
		null, _ := d.QuoteLiteral(NullLabel)
		parts = append(parts, "COALESCE("+d.text("t."+q.cols[c])+", "+null+")")
	}
	for _, b := range q.s.Bands {
		e, err := q.bandExpr(b)
		if err != nil {
			return "", err
		}
		parts = append(parts, e)
	}
	if len(parts) == 0 {
		lit, _ := d.QuoteLiteral(wholeLogLabel)
		return lit, nil
	}
	sep, _ := d.QuoteLiteral(labelSeparator)
	return strings.Join(parts, " || "+sep+" || "), nil
}

// bandExpr is the interval label of a --band column.
func (q *quoter) bandExpr(b Band) (string, error) {
	d := q.s.Dialect
	if len(b.Edges) == 0 {
		return "", fmt.Errorf("%w: --band %s has no edges", ErrSpec, b.Text)
	}
	x := "CAST(t." + q.cols[b.Column] + " AS double precision)"
	var e strings.Builder
	e.WriteString("CASE")
	for i, edge := range b.Edges {
		lit, _ := d.QuoteLiteral(bandLabel(b.Edges, i))
		fmt.Fprintf(&e, " WHEN %s < %s THEN %s", x, floatLit(edge), lit)
	}
	last, _ := d.QuoteLiteral(bandLabel(b.Edges, len(b.Edges)))
	fmt.Fprintf(&e, " ELSE %s END", last)
	return e.String(), nil
}

// bandLabel is the label of interval i of a band with the given edges.
func bandLabel(edges []float64, i int) string {
	f := func(v float64) string { return strconv.FormatFloat(v, 'g', -1, 64) }
	switch {
	case i == 0:
		return "<" + f(edges[0])
	case i == len(edges):
		return ">=" + f(edges[i-1])
	default:
		return "[" + f(edges[i-1]) + "," + f(edges[i]) + ")"
	}
}

// floatLit writes a float64 as a SQL double literal that reads back as the
// same value (shortest round-trip decimal, cast from text).
func floatLit(v float64) string {
	return "CAST('" + strconv.FormatFloat(v, 'g', -1, 64) + "' AS double precision)"
}
