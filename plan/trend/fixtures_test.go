package trend

import (
	"crypto/ed25519"
	"path/filepath"
	"testing"

	"probity/plan/record"
	"probity/plan/record/signature"
	"probity/plan/testkit/golden"
)

// monthlyDir holds the year of records used by the command tests, the
// chart tests and the README walkthrough: one folder per month, as
// `probity record` writes them.
const monthlyDir = "../../testdata/trend/monthly"

// fixtureSealPub is the public key the monthly records are sealed with.
const fixtureSealPub = "../../testdata/trend/fixture-seal.pub"

// TestMonthlyFixtures keeps testdata/trend/monthly in the canonical
// record.json encoding (record.Encode) and it equal to the scenario
// (run with -update to rewrite it) and checks it loads as a trend.
func TestMonthlyFixtures(t *testing.T) {
	pub, err := signature.MarshalPublic(fixtureSealKey().Public().(ed25519.PublicKey))
	if err != nil {
		t.Fatal(err)
	}
	files := map[string][]byte{fixtureSealPub: pub}
	for _, r := range yearRecords() {
		data, err := record.Encode(&r)
		if err != nil {
			t.Fatal(err)
		}
		path := filepath.Join(monthlyDir, r.Period, "record.json")
		files[path] = data
		// The operator's seal over record.json (the fixtures have no PDF).
		seal := signature.Sign(fixtureSealKey(), map[string][]byte{record.JSONFile: data})
		files[filepath.Join(monthlyDir, r.Period, signature.FileName)] = seal.Marshal()
	}
	for path, data := range files {
		golden.Compare(t, path, data)
	}
	l, err := Load([]string{monthlyDir})
	if err != nil {
		t.Fatal(err)
	}
	if len(l.Entries) != 12 {
		t.Fatalf("%d records under %s", len(l.Entries), monthlyDir)
	}
}
