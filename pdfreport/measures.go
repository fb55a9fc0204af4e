package pdfreport

import (
	"math"
	"slices"
	"strings"

	"probity/plan/measure"
	"probity/plan/numfmt"
	"probity/plan/record"
)

// hasMeasures reports whether the record judges error measures with
// their own denominators (record.Record.Measures): its verdicts rest on
// the claims, and the pages show them in place of the overall error's
// count rule.
func hasMeasures(rec *record.Record) bool { return len(rec.Measures) > 0 }

// measureTitle names a measure in words with its short name:
// "false-negative rate (miss rate), fnr".
func measureTitle(name string) string {
	m, err := measure.ParseMeasure(name)
	if err != nil {
		return name
	}
	return m.Title() + ", " + name
}

// measureOrder lists the record's measures in the order they were first
// claimed.
func measureOrder(rec *record.Record) []string {
	var out []string
	for _, m := range rec.Measures {
		if !slices.Contains(out, m.Measure) {
			out = append(out, m.Measure)
		}
	}
	return out
}

// ceilingsText lists the claims' ceilings by measure for the wording:
// "fnr below 20 %, error below 2 %"; a measure whose candidates have
// different ceilings lists each.
func ceilingsText(rec *record.Record) string {
	var parts []string
	for _, name := range measureOrder(rec) {
		var cs []string
		for _, m := range rec.Measures {
			if m.Measure == name && !slices.Contains(cs, numfmt.Setting(m.Ceiling)) {
				cs = append(cs, numfmt.Setting(m.Ceiling))
			}
		}
		if len(cs) == 1 {
			parts = append(parts, name+" below "+cs[0])
			continue
		}
		for _, m := range rec.Measures {
			if m.Measure == name {
				parts = append(parts, name+" of "+m.Candidate+" below "+numfmt.Setting(m.Ceiling))
			}
		}
	}
	return strings.Join(parts, ", ")
}

// claimLevels are the least and the largest level the claims were
// judged at (their share of δ, or the levels of Holm's steps).
func claimLevels(rec *record.Record) (lo, hi float64) {
	lo, hi = math.Inf(1), 0
	for _, m := range rec.Measures {
		lo, hi = min(lo, m.Level), max(hi, m.Level)
	}
	return lo, hi
}

// positiveClass is the record's positive class ("the positive class"
// when the record does not name it).
func positiveClass(rec *record.Record) string {
	if p := rec.MeasurePlan; p != nil && p.Positive != "" {
		return p.Positive
	}
	return "the positive class"
}

// isReleased reports whether the record releases the candidate.
func isReleased(rec *record.Record, name string) bool {
	return rec.Released != nil && rec.Released.Candidate != "" && rec.Released.Candidate == name
}

// estimateText is a claim's estimate, or "undefined" (no labels in a
// stratum, or an estimated denominator of zero).
func estimateText(m record.MeasureVerdict) string {
	if m.Estimate == nil {
		return "undefined"
	}
	return numfmt.Rate(*m.Estimate)
}

// measuresSummary is page 1 of a record of measures: the release (or
// the overall verdict) in the banner, the caveats and the plan's reason
// for claiming no measure on missed positives, then every claim grouped
// by measure: candidate, ceiling, estimate, upper bound and verdict.
func (d *doc) measuresSummary(c *content) {
	rec := c.rec
	d.heading("Decision summary")
	d.verdictBanner(c)
	d.caveatsBox(c)
	d.noMissMeasureBox(c)
	cols := []column{
		{head: "Candidate", w: 1},
		{head: "Ceiling", fit: true, align: "R"},
		{head: "Estimate", fit: true, align: "R"},
		{head: "Upper bound", fit: true, align: "R"},
		{head: "Verdict", fit: true, align: "C"},
	}
	var rows [][]cell
	var keep []bool
	for _, name := range measureOrder(rec) {
		rows = append(rows, spanRow(cell{text: strings.ToUpper(measureTitle(name)[:1]) + measureTitle(name)[1:], bold: true}))
		keep = append(keep, true)
		for _, m := range rec.Measures {
			if m.Measure != name {
				continue
			}
			cand := cell{text: m.Candidate}
			if isReleased(rec, m.Candidate) {
				cand = cell{text: m.Candidate + " (released)", bold: true}
			}
			rows = append(rows, []cell{cand, {text: numfmt.Setting(m.Ceiling)}, {text: estimateText(m)},
				{text: numfmt.RateUp(m.UpperBound), bold: true}, verdictCell(m.Verdict)})
			keep = append(keep, false)
		}
		// the measure's title stays with its first claim
		keep[len(keep)-1] = false
	}
	d.subheading("Claims by measure", d.leadHeight(&table{cols: cols, rows: rows[:min(2, len(rows))], header: true}))
	d.drawTable(&table{title: "Claims by measure", cols: cols, rows: rows, header: true, keep: keep})
	lo, hi := claimLevels(rec)
	conf := "at " + numfmt.Confidence(1-lo)
	if hi != lo {
		conf = "at the confidence of the step that tested it (" + numfmt.Confidence(1-lo) + " to " + numfmt.Confidence(1-hi) + ")"
	}
	d.note("Each upper bound is one-sided, " + conf + ", and rounded up; a claim is accepted when its bound is below its ceiling, " +
		"and a candidate when all its claims are. Rates are taken for " + positiveClass(rec) + " against " + otherWords(negativeClass(rec)) + "; " +
		"estimates weight each stratum by its size. The labeled counts behind each claim are under the results by measure.")
}

