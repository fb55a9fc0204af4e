package trend

import (
	"bytes"
	"crypto/ed25519"
	"crypto/sha256"
	"encoding/hex"
	"fmt"
	"os"
	"path/filepath"
	"testing"

	"gonum.org/v1/gonum/stat/distuv"

	"probity/plan"
	"probity/plan/record"
	"probity/plan/record/signature"
)

// cand is a candidate's result in a test record.
type cand struct {
	name           string
	labeled, error int
}

// testPlan is the plan of the test records: binomial exact fixed plan, ceiling
// 2 %, 95 % confidence, 3 candidates under Bonferroni, n = 613, c = 5
// (scipy.stats.binom: P(X ≤ 5 | 613, 0.02) = 0.01648 ≤ 0.05/3 and
// P(X > 5 | 613, 0.005) = 0.0901 ≤ 0.10).
func testPlan() record.PlanInfo {
	p0, pr := 0.005, 0.0901
	return record.PlanInfo{
		Fingerprint:      fingerprint("plan of the ticket router audit"),
		Method:           plan.MethodExact,
		Model:            plan.ModelBinomial,
		Design:           plan.DesignFixed,
		Multiplicity:     plan.Bonferroni,
		Require:          plan.RequireAll,
		Ceiling:          0.02,
		Confidence:       0.95,
		CandidateCount:   3,
		Anticipated:      &p0,
		SampleSize:       613,
		AcceptanceNumber: 5,
		PerCandidateRisk: 0.05 / 3,
		ConsumerRisk:     0.01648,
		ProducerRisk:     &pr,
		Seed:             "5be1a2c0f77e4c1d9a0b3e6f28d4c7aa",
		SelectionSeed:    "5be1a2c0f77e4c1d9a0b3e6f28d4c7aa",
	}
}

func fingerprint(s string) string {
	sum := sha256.Sum256([]byte(s))
	return hex.EncodeToString(sum[:])
}

// makeRecord builds a record of period judged under plan with the plan's
// acceptance number: estimate e/n, Clopper–Pearson upper bound at
// 1 − δ/M, p-value P(X ≤ e | n, ceiling).
func makeRecord(period string, info record.PlanInfo, cs ...cand) record.Record {
	conf := 1 - info.PerCandidateRisk
	r := record.Record{
		Format:        record.Format,
		ToolVersion:   "0.1.0",
		Date:          period + "-28",
		Period:        period,
		System:        "ticket-router",
		SystemVersion: "4.2",
		Use:           "general",
		Plan:          info,
		Strata:        []record.StratumCount{},
		OC:            []record.OCPoint{},
		Deviations:    record.Deviations{SparesUsed: []string{}, Unlabeled: []string{}, Unsure: []string{}, Notes: []string{}},
		Method:        record.MethodInfo{Bound: plan.BoundClopperPearson, Statement: "exact binomial", Assumptions: []string{}},
		Signoff:       []record.Signoff{},
		Fingerprints: record.Fingerprints{Plan: info.Fingerprint, Log: fingerprint("log " + period),
			Manifest: fingerprint("manifest " + period), Ledger: fingerprint("ledger " + period),
			Worksheet: fingerprint("worksheet " + period), Labels: fingerprint("labels " + period)},
		OverallVerdict: record.Accept,
	}
	for _, c := range cs {
		v := record.Accept
		reason := fmt.Sprintf("%d errors ≤ c = %d", c.error, info.AcceptanceNumber)
		if c.error > info.AcceptanceNumber {
			v = record.Reject
			reason = fmt.Sprintf("%d errors > c = %d", c.error, info.AcceptanceNumber)
			r.OverallVerdict = record.Reject
		}
		r.Candidates = append(r.Candidates, record.Candidate{
			Name: c.name, Labeled: c.labeled, Errors: c.error,
			Estimate:        float64(c.error) / float64(c.labeled),
			UpperBound:      clopperPearsonUpper(c.error, c.labeled, conf),
			BoundConfidence: conf,
			PValue:          distuv.Binomial{N: float64(c.labeled), P: info.Ceiling}.CDF(float64(c.error)),
			Verdict:         v,
			Reason:          reason,
			Confusion:       record.Confusion{Classes: []string{}, Counts: [][]int{}},
			Strata:          []record.StratumErr{},
		})
	}
	r.Revision = 1
	r.SigningKey = signature.Fingerprint(fixtureSealKey().Public().(ed25519.PublicKey))
	id, err := record.ID(&r)
	if err != nil {
		panic(err)
	}
	r.RecordID = id
	return r
}

// fixtureSealKey is the key the fixture records are sealed with, made from
// a fixed byte stream: a test key, published with the tests, whose public
// half is testdata/trend/fixture-seal.pub.
func fixtureSealKey() ed25519.PrivateKey {
	_, priv, err := signature.GenerateKey(bytes.NewReader(bytes.Repeat([]byte{0x7e}, 64)))
	if err != nil {
		panic(err)
	}
	return priv
}

// clopperPearsonUpper is the one-sided upper bound: the conf quantile of
// Beta(k+1, n−k), or 1 when k = n (Clopper & Pearson, Biometrika 1934).
func clopperPearsonUpper(k, n int, conf float64) float64 {
	if k >= n {
		return 1
	}
	return distuv.Beta{Alpha: float64(k + 1), Beta: float64(n - k)}.Quantile(conf)
}

// writeRecord writes r as JSON into dir/name and returns the path.
func writeRecord(t testing.TB, dir, name string, r record.Record) string {
	t.Helper()
	data, err := record.Encode(&r)
	if err != nil {
		t.Fatal(err)
	}
	path := filepath.Join(dir, name)
	if err := os.MkdirAll(filepath.Dir(path), 0o755); err != nil {
		t.Fatal(err)
	}
	if err := os.WriteFile(path, data, 0o644); err != nil {
		t.Fatal(err)
	}
	return path
}

// year is the scenario of testdata/trend/monthly: router-a is steady,
// router-b drifts upward (flagged from 2026-10 while still accepted, rejected
// in 2026-12), threshold-0.62 is steady.
var year = []struct {
	period string
	a, b   int
	t      int
}{
	{"2026-01", 2, 0, 3}, {"2026-02", 1, 1, 2}, {"2026-03", 3, 1, 3}, {"2026-04", 2, 2, 4},
	{"2026-05", 2, 2, 2}, {"2026-06", 1, 3, 3}, {"2026-07", 3, 3, 2}, {"2026-08", 2, 4, 3},
	{"2026-09", 2, 4, 4}, {"2026-10", 3, 5, 3}, {"2026-11", 2, 5, 2}, {"2026-12", 1, 7, 3},
}

// yearRecords returns the scenario's records in period order.
func yearRecords() []record.Record {
	var rs []record.Record
	for _, m := range year {
		rs = append(rs, makeRecord(m.period, testPlan(),
			cand{"router-a", 613, m.a}, cand{"router-b", 613, m.b}, cand{"threshold-0.62", 613, m.t}))
	}
	return rs
}
