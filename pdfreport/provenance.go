package pdfreport

import (
	"strconv"
	"strings"

	"probity/plan/chrono"
	"probity/plan/record"
)

// provenanceSection prints the data fingerprints and the versions of the
// system, the candidates, the tool and the wording.
func (d *doc) provenanceSection(c *content) {
	rec := c.rec
	fp := rec.Fingerprints
	d.heading("Data fingerprints and versions")
	d.note("SHA-256 digests of the inputs the record was made from. Recompute them (for example with sha256sum) " +
		"to confirm that a file is the one judged here.")
	digest := func(s string) string {
		if s == "" {
			return "not recorded"
		}
		return s
	}
	planFP := fp.Plan
	if planFP == "" {
		planFP = rec.Plan.Fingerprint
	}
	rows := [][]cell{
		kvMono("Plan", digest(planFP)),
		kvMono("Prediction log", digest(fp.Log)),
		kvMono("Manifest", digest(fp.Manifest)),
		kvMono("Ledger", digest(fp.Ledger)),
		kvMono("Worksheet", digest(fp.Worksheet)),
		kvMono("Labels", digest(fp.Labels)),
	}
	if q := rec.LabelQuality; q != nil && q.SecondWorksheet != "" {
		rows = append(rows, kvMono("Second worksheet", q.SecondWorksheet))
	}
	if q := rec.LabelQuality; q != nil && q.Adjudications != "" {
		rows = append(rows, kvMono("Adjudication file", q.Adjudications))
	}
	if fp.Trail != "" {
		rows = append(rows, kvMono("Label trail", fp.Trail))
	}
	d.drawTable(&table{title: "Data fingerprints", cols: []column{{w: 22}, {w: 78}}, rows: rows, keyFill: true, size: bodySize - 0.5})
	d.completeness(c)
	d.chronology(c)

	wording := "embedded set"
	if o := c.tpl.Overridden(); len(o) > 0 {
		wording = "embedded set with " + strings.Join(o, ", ") + " replaced from a templates directory"
	}
	sysVer := rec.SystemVersion
	if sysVer == "" {
		sysVer = "not stated"
	}
	vrows := [][]cell{
		kv("System", joinNonEmpty(", version ", strings.TrimSpace(rec.System), sysVer)),
		kv("Tool", "probity "+rec.ToolVersion+", record format "+strconv.Itoa(rec.Format)),
		kv("Wording", wording),
		kvMono("Wording digest", c.tpl.Fingerprint()),
	}
	d.subheading("Versions", 20)
	d.drawTable(&table{title: "Versions", cols: []column{{w: 22}, {w: 78}}, rows: vrows, keyFill: true, size: bodySize - 0.5})

	if len(rec.Candidates) == 0 {
		return
	}
	var crows [][]cell
	for i, cand := range rec.Candidates {
		crows = append(crows, []cell{{text: itoa(i + 1)}, {text: cand.Name, bold: true}, {text: definition(cand)}})
	}
	d.subheading("Models and thresholds judged, in declared order", 16)
	d.drawTable(&table{
		title: "Models and thresholds judged",
		cols:  []column{{head: "#", w: 5, align: "R"}, {head: "Candidate", w: 30}, {head: "Definition", w: 65}},
		rows:  crows, header: true,
	})
}

// definition says how the plan defines a candidate.
func definition(c record.Candidate) string {
	switch {
	case c.ScoreColumn != "" && c.Threshold != nil:
		return "predicts the positive label when " + c.ScoreColumn + " ≥ " +
			strconv.FormatFloat(*c.Threshold, 'g', -1, 64)
	case c.Column != "":
		return "predicted label in log column " + c.Column
	}
	return "not recorded"
}

// chronology prints when the plan was made, the sample drawn and the
// record issued, each with where its time came from; a time the operator
// supplied is said to be one.
func (d *doc) chronology(c *content) {
	t := c.rec.Chronology
	d.subheading("Chronology", 20)
	if t == nil {
		d.note("This record states no chronology: it was made before probity recorded when each step happened.")
		return
	}
	order := "The plan was made before the sample was drawn, and the sample drawn before this record was issued"
	if t.Labeled != nil {
		order = "The plan was made before the sample was drawn, the sample drawn before its first label, and the last " +
			"label given before this record was issued"
	}
	d.note("When each step happened, in UTC, and where the time came from. " + order + "; probity checked this order when it issued the record.")
	rows := [][]cell{
		kv("Plan made", stampText(t.PlanCreated)),
		kv("Sample drawn", stampText(t.Drawn)),
	}
	if l := t.Labeled; l != nil {
		rows = append(rows, kv("Labeled", l.First.UTC().Format("2006-01-02 15:04:05")+" to "+l.Last.UTC().Format("2006-01-02 15:04:05")+" UTC (label trail)"))
	}
	rows = append(rows, kv("Record issued", stampText(t.Issued)))
	d.drawTable(&table{title: "Chronology", cols: []column{{w: 22}, {w: 78}}, rows: rows, keyFill: true, size: bodySize - 0.5})
}

// completeness prints what the log's time column said about the period:
// the first and last time in scope, the days checked and those without a
// row (also a caveat on page 1), the rows dated outside them. Nothing
// when the draw read no time column.
func (d *doc) completeness(c *content) {
	k := c.rec.Completeness
	if k == nil {
		return
	}
	d.subheading("Data completeness", 24)
	d.note("Read from the log's time column when the sample was drawn, over every row in scope. Times without an offset are " +
		"read as UTC; days are UTC calendar days.")
	of := map[string]string{chrono.RangePeriod: "the period", chrono.RangeDeclared: "declared with the draw", chrono.RangeRows: "first to last row"}[k.RangeOf]
	empty := "none"
	if k.EmptyDayCount > 0 {
		empty = itoa(k.EmptyDayCount) + ": " + strings.Join(k.EmptyDays, ", ")
	}
	rows := [][]cell{
		kv("Time column", k.TimeColumn),
		kv("Rows read", strconv.FormatInt(k.Rows, 10)),
		kv("First time", k.First.UTC().Format("2006-01-02 15:04:05")+" UTC"),
		kv("Last time", k.Last.UTC().Format("2006-01-02 15:04:05")+" UTC"),
		kv("Days checked", k.From+" to "+k.To+" ("+itoa(k.Days)+" days, "+of+")"),
		kv("Days without rows", empty),
		kv("Rows outside", strconv.FormatInt(k.RowsBefore, 10)+" before, "+strconv.FormatInt(k.RowsAfter, 10)+" after"),
	}
	d.drawTable(&table{title: "Data completeness", cols: []column{{w: 22}, {w: 78}}, rows: rows, keyFill: true, size: bodySize - 0.5})
}
