package pdfreport

import "strings"

// labelTrailSection says what the labeling's audit trail records: who
// labeled, the first and last label time, the number of label events
// and of changed labels. A record whose labels came from worksheets alone
// (LabelTrail nil) has no such section.
func (d *doc) labelTrailSection(c *content) {
	t := c.rec.LabelTrail
	if t == nil {
		return
	}
	d.heading("Labeling audit trail")
	d.body("The labels were given on probity's labeling page and derived from its audit trail: one entry per label " +
		"event (labeler, UTC time, item, previous and new value, note, reason for a change), each carrying the SHA-256 " +
		"of the entry before it, written to disk before the page confirmed it. The trail's fingerprint is listed with " +
		"the data fingerprints; the labeled worksheets are derived from it byte for byte.")
	labelers := "none"
	if len(t.Labelers) > 0 {
		names := make([]string, len(t.Labelers))
		for i, l := range t.Labelers {
			names[i] = labelerName(l)
		}
		labelers = strings.Join(names, ", ")
	}
	rows := [][]cell{
		kv("Labelers", labelers),
		kv("First label", trailTime(t.FirstLabel)),
		kv("Last label", trailTime(t.LastLabel)),
		kv("Label events", itoa(t.Events)),
		kv("Changed labels", itoa(t.Changed)+" (each with its reason in the trail)"),
	}
	d.drawTable(&table{title: "Labeling audit trail", cols: []column{{w: 26}, {w: 74}}, rows: rows, keyFill: true, size: bodySize - 0.5})
}

// trailTime prints a time of the record's trail summary as recorded (UTC,
// ISO 8601 with milliseconds), or a dash when there is none.
func trailTime(s string) string {
	if s == "" {
		return "–"
	}
	return s + " (UTC)"
}
