package record

import (
	"bytes"
	"encoding/json"
	"fmt"
)

// LotSize is the population N of a plan for a finite lot; 0 stands for an
// unbounded stream of decisions and is written null in record.json (a lot
// of no decisions is not a plan anyone makes, and 0 would read as one).
type LotSize int64

// MarshalJSON writes N, or null for an unbounded population.
func (n LotSize) MarshalJSON() ([]byte, error) {
	if n == 0 {
		return []byte("null"), nil
	}
	return []byte(fmt.Sprint(int64(n))), nil
}

// UnmarshalJSON reads N, or null (and, from records written before null
// was used, 0) for an unbounded population. A negative N is refused.
func (n *LotSize) UnmarshalJSON(data []byte) error {
	if bytes.Equal(data, []byte("null")) {
		*n = 0
		return nil
	}
	var v int64
	if err := json.Unmarshal(data, &v); err != nil {
		return fmt.Errorf("population: %w", err)
	}
	if v < 0 {
		return fmt.Errorf("population: %d is negative", v)
	}
	*n = LotSize(v)
	return nil
}
