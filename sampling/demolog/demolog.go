// Package demolog generates the invented scenario behind `probity demo`: a
// deterministic synthetic prediction log of an invented rail operator's
// weld-scan classifier, together with the hidden ground truth a labeler
// would find. Nothing in it describes a real organisation or real data.
//
// Every row is generated from its own PCG stream (seed, row index), so the
// log, the truth of any record and therefore every artifact of the demo are
// pure functions of the scenario.
package demolog

import (
	"bufio"
	"fmt"
	"io"
	"math"
	"math/rand/v2"
	"strconv"
	"strings"
)

// Scenario is the invented audit: who, what, and how the log is made.
type Scenario struct {
	// Organisation, System and SystemVersion name the invented operator
	// and its classifier.
	Organisation  string
	System        string
	SystemVersion string
	// Description says in one sentence what the classifier decides.
	Description string
	// Rows is the number of decisions in the log.
	Rows int
	// Month is the period the log covers, YYYY-MM.
	Month string
	// Seed drives the generator.
	Seed uint64
	// Sections are the strata, with their share of rows and their defect
	// prevalence.
	Sections []Section
	// SoundShape (b) and DefectShape (a) shape the scores: a sound weld's
	// score is Beta(1, b), a defective weld's Beta(a, 1), so at threshold
	// t the false-alarm rate is (1−t)^b and the miss rate t^a.
	SoundShape, DefectShape float64
}

// Section is one stratum of the scenario.
type Section struct {
	Name       string
	Share      float64
	Prevalence float64
}

// Labels used by the scenario's classifier and its labelers.
const (
	Defect = "defect"
	Sound  = "sound"
)

// Default returns the built-in scenario: 240 000 ultrasonic weld scans from
// one month on an invented regional railway, four line sections of unequal
// size (tunnels are rare), and a defect score in [0, 1].
func Default() Scenario {
	return Scenario{
		Organisation:  "Orrin Vale Regional Railway (an invented operator)",
		System:        "weldscan-triage",
		SystemVersion: "3.2.0",
		Description:   "flags ultrasonic scans of rail welds as defect or sound; a missed defect can lead to a rail break",
		Rows:          240000,
		Month:         "2026-11",
		Seed:          20261101,
		Sections: []Section{
			{Name: "mainline-north", Share: 0.45, Prevalence: 0.025},
			{Name: "mainline-south", Share: 0.35, Prevalence: 0.030},
			{Name: "branch-lines", Share: 0.185, Prevalence: 0.040},
			{Name: "tunnels", Share: 0.015, Prevalence: 0.060},
		},
		SoundShape:  8,
		DefectShape: 3.2,
	}
}

// Months returns the scenario's two audited months, October then November
// 2026. October's classifier misses fewer defects (DefectShape 4.0 against
// 3.2): the November audit shows the drift a monthly re-check exists for.
func Months() []Scenario {
	oct := Default()
	oct.Month, oct.Seed, oct.DefectShape, oct.Rows = "2026-10", 20261001, 4.0, 232000
	return []Scenario{oct, Default()}
}

// Row is one decision of the log with its hidden truth.
type Row struct {
	RecordID    string
	InspectedOn string
	Section     string
	WeldType    string
	ScanRef     string
	Score       float64
	// Truth is what an expert labeler finds: Defect or Sound.
	Truth string
}

// InspectionDays: scans are inspected on days 1 to 30 of a month, so a
// month of 31 days (the demo's October) has a day without rows, which the
// draw records and the record states on page 1.
const InspectionDays = 30

// TimeColumn is the log column that dates each decision, which the demo's
// plan declares.
const TimeColumn = "inspected_on"

// Header is the log's column list, in order.
var Header = []string{"record_id", "inspected_on", "section", "weld_type", "scan_ref", "defect_score"}

// idPrefix is "WS" and the month as YYMM, e.g. "WS2611-" for 2026-11, so
// the ids of different months never collide.
func (s Scenario) idPrefix() string {
	return "WS" + strings.ReplaceAll(s.Month, "-", "")[2:] + "-"
}

// RecordID returns the id of row i (0-based), e.g. WS2611-0000001.
func (s Scenario) RecordID(i int) string { return fmt.Sprintf("%s%07d", s.idPrefix(), i+1) }

// Index returns the row index of a record id made by RecordID, or -1.
func (s Scenario) Index(id string) int {
	p := s.idPrefix()
	if len(id) != len(p)+7 || !strings.HasPrefix(id, p) {
		return -1
	}
	n, err := strconv.Atoi(id[len(p):])
	if err != nil || n < 1 {
		return -1
	}
	return n - 1
}

// Row returns row i (0-based) of the scenario's log.
func (s Scenario) Row(i int) Row {
	r := rand.New(rand.NewPCG(s.Seed, uint64(i)))
	u := r.Float64()
	sec := s.Sections[len(s.Sections)-1]
	acc := 0.0
	for _, c := range s.Sections {
		acc += c.Share
		if u < acc {
			sec = c
			break
		}
	}
	truth := Sound
	if r.Float64() < sec.Prevalence {
		truth = Defect
	}
	v := r.Float64()
	var score float64
	if truth == Defect {
		score = math.Pow(v, 1/s.DefectShape) // Beta(a, 1) by inversion
	} else {
		score = 1 - math.Pow(v, 1/s.SoundShape) // Beta(1, b) by inversion
	}
	// Rounded as the log prints it, so thresholds act on what is logged.
	score = math.Round(score*1e4) / 1e4
	weld := "thermite"
	if r.Float64() < 0.4 {
		weld = "flash-butt"
	}
	id := s.RecordID(i)
	return Row{
		RecordID:    id,
		InspectedOn: fmt.Sprintf("%s-%02d", s.Month, 1+r.IntN(InspectionDays)),
		Section:     sec.Name,
		WeldType:    weld,
		ScanRef:     "scans/" + s.Month + "/" + id + ".ust",
		Score:       score,
		Truth:       truth,
	}
}

// WriteLog writes the whole log as CSV (with Header) to w.
func (s Scenario) WriteLog(w io.Writer) error {
	bw := bufio.NewWriterSize(w, 1<<16)
	if _, err := fmt.Fprintln(bw, "record_id,inspected_on,section,weld_type,scan_ref,defect_score"); err != nil {
		return err
	}
	for i := 0; i < s.Rows; i++ {
		r := s.Row(i)
		if _, err := fmt.Fprintf(bw, "%s,%s,%s,%s,%s,%.4f\n", r.RecordID, r.InspectedOn, r.Section, r.WeldType, r.ScanRef, r.Score); err != nil {
			return err
		}
	}
	return bw.Flush()
}

// Truth returns the hidden true label of a record id, or "" when the id is
// not in the scenario's log.
func (s Scenario) Truth(id string) string {
	i := s.Index(id)
	if i < 0 || i >= s.Rows {
		return ""
	}
	return s.Row(i).Truth
}

// TrueErrorRate returns the error rate, over the whole log, of the rule
// "predict Defect when score ≥ threshold": the population value the audit
// estimates. It is exact for the generated log, not a model formula.
func (s Scenario) TrueErrorRate(threshold float64) float64 {
	wrong := 0
	for i := 0; i < s.Rows; i++ {
		r := s.Row(i)
		pred := Sound
		if r.Score >= threshold {
			pred = Defect
		}
		if pred != r.Truth {
			wrong++
		}
	}
	return float64(wrong) / float64(s.Rows)
}
