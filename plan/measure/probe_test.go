package measure

import (
	"math"
	"testing"
)

// TestCurveRecordsAfterProbe: a curve probed at a large sub-sample part
// way through its scan keeps records whose acceptance numbers and powers are
// those of each sub-sample alone (recomputed on a fresh curve, exact to
// 1e-12). A probe used to leave its answer as the scan's lower bound, and
// the records after it passed more than their tests allow (found on the
// uniform comparison of a two-threshold plan: power 0.974 claimed, 0.047
// exact).
func TestCurveRecordsAfterProbe(t *testing.T) {
	p := binary(3900, 96100)
	ev := []int64{1350}
	sd := side{strata: []int{0}, ev: negatives}
	tests := []test{{1364, 0.99}, {1500, 0.3}, {1700, 0.05}}
	probed := newSideScan(p, sd, ev).curve(tests...)
	probed.extend(20) // scanned part way, as first() finds it
	probed.probe(128)
	probed.extend(100)
	fresh := newSideScan(p, sd, ev).curve(tests...)
	fresh.extend(100)
	if len(probed.recs) != len(fresh.recs) {
		t.Fatalf("records after a probe %v, without %v", probed.recs, fresh.recs)
	}
	for i, r := range probed.recs {
		if f := fresh.recs[i]; r.m != f.m || r.c != f.c || math.Abs(r.power-f.power) > 1e-12 {
			t.Errorf("record %d after a probe %+v, without %+v", i, r, f)
		}
	}
}
