package trend

import (
	"path/filepath"
	"testing"

	"probity/internal/golden"
	"probity/plan/record"
)

// monthlyDir holds the year of records used by the command tests, the
// chart tests and the README walkthrough: one folder per month, as
// `probity record` writes them.
const monthlyDir = "../../testdata/trend/monthly"

// TestMonthlyFixtures keeps testdata/trend/monthly in the canonical
// record.json encoding (record.Encode) and it equal to the scenario
// (run with -update to rewrite it) and checks it loads as a trend.
func TestMonthlyFixtures(t *testing.T) {
	for _, r := range yearRecords() {
		data, err := record.Encode(&r)
		if err != nil {
			t.Fatal(err)
		}
		golden.Compare(t, filepath.Join(monthlyDir, r.Period, "record.json"), data)
	}
	l, err := Load([]string{monthlyDir})
	if err != nil {
		t.Fatal(err)
	}
	if len(l.Entries) != 12 {
		t.Fatalf("%d records under %s", len(l.Entries), monthlyDir)
	}
}
