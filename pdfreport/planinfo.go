package pdfreport

import (
	"strings"

	"probity/plan"
	"probity/plan/numfmt"
	"probity/plan/record"
)

// kv is one key/value row.
func kv(key, value string) []cell {
	return []cell{{text: key}, {text: value}}
}

// kvMono is a key/value row with a fixed-width value (digests, seeds).
func kvMono(key, value string) []cell {
	return []cell{{text: key}, {text: value, mono: true}}
}

// planInfo prints the plan's inputs and rule.
func (d *doc) planInfo(c *content) {
	p := c.rec.Plan
	f := c.fields
	d.heading("The plan")
	var names []string
	for _, cand := range c.rec.Candidates {
		names = append(names, cand.Name)
	}
	cands := itoa(p.CandidateCount)
	if len(names) > 0 {
		cands += ": " + strings.Join(names, ", ")
	}
	rows := [][]cell{
		kv("Error ceiling", f.Ceiling),
		kv("Confidence (family-wise)", f.Confidence+" (risk δ = "+f.FamilyRisk+")"),
		kv("Candidates (M)", cands),
	}
	if p.CandidateCount > 1 {
		rows = append(rows,
			kv("Multiplicity", p.Multiplicity.Title()+"; "+p.Require.Title()),
		)
	}
	rows = append(rows,
		kv("Per-candidate confidence", f.BoundConfidence+" (risk "+f.PerCandidateRisk+")"),
		kv("Decision rule", joinNonEmpty("; ", ruleName(p.Method, p.Model), p.Design.Title())),
		kv("Sample size n", itoa(p.SampleSize)+" decisions"),
	)
	if p.Design != plan.DesignSequential {
		use := " (accept when errors ≤ c)"
		if f.CountRule {
			use = " (for a simple random sample; this draw is judged by the stratified count rule below)"
		} else if f.Weighted {
			use = " (for a self-weighting sample; this one is weighted, so the bound decides)"
		}
		rows = append(rows, kv("Acceptance number c", itoa(p.AcceptanceNumber)+use))
	}
	if r := c.rec.Method.Rule; r != nil && r.Name == record.RuleStratifiedCount {
		rows = append(rows,
			kv("Rule applied to this draw", "stratified count rule: accept when at most "+itoa(r.AcceptanceNumber)+" of the "+itoa(r.CountedSize)+" counted items are errors"),
			kv("Its consumer's risk", "at most "+numfmt.ChanceUp(r.ConsumerRiskBound)+" for a candidate at the ceiling, wherever its errors sit"))
		if r.ProducerRisk != nil {
			rows = append(rows, kv("Its producer's risk", numfmt.Chance(*r.ProducerRisk)+" at "+r.AnticipatedFrom))
		}
	}
	atCeiling := "P(accept | error = ceiling) = "
	if p.Population > 0 {
		atCeiling = "P(accept | lot error at the ceiling) = "
	}
	rows = append(rows, kv("Consumer's risk", atCeiling+numfmt.Chance(p.ConsumerRisk)))
	if p.Anticipated != nil {
		rows = append(rows, kv("Anticipated error p0", f.Anticipated))
	}
	if p.ProducerRisk != nil {
		rows = append(rows, kv("Producer's risk", "P(reject | error = p0) = "+numfmt.Chance(*p.ProducerRisk)))
	}
	if p.Population > 0 {
		rows = append(rows, kv("Population N", numfmt.Count(p.Population)+" decisions (finite lot)"))
	} else {
		rows = append(rows, kv("Population", "unbounded stream of decisions"))
	}
	if p.Seed != "" {
		rows = append(rows, kvMono("Plan seed", p.Seed))
	}
	if p.SelectionSeed != "" && p.SelectionSeed != p.Seed {
		rows = append(rows, kvMono("Selection seed", p.SelectionSeed))
	}
	d.drawTable(&table{title: "The plan", cols: []column{{w: 32}, {w: 68}}, rows: rows, keyFill: true, size: bodySize - 0.5})
	if f := selectionFormula(c.rec); f != "" {
		d.note(f)
	}
}

// selectionFormula says how the draw computed the selection keys from the
// seeds and the record ids, as package sampling does (sampling.Key and
// sampling.PeriodSeed): for a periodic draw the selection seed is
// sha256hex("<plan seed>:period:<period>"), else the plan seed itself;
// each row's key is sha256hex("<selection seed>:<record id>").
func selectionFormula(rec *record.Record) string {
	p := rec.Plan
	if p.Seed == "" && p.SelectionSeed == "" {
		return ""
	}
	seed := "the plan seed itself"
	if p.SelectionSeed != "" && p.SelectionSeed != p.Seed && rec.Period != "" {
		seed = `the lowercase hex SHA-256 of the UTF-8 bytes "<plan seed>:period:` + rec.Period + `"`
	}
	return "How the sample was selected: the selection seed is " + seed + `. Each row of the log has the key ` +
		`key = lowercase hex SHA-256 of the UTF-8 bytes "<selection seed>:<record id>"; in each stratum the n_h rows ` +
		"with the smallest keys form the sample and the next ones, in key order, the spares. Anyone holding the log " +
		"and the plan can recompute every key (for example with sha256sum) and so the whole selection."
}

// ruleName says which rule the plan uses and, for the exact test, under
// which model.
func ruleName(method plan.Method, model plan.Model) string {
	switch method {
	case plan.MethodExact:
		return method.Title() + ", " + model.Title()
	case plan.MethodHoeffding, plan.MethodKL:
		return method.Title()
	}
	return joinNonEmpty("; ", method.String(), model.Title())
}
