package plan

import (
	"fmt"
	"strings"
)

// InputError is a requirement outside its allowed range. Field is the
// input's name as the plan file and the command spell it ("ceiling",
// "producer-risk", …).
type InputError struct {
	Field string
	// Value is the value as given; Allowed says what is allowed, as a
	// phrase that completes "must be …".
	Value   string
	Allowed string
}

func (e *InputError) Error() string {
	return fmt.Sprintf("%s %s: must be %s", e.Field, e.Value, e.Allowed)
}

// TooLargeError reports a requirement that needs more labels than the
// limit (MaxSampleSize, or the lot size for a finite population).
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
