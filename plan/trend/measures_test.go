package trend

import (
	"errors"
	"fmt"
	"math"
	"testing"

	"probity/plan/inputerr"
	"probity/plan/record"
)

// withMeasures adds invented measure claims to records: fnr (ceiling 0.2)
// and error (ceiling 0.02) for each candidate, the fnr bound drifting up
// over the months for router-b, and the release rule's pick.
func withMeasures(rs []record.Record) []record.Record {
	out := make([]record.Record, len(rs))
	for i, r := range rs {
		r.Measures = nil
		for k, c := range r.Candidates {
			est := 0.05 + 0.01*float64(k) + 0.004*float64(i*k)
			up := est + 0.06
			v := record.Accept
			if up >= 0.2 {
				v = record.Reject
			}
			e := est
			r.Measures = append(r.Measures, record.MeasureVerdict{Candidate: c.Name, Measure: "fnr", Ceiling: 0.2, Labeled: 2000 + 10*i, Events: 10 + k + i,
				LabeledOther: 300, EventsOther: 40, Estimate: &e, UpperBound: up, Level: 0.05 / 6, PValue: 0.001, Verdict: v, Planned: true})
			e2 := 0.008
			r.Measures = append(r.Measures, record.MeasureVerdict{Candidate: c.Name, Measure: "error", Ceiling: 0.02, Labeled: 600, Events: 5,
				Estimate: &e2, UpperBound: 0.015, Level: 0.05 / 6, PValue: 0.002, Verdict: record.Accept, Planned: true})
		}
		r.ReleaseRule = "best:fnr"
		r.Released = &record.Released{Candidate: "router-a"}
		if i == len(rs)-1 {
			r.Released = &record.Released{Candidate: ""}
		}
		out[i] = r
	}
	return out
}

func entriesOf(rs []record.Record) []Entry {
	var es []Entry
	for _, r := range rs {
		es = append(es, Entry{Path: fmt.Sprintf("%s/record.json", r.Period), Record: r})
	}
	return es
}

func TestMeasureTrend(t *testing.T) {
	rs := withMeasures(yearRecords()[:4])
	// the latest record released none: every candidate with an fnr claim
	tr, err := Build(entriesOf(rs), Options{Alpha: 0.05})
	if err != nil {
		t.Fatal(err)
	}
	if tr.Measure == nil || tr.Measure.Measure != "fnr" || tr.Measure.Ceiling != 0.2 || tr.Class.Ceiling != 0.2 {
		t.Fatalf("measure trend %+v, class ceiling %v", tr.Measure, tr.Class.Ceiling)
	}
	if len(tr.Candidates) != 3 || len(tr.Candidates[0].Rows) != 4 {
		t.Fatalf("%d series", len(tr.Candidates))
	}
	if got := tr.Measure.Released; len(got) != 4 || got[0] != "router-a" || got[3] != "" {
		t.Errorf("released %q", got)
	}
	b := tr.Candidates[1]
	if b.Name != "router-b" || b.Rows[3].Errors != 14 || b.Rows[3].Labeled != 2030 || math.Abs(b.Rows[3].Estimate-0.072) > 1e-12 || b.Rows[3].PValue != nil {
		t.Errorf("router-b: %+v", b.Rows[3])
	}
	// the released candidate of the latest record is the default
	rs[3].Released = &record.Released{Candidate: "threshold-0.62"}
	tr, err = Build(entriesOf(rs), Options{Alpha: 0.05, Measure: "error"})
	if err != nil {
		t.Fatal(err)
	}
	if len(tr.Candidates) != 1 || tr.Candidates[0].Name != "threshold-0.62" || tr.Measure.Ceiling != 0.02 || tr.Quantity() != "error" {
		t.Errorf("default candidate: %+v %+v", tr.Candidates, tr.Measure)
	}
	// refusals, each an input error naming the field or the file
	for _, c := range []struct {
		name string
		es   []Entry
		opts Options
	}{
		{"unknown measure", entriesOf(rs), Options{Alpha: 0.05, Measure: "recall"}},
		{"no such claim", entriesOf(rs), Options{Alpha: 0.05, Measure: "fpr"}},
		{"unknown candidate", entriesOf(rs), Options{Alpha: 0.05, Candidate: "router-z"}},
		{"mixed records", entriesOf(append(yearRecords()[:1], rs[1:]...)), Options{Alpha: 0.05}},
		{"no measures", entriesOf(yearRecords()[:2]), Options{Alpha: 0.05, Measure: "fnr"}},
	} {
		_, err := Build(c.es, c.opts)
		var ie *inputerr.Error
		if !errors.As(err, &ie) {
			t.Errorf("%s: %v, not an input error", c.name, err)
		}
	}
	// records without measures keep today's trend
	tr, err = Build(entriesOf(yearRecords()[:3]), Options{Alpha: 0.05})
	if err != nil || tr.Measure != nil || tr.Quantity() != "error rate" {
		t.Errorf("plain records: %v, %+v", err, tr.Measure)
	}
}
