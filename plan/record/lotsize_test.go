package record

import (
	"strings"
	"testing"
)

// TestUnboundedPopulationIsNull (issue 16 item 15): record.json says null,
// not 0, for a plan on an unbounded stream; a finite lot keeps its N, and
// a record written before (population 0) still reads as unbounded.
func TestUnboundedPopulationIsNull(t *testing.T) {
	r := &Record{Format: Format}
	data, err := Encode(r)
	if err != nil {
		t.Fatal(err)
	}
	if !strings.Contains(string(data), `"population": null`) {
		t.Errorf("unbounded population not null:\n%s", data)
	}
	r.Plan.Population = 1250000
	data, err = Encode(r)
	if err != nil {
		t.Fatal(err)
	}
	if !strings.Contains(string(data), `"population": 1250000`) {
		t.Errorf("finite population not written:\n%s", data)
	}
	back, err := Decode(data)
	if err != nil || back.Plan.Population != 1250000 {
		t.Fatalf("decoded %v, %v", back, err)
	}
	for _, old := range []string{`0`, `null`} {
		var n LotSize = 7
		if err := n.UnmarshalJSON([]byte(old)); err != nil || n != 0 {
			t.Errorf("population %s read as %d, %v; want 0 (unbounded)", old, n, err)
		}
	}
	var n LotSize
	if err := n.UnmarshalJSON([]byte(`-5`)); err == nil {
		t.Error("a negative population was accepted")
	}
}