// noMissMeasureBox states on page 1 the plan's reason for claiming no
// measure on missed positives in a record of a safety, medical or
// vehicle use (a deviation).
func (d *doc) noMissMeasureBox(c *content) {
	r := strings.TrimSpace(c.rec.Deviations.NoMissMeasure)
	if r == "" {
		return
	}
	d.subheading("Deviation from what a "+c.use+" use needs", 2*lineH)
	d.font("", bodySize)
	text := "A " + c.use + " use needs a claim on the misses of the positive class " + positiveClass(c.rec) + " (the false-negative rate or the false omission rate); " +
		"this plan claims neither and states why: \u201c" + r + "\u201d"
	d.amberLines(d.wrap(text, d.contentW()-5))
	d.space(2)
}

// measuresFindings prints, under the statement of conformity, each
// candidate's finding: its claims' bounds against their ceilings, and
// whether it is the one released.
func (d *doc) measuresFindings(c *content) {
	rec := c.rec
	d.subheading("Findings", 2*lineH)
	for _, cand := range rec.Candidates {
		var claims []string
		for _, m := range rec.Measures {
			if m.Candidate == cand.Name {
				claims = append(claims, m.Measure+" "+numfmt.RateUp(m.UpperBound)+" against "+numfmt.Setting(m.Ceiling)+" ("+m.Verdict+")")
			}
		}
		finding := "does not conform"
		if cand.Verdict == record.Accept {
			finding = "conforms"
		}
		text := cand.Name + " " + finding + " (" + cand.Verdict + "): upper bounds " + strings.Join(claims, "; ") + "."
		if isReleased(rec, cand.Name) {
			text += " It is the candidate released."
		}
		d.bullet(text)
	}
	if s := rec.ReleaseStatement(); s != "" {
		d.bullet(strings.ToUpper(s[:1]) + s[1:] + ".")
	}
	d.space(1)
}

// sideCounts are the labeled counts of one side of a claim: "27 / 24,407".
func sideCounts(events, counted int) string { return itoa(events) + " / " + itoa(counted) }

