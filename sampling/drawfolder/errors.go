package drawfolder

import (
	"strings"

	"probity/plan/inputerr"
)

// inputErrorf builds the input error about a file of a draw folder: the
// file, the 1-based line (0 when the problem is not about one line) and
// the column (empty when not about one column).
func inputErrorf(file string, line int, column, format string, args ...any) *inputerr.Error {
	return inputerr.At(file, line, column, format, args...)
}

// columnList formats column names for a "the columns are …" message.
func columnList(cols []string) string {
	if len(cols) == 0 {
		return "(none)"
	}
	return strings.Join(cols, ", ")
}
