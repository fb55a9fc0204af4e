package sampling

import (
	"fmt"
	"strconv"
	"strings"
	"unicode/utf8"

	"probity/plan/inputerr"
)

// inputErrorf builds the input error about a file a draw reads or writes (a
// prediction log, a ledger, a worksheet, a manifest): the file, the 1-based
// line (0 when the problem is not about one line) and the column (empty
// when not about one column).
func inputErrorf(file string, line int, column, format string, args ...any) *inputerr.Error {
	return inputerr.At(file, line, column, format, args...)
}

// columnList formats column names for a "the columns are …" message: at
// most 40 of them, each cut to a readable length.
func columnList(cols []string) string {
	if len(cols) == 0 {
		return "(none)"
	}
	const most = 40
	var out []string
	for i, c := range cols {
		if i == most {
			out = append(out, fmt.Sprintf("… (%d columns)", len(cols)))
			break
		}
		out = append(out, cut(c))
	}
	return strings.Join(out, ", ")
}

// shownBytes is how much of a value from a log a message shows.
const shownBytes = 60

// cut returns s, or its start and the count of its bytes when it is too
// long to show in a message.
func cut(s string) string {
	if len(s) <= shownBytes+16 {
		return s
	}
	return fmt.Sprintf("%s… (%d bytes)", startOf(s), len(s))
}

// quote is %q of a value from a log, cut like cut when too long.
func quote[T ~string | ~[]byte](v T) string {
	s := string(v)
	if len(s) <= shownBytes+16 {
		return strconv.Quote(s)
	}
	return fmt.Sprintf("%s… (%d bytes)", strconv.Quote(startOf(s)), len(s))
}

// startOf is the first shownBytes bytes of s, without splitting a
// character.
func startOf(s string) string {
	n := shownBytes
	for n > 0 && n < len(s) && !utf8.RuneStart(s[n]) {
		n--
	}
	return s[:n]
}
