package trend

import (
	"errors"
	"fmt"
	"strings"
)

// Periods are labels such as 2026-11, 2026-Q3 or 2026-W07. A trend sorts
// them as strings, which is time order only when every label has the same
// shape: the same length with digits, letters and separators in the same
// places (so "2026-9" and "2026-10" cannot be mixed). checkPeriod validates
// one label; Shape is compared across the records of a trend.

// maxPeriodLen bounds a period label.
const maxPeriodLen = 32

// checkPeriod accepts a non-empty label of at most 32 letters, digits and
// the separators '-', '_' and '.', starting with a letter or digit.
func checkPeriod(p string) error {
	if p == "" {
		return ErrNoPeriod
	}
	if len(p) > maxPeriodLen {
		return fmt.Errorf("%q is longer than %d characters", p, maxPeriodLen)
	}
	for i, r := range p {
		switch {
		case r >= '0' && r <= '9', r >= 'a' && r <= 'z', r >= 'A' && r <= 'Z':
		case (r == '-' || r == '_' || r == '.') && i > 0:
		default:
			return fmt.Errorf("%q has the character %q; a period label is letters, digits, '-', '_' and '.'", p, r)
		}
	}
	return nil
}

// CheckPeriod applies checkPeriod's rule, so that a sample is drawn only
// for a period label a trend can line up.
func CheckPeriod(p string) error { return checkPeriod(p) }

// ErrNoPeriod is the cause of the error about a record without a period:
// its audit was not drawn for a period, so it has no place in a trend.
var ErrNoPeriod = errors.New("empty: a trend needs records of audits drawn for a period")

// periodHint suggests the fix for an invalid period.
func periodHint(p string) string {
	if p == "" {
		return "draw each period's sample for its period label (e.g. 2026-11) and record it again"
	}
	return "period labels look like 2026-11, 2026-Q3 or 2026-W07"
}

// Shape is the pattern of a label: each digit becomes '9', each lower-case
// letter 'a', each upper-case letter 'A' and separators stay, so "2026-11"
// has shape "9999-99" and "2026-Q3" "9999-A9". Labels of one shape sort as strings in time order when they
// are written most significant part first (year before month).
func Shape(label string) string {
	var b strings.Builder
	for _, r := range label {
		switch {
		case r >= '0' && r <= '9':
			b.WriteByte('9')
		case r >= 'a' && r <= 'z':
			b.WriteByte('a')
		case r >= 'A' && r <= 'Z':
			b.WriteByte('A')
		default:
			b.WriteRune(r)
		}
	}
	return b.String()
}
