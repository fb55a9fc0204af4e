package pdfreport

import (
	"strconv"
	"strings"

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
	if fp.Trail != "" {
		rows = append(rows, kvMono("Label trail", fp.Trail))
	}
	d.drawTable(&table{title: "Data fingerprints", cols: []column{{w: 22}, {w: 78}}, rows: rows, keyFill: true, size: bodySize - 0.5})

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
