package plan

import (
	"fmt"
	"strconv"
	"strings"
)

// Columns returns the log columns the candidate reads.
func (c Candidate) Columns() []string {
	if c.Column != "" {
		return []string{c.Column}
	}
	return []string{c.ScoreColumn}
}

// Predict returns the candidate's predicted label for one log row, given the
// raw value of its column (Columns()[0]). A threshold candidate predicts
// Positive when the score parses as a number ≥ Threshold, else Negative; a
// score that is not a finite number is an error.
func (c Candidate) Predict(value string) (string, error) {
	if c.Column != "" {
		return value, nil
	}
	s, err := strconv.ParseFloat(strings.TrimSpace(value), 64)
	if err != nil || s != s || s > 1e308 || s < -1e308 {
		return "", fmt.Errorf("score %q in column %s is not a finite number", value, c.ScoreColumn)
	}
	if s >= *c.Threshold {
		return c.Positive, nil
	}
	return c.Negative, nil
}