// measuresSection prints the claims measure by measure with the labeled
// counts each rests on (both sides of a ratio), the estimate, the upper
// bound at its confidence, whether the design was sized for the claim,
// and the verdict.
func (d *doc) measuresSection(c *content) {
	rec := c.rec
	pos := positiveClass(rec)
	type part struct {
		title, definition string
		t                 *table
	}
	var parts []part
	for _, name := range measureOrder(rec) {
		m, _ := measure.ParseMeasure(name)
		missed, alarms := column{head: "Cleared: missed / counted", w: 1, align: "R"}, column{head: "Flagged: false alarms / counted", w: 1, align: "R"}
		var sides []column
		switch m {
		case measure.Error:
			sides = []column{{head: "Wrong / counted", w: 1, align: "R"}}
		case measure.FOR:
			sides = []column{missed}
		case measure.FDR:
			sides = []column{alarms}
		case measure.FNR:
			sides = []column{missed, alarms}
		case measure.FPR:
			sides = []column{alarms, missed}
		}
		// the candidate's name never breaks; the counts' headings wrap
		cols := append([]column{{head: "Candidate", fit: true}}, sides...)
		cols = append(cols, column{head: "Estimate", fit: true, align: "R"}, column{head: "Upper bound", fit: true, align: "R"},
			column{head: "Confidence", fit: true, align: "R"}, column{head: "Ceiling", fit: true, align: "R"},
			column{head: "Planned", fit: true, align: "C"}, column{head: "Verdict", fit: true, align: "C"})
		var rows [][]cell
		for _, v := range rec.Measures {
			if v.Measure != name {
				continue
			}
			row := []cell{{text: v.Candidate}, {text: sideCounts(v.Events, v.Labeled)}}
			if m.Ratio() {
				row = append(row, cell{text: sideCounts(v.EventsOther, v.LabeledOther)})
			}
			planned := "yes"
			if !v.Planned {
				planned = "no"
			}
			row = append(row, cell{text: estimateText(v)}, cell{text: numfmt.RateUp(v.UpperBound), bold: true},
				cell{text: numfmt.Confidence(1 - v.Level)}, cell{text: numfmt.Setting(v.Ceiling)}, cell{text: planned}, verdictCell(v.Verdict))
			rows = append(rows, row)
		}
		title := strings.ToUpper(measureTitle(name)[:1]) + measureTitle(name)[1:]
		parts = append(parts, part{title, measureDefinition(m, pos), &table{title: title, cols: cols, rows: rows, header: true}})
	}
	// the heading and its note stay with the first measure's table
	d.headingKeep("Results by measure", 30+d.leadHeight(parts[0].t))
	d.note("Flagged: the decisions a candidate predicts as " + pos + "; cleared: every other decision. The counts are the labeled " +
		"items the draw's design counts for the claim (fixed before any label); the estimate uses every labeled item. " +
		"Planned: the design was sized for the claim's producer's risk on the log's strata (its false-accept risk holds either way).")
	for _, p := range parts {
		d.subheading(p.title, d.leadHeight(p.t)+2*lineH)
		d.note(p.definition)
		d.drawTable(p.t)
	}
}

// measureDefinition says what a measure counts, for its table.
func measureDefinition(m measure.Measure, pos string) string {
	switch m {
	case measure.Error:
		return "Wrong decisions among all decisions (any wrong class)."
	case measure.FNR:
		return "Misses among the true positives (" + pos + "): FN / (FN + TP). The misses are counted among the cleared decisions, " +
			"the true positives among the flagged ones through the false alarms there."
	case measure.FPR:
		return "False alarms among the true negatives: FP / (FP + TN). The false alarms are counted among the flagged decisions; " +
			"the true negatives among the cleared ones through the misses there."
	case measure.FOR:
		return "Misses (true " + pos + ") among the cleared decisions: FN / (FN + TN)."
	case measure.FDR:
		return "False alarms among the flagged decisions: FP / (FP + TP)."
	}
	return ""
}

// estimatedConfusion prints each candidate's estimated confusion matrix
// in decisions of the population (record.EstimatedConfusion), with the
// estimated prevalence of the positive class.
func (d *doc) estimatedConfusion(c *content) {
	rec := c.rec
	if len(rec.EstimatedConfusion) == 0 {
		return
	}
	pos := positiveClass(rec)
	neg := negativeClass(rec)
	d.subheading("Estimated confusion in the population", 3*lineH)
	prev := "Estimated prevalence of " + pos + ": " + numfmt.Rate(rec.EstimatedConfusion[0].Prevalence)
	if p := rec.MeasurePlan; p != nil && p.Prevalence > 0 {
		prev += " (the plan anticipated " + numfmt.Setting(p.Prevalence) + ")"
	}
	d.note(prev + ". Each cell is the estimated number of decisions in the population, each stratum's labeled counts weighted by " +
		"N_h/n_h and rounded to whole decisions; rows are the true class, columns the prediction (" + pos + " against " + otherWords(neg) + ").")
	width := min(30+17*3.0, (d.contentW()-matrixGap)/2)
	var ms []*matrix
	for _, e := range rec.EstimatedConfusion {
		round := func(x float64) string { return numfmt.Count(int64(math.Round(x))) }
		cols := []column{{head: "True \\ predicted", w: 1.6}, {head: pos, w: 1, align: "R"}, {head: neg, w: 1, align: "R"}, {head: "Total", w: 1, align: "R"}}
		rows := [][]cell{
			{{text: pos, bold: true}, {text: round(e.TP), fill: &diagFill}, {text: round(e.FN), fill: &errFill, bold: true}, {text: round(e.TP + e.FN)}},
			{{text: neg, bold: true}, {text: round(e.FP), fill: &errFill, bold: true}, {text: round(e.TN), fill: &diagFill}, {text: round(e.FP + e.TN)}},
			{{text: "Total", bold: true}, {text: round(e.TP + e.FP)}, {text: round(e.FN + e.TN)}, {text: round(e.TP + e.FP + e.FN + e.TN), bold: true}},
		}
		title := "Estimated: " + e.Candidate
		ms = append(ms, &matrix{title: title, t: &table{title: title, cols: cols, rows: rows, header: true, width: width}})
	}
	for i := 0; i < len(ms); i += 2 {
		if i+1 < len(ms) {
			d.matrixRow(ms[i], ms[i+1])
		} else {
			d.matrixRow(ms[i], nil)
		}
	}
}

