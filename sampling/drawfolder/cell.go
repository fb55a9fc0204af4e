package drawfolder

import (
	"strconv"
	"strings"
)

// Cells a spreadsheet would run. A value from the log that starts with =,
// @, a tab or a carriage return — or with + or - without being a number —
// is a formula to a spreadsheet program (=HYPERLINK(…) puts a link to
// anywhere in front of a labeler, @SUM(…) computes). The worksheets and the
// ledger write such a value behind an apostrophe, which spreadsheets show
// as text, and every reader of those files takes the apostrophe off again.
// A value that itself starts with an apostrophe gets one more, so the
// escape is one-to-one: CellValue(CellText(v)) == v for every v.

// needsQuote reports whether v must be written behind an apostrophe.
func needsQuote(v string) bool {
	if v == "" {
		return false
	}
	switch v[0] {
	case '=', '@', '\t', '\r', '\'':
		return true
	case '+', '-':
		_, err := strconv.ParseFloat(v, 64)
		return err != nil
	}
	return false
}

// CellText is how a value from the log is written into a worksheet or the
// ledger: as it is, or behind an apostrophe when a spreadsheet would take
// it for a formula (or it starts with an apostrophe).
func CellText(v string) string {
	if needsQuote(v) {
		return "'" + v
	}
	return v
}

// CellValue is the value a worksheet or ledger cell holds: the cell
// without the apostrophe CellText put in front. A cell a spreadsheet saved
// without that apostrophe (the formula kept as text) reads as itself.
func CellValue(cell string) string {
	if rest, ok := strings.CutPrefix(cell, "'"); ok && needsQuote(rest) {
		return rest
	}
	return cell
}

// cellTexts is CellText of each value.
func cellTexts(vs []string) []string {
	out := make([]string, len(vs))
	for i, v := range vs {
		out[i] = CellText(v)
	}
	return out
}

// cellValues is CellValue of each cell.
func cellValues(cs []string) []string {
	out := make([]string, len(cs))
	for i, c := range cs {
		out[i] = CellValue(c)
	}
	return out
}
