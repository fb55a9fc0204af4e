package plan

import (
	"fmt"
	"strings"

	"probity/plan/inputerr"
)

// outOfRange is a requirement outside its allowed range: an input error
// whose Field is the input's name as the plan file and the command spell it
// ("ceiling", "producer-risk", …) and whose message is the value as given
// and what is allowed ("1.5: must be between 0 and 1 (exclusive)").
func outOfRange(field, value, allowed string) *inputerr.Error {
	return &inputerr.Error{Field: field, Msg: value + ": must be " + allowed}
}

// TooLargeError reports a requirement that needs more labels than the
// limit (MaxSampleSize, or the lot size for a finite population). Size
// returns it as the cause of an input error, so a caller can name the
// inputs to relax in its own words.
type TooLargeError struct {
	// Limit is the largest sample that was allowed.
	Limit int
	// Population is the lot size when the limit was the lot, else 0.
	Population int64
	// Relax names the inputs to relax, most effective first.
	Relax []string
}

func (e *TooLargeError) Error() string {
	if e.Population > 0 {
		return fmt.Sprintf("population %d is smaller than the plan needs: the guarantee would need every decision labeled; relax %s",
			e.Population, strings.Join(e.Relax, " or "))
	}
	return fmt.Sprintf("the plan would need more than %d labels; relax %s", e.Limit, strings.Join(e.Relax, " or "))
}

// tooLargeError is TooLargeError as the input error Size returns.
func tooLargeError(e *TooLargeError) *inputerr.Error {
	return &inputerr.Error{Msg: e.Error(), Err: e}
}