// measuresPlanInfo prints what a plan with measures declared: the
// positive class, the claims with their ceilings, the multiplicity over
// them, the anticipated prevalence, the release rule, the labels drawn
// and the seeds.
func (d *doc) measuresPlanInfo(c *content) {
	rec := c.rec
	p := rec.Plan
	f := c.fields
	d.heading("The plan")
	var names []string
	for _, cand := range rec.Candidates {
		names = append(names, cand.Name)
	}
	rows := [][]cell{
		kv("Positive (critical) class", positiveClass(rec)),
		kv("Claims (measure below its ceiling)", ceilingsText(rec)+"; "+itoa(len(rec.Measures))+" claims on "+plural(len(names), "candidate", "candidates")+": "+strings.Join(names, ", ")),
		kv("Confidence (family-wise)", f.Confidence+" (risk δ = "+f.FamilyRisk+")"),
	}
	if len(rec.Measures) > 1 {
		rows = append(rows, kv("Multiplicity", p.Multiplicity.Title()+" over the "+itoa(len(rec.Measures))+" claims"))
	}
	lo, hi := claimLevels(rec)
	per := numfmt.Confidence(1-lo) + " (risk " + numfmt.Chance(lo) + ")"
	if hi != lo {
		per = "from " + numfmt.Confidence(1-lo) + " at the first step to " + numfmt.Confidence(1-hi)
	}
	rows = append(rows, kv("Per-claim confidence", per))
	if mp := rec.MeasurePlan; mp != nil && mp.Prevalence > 0 {
		rows = append(rows, kv("Anticipated prevalence", numfmt.Setting(mp.Prevalence)+" of decisions are truly "+positiveClass(rec)))
	}
	release := "none declared: no candidate is named for release"
	if rec.ReleaseRule != "" {
		release = record.ReleaseRuleText(rec.ReleaseRule) + " (declared before any label)"
	}
	rows = append(rows, kv("Release rule", release))
	rows = append(rows, kv("Labels drawn", itoa(f.SampleSize)+" decisions, stratified by the candidates' predictions"))
	if p.Seed != "" {
		rows = append(rows, kvMono("Plan seed", p.Seed))
	}
	if p.SelectionSeed != "" && p.SelectionSeed != p.Seed {
		rows = append(rows, kvMono("Selection seed", p.SelectionSeed))
	}
	d.drawTable(&table{title: "The plan", cols: []column{{w: 32}, {w: 68}}, rows: rows, keyFill: true, size: bodySize - 0.5})
	if s := selectionFormula(rec); s != "" {
		d.note(s)
	}
}

// negativeClass is the other class of a binary plan, or "other" (every
// class but the positive one).
func negativeClass(rec *record.Record) string {
	pos := positiveClass(rec)
	if len(rec.Candidates) > 0 {
		if cl := rec.Candidates[0].Confusion.Classes; len(cl) == 2 && slices.Contains(cl, pos) {
			if cl[0] == pos {
				return cl[1]
			}
			return cl[0]
		}
	}
	return "other"
}

// otherWords names the negative side of the one-vs-rest matrices: the
// other class of a binary plan, or every other class.
func otherWords(neg string) string {
	if neg == "other" {
		return "every other class"
	}
	return neg
}
