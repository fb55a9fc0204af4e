// Package assemble builds an acceptance record (record.json's content)
// from a plan, a draw folder and the labeled worksheet (with double
// labeling, also the second worksheet and the adjudications): it reads and
// checks the files (Read), resolves double labels (package agreement),
// runs the intake checks, judges every candidate and fills in the plan,
// the fingerprints, the OC curve, the deviations, the method and the
// sign-off (Assemble). Record does both; the record command calls it to
// write a record and the verification of a record calls it again, with
// the stored record's options, to recompute one, so the two cannot drift
// apart.
//
// The package computes and never prints; it reads no clock (the date is
// passed in).
package assemble

import (
	"bytes"
	"errors"
	"fmt"
	"strings"
	"time"

	"probity/plan"
	"probity/plan/agreement"
	"probity/plan/chrono"
	"probity/plan/inputerr"
	"probity/plan/inputfile"
	"probity/plan/planfile"
	"probity/plan/record"
	"probity/plan/record/intake"
	"probity/plan/verdict"
	"probity/sampling/drawfolder"
	"probity/sampling/labeltrail"
	"probity/templates"
)

// OCPoints is the number of OC-curve points a record holds.
const OCPoints = 61

// Files names the files a record is computed from. Second and
// Adjudications are empty without double labeling; Adjudications needs
// Second. Trail is the label trail (labeltrail.FileName in the draw
// folder, "" when the labels were typed into worksheets): the labeled
// worksheet, and the second one when the trail holds second labels, are
// then derived from it, and a Labels or Second file given beside it must
// be the very bytes derived. Labels or Trail must be given.
type Files struct {
	Plan, Draw, Labels    string
	Second, Adjudications string
	Trail                 string
}

// Inputs are the files a record is computed from, read and checked.
type Inputs struct {
	// Plan is the plan read from PlanFile ("" when it was not read from a
	// file), PlanFP its fingerprint.
	Plan     *plan.File
	PlanFile string
	PlanFP   string
	Folder   *drawfolder.Folder
	Labels   *drawfolder.Labels
	// Second is the labeled second worksheet (nil without double
	// labeling), Adjudications the rows of the adjudication file (whose
	// name and SHA-256 are AdjudicationFile and AdjudicationSHA256; empty
	// when none was given).
	Second             *drawfolder.Labels
	Adjudications      []agreement.Adjudication
	AdjudicationFile   string
	AdjudicationSHA256 string
	// Trail is the label trail the labels were derived from (nil when
	// none was given), replayed against the draw; TrailSHA256 is its
	// fingerprint.
	Trail       *labeltrail.State
	TrailSHA256 string
}

// Options are the choices a record is made with, besides its files.
type Options struct {
	// AllowIncomplete counts unlabeled and unsure items as errors.
	AllowIncomplete bool
	// AllowUnadjudicated counts the disagreements of double labeling left
	// without an adjudication as errors; Strict refuses a doubled item
	// labeled twice by one person or without both labelers' names (see
	// agreement.Input).
	AllowUnadjudicated bool
	Strict             bool
	// Use is the declared use (templates.Uses()).
	Use string
	// Issued is when the record is issued: the system clock's time, or
	// one the operator supplied. The record's date is its day (UTC), and
	// it must not be before the draw (see chrono.Chronology).
	Issued chrono.Stamp
	// Signoff holds what the sign-off file gave, any roles; missing roles
	// get a blank line, missing meanings the templates' default.
	Signoff []record.Signoff
	// Templates is the wording set (nil: embedded).
	Templates *templates.Set
	// ToolVersion and SigningKey (the public key fingerprint, "" when
	// unsigned) are written into the record.
	ToolVersion string
	SigningKey  string
	// Revision is the record's revision (0 reads as 1) and Supersedes the
	// id of the record it replaces: "" exactly for revision 1.
	Revision   int
	Supersedes string
	// Demonstration marks a record of the demonstration scenario.
	Demonstration bool
}

// ErrInput is wrapped by errors about the assemble inputs themselves (an
// unknown use, no issue time).
var ErrInput = errors.New("invalid record input")

// Record reads the files (Read) and builds the record from them
// (Assemble).
func Record(files Files, o Options) (*record.Record, error) {
	in, err := Read(files)
	if err != nil {
		return nil, err
	}
	return Assemble(in, o)
}

// Read reads and checks the files of a record: the plan (one that declares
// candidates), the draw folder (drawfolder.Open, against the plan), the
// labeled worksheet and, with double labeling, the labeled second
// worksheet (against the draw's, drawfolder.Folder.CheckSecond) and the
// adjudications; with a label trail, the worksheets derived from it
// (readTrail). Errors are *inputerr.Error values naming the file.
func Read(f Files) (*Inputs, error) {
	p, fp, err := planfile.LoadForJudging(f.Plan)
	if err != nil {
		return nil, err
	}
	in := &Inputs{Plan: p, PlanFile: f.Plan, PlanFP: fp}
	if in.Folder, err = drawfolder.Open(f.Draw, fp, p.CandidateNames()); err != nil {
		return nil, err
	}
	if f.Trail != "" {
		if err := readTrail(in, f); err != nil {
			return nil, err
		}
	} else if in.Labels, err = drawfolder.ReadLabels(f.Labels); err != nil {
		return nil, err
	}
	if in.Second != nil {
		if f.Adjudications != "" {
			if err := readAdjudications(in, f.Adjudications); err != nil {
				return nil, err
			}
		}
		return in, nil
	}
	if f.Second == "" {
		if f.Adjudications != "" {
			return nil, fmt.Errorf("assemble: adjudications given without a second worksheet")
		}
		return in, nil
	}
	if in.Second, err = drawfolder.ReadLabels(f.Second); err != nil {
		return nil, err
	}
	if err := in.Folder.CheckSecond(in.Second); err != nil {
		return nil, err
	}
	if f.Adjudications != "" {
		if err := readAdjudications(in, f.Adjudications); err != nil {
			return nil, err
		}
	}
	return in, nil
}

// readAdjudications reads the adjudication file into in.
func readAdjudications(in *Inputs, path string) error {
	data, err := inputfile.ReadFile(path, "adjudication file", inputfile.TableLimit)
	if err != nil {
		return err
	}
	if in.Adjudications, err = agreement.ParseAdjudications(data, path, in.Plan.Classes); err != nil {
		return err
	}
	in.AdjudicationFile, in.AdjudicationSHA256 = path, record.SHA256(data)
	return nil
}

// ErrNotDerived is the cause of the refusal of a labeled worksheet given
// beside a label trail that is not the worksheet the trail gives.
var ErrNotDerived = errors.New("not the worksheet the label trail gives")

// readTrail reads the label trail, checks its chain and that it belongs
// to the draw (labeltrail.Read, labeltrail.Replay), and derives the
// labeled worksheet from it and, when the trail holds second labels, the
// second worksheet. A worksheet file given beside the trail must have the
// derived bytes; it is then the one read, so that refusals name its
// lines; a derived worksheet names the trail and the line of each item's
// last event.
func readTrail(in *Inputs, f Files) error {
	t, err := labeltrail.Read(f.Trail)
	if err != nil {
		return err
	}
	d, err := labeltrail.DrawOf(in.Folder, in.Plan.Classes)
	if err != nil {
		return err
	}
	st, err := labeltrail.Replay(t, d)
	if err != nil {
		return err
	}
	in.Trail, in.TrailSHA256 = st, t.SHA256
	derive := func(sheet, given string) (*drawfolder.Labels, error) {
		derived, err := st.Labels(sheet)
		if err != nil || given == "" {
			return derived, err
		}
		l, err := drawfolder.ReadLabels(given)
		if err != nil {
			return nil, err
		}
		if !bytes.Equal(l.Bytes, derived.Bytes) {
			return nil, inputerr.At(given, 0, "", "%w %s (%s)", ErrNotDerived, f.Trail, sheet).
				WithHint("the worksheet was edited after labeling; use the trail alone, or derive the worksheet from it again")
		}
		return l, nil
	}
	if in.Labels, err = derive(drawfolder.WorksheetFile, f.Labels); err != nil {
		return err
	}
	if !st.HasEvents(drawfolder.WorksheetSecondFile) {
		return nil
	}
	if in.Second, err = derive(drawfolder.WorksheetSecondFile, f.Second); err != nil {
		return err
	}
	return in.Folder.CheckSecond(in.Second)
}

// Assemble checks the inputs and builds the record. Errors from the intake
// checks are *inputerr.Error values naming the file and line.
func Assemble(in *Inputs, o Options) (*record.Record, error) {
	if err := checkUse(o.Use); err != nil {
		return nil, err
	}
	if o.Issued.IsZero() {
		return nil, inputerr.Errorf("%w: the record has no issue time", ErrInput)
	}
	revision, err := checkRevision(o.Revision, o.Supersedes)
	if err != nil {
		return nil, err
	}
	set := o.Templates
	if set == nil {
		if set, err = templates.Load(""); err != nil {
			return nil, err
		}
	}
	p := in.Plan
	if p.IsSizingOnly() {
		return nil, inputerr.Errorf("%w: the plan declares no candidates, so there is nothing to judge", ErrInput)
	}
	noMiss, err := missMeasure(p, in.PlanFile, o.Use)
	if err != nil {
		return nil, err
	}
	times, err := chronology(in, o.Issued)
	if err != nil {
		return nil, err
	}
	labels := in.Labels
	var resolved *agreement.Result
	if in.Second != nil {
		var err error
		if resolved, err = resolve(in, o); err != nil {
			return nil, err
		}
		relabeled := *labels
		relabeled.Rows = resolved.Relabel(labels.Rows, in.Second.Rows, p.Classes)
		labels = &relabeled
	}
	seq := p.Sequential != nil
	checked, err := intake.Check(p, in.PlanFP, in.Folder, labels, intake.Options{AllowIncomplete: o.AllowIncomplete, Prefix: seq})
	if err != nil {
		return nil, err
	}
	rec := &record.Record{
		Format: record.Format, ToolVersion: o.ToolVersion, Revision: revision, Supersedes: o.Supersedes,
		Demonstration: o.Demonstration, Date: times.Issued.Time.Format(time.DateOnly), Chronology: times,
		Period: in.Folder.Manifest.Period, System: p.System, SystemVersion: p.SystemVersion, Use: o.Use,
		Fingerprints: checked.Fingerprints, SigningKey: o.SigningKey,
		Wording: record.Wording{Digest: set.Fingerprint(), Replaced: set.Overridden()},
	}
	if resolved != nil {
		lq, err := resolved.Judged(checked.Items, &checked.Deviations, in.Folder.Ledger)
		if err != nil {
			return nil, err
		}
		lq.SecondWorksheet, lq.Adjudications = record.SHA256(in.Second.Bytes), in.AdjudicationSHA256
		rec.LabelQuality = lq
	}
	if in.Trail != nil {
		rec.Fingerprints.Trail = in.TrailSHA256
		rec.LabelTrail = trailSummary(in.Trail.Summary())
	}
	res, err := judge(p, checked, in.Folder.Manifest)
	if err != nil {
		return nil, err
	}
	rec.Plan = planInfo(p, in.PlanFP, in.Folder)
	rec.Candidates = res.Candidates
	rec.OverallVerdict = res.Overall
	rec.Method = res.Method
	rec.Method.Assumptions = append(rec.Method.Assumptions, res.Notes...)
	if err := judgeMeasures(rec, p, in.Folder.Manifest, checked); err != nil {
		return nil, err
	}
	if w := weightsNote(in.Folder.Manifest, checked.Design); w != "" {
		rec.Method.Assumptions = append(rec.Method.Assumptions, w)
	}
	rec.Deviations = checked.Deviations
	rec.Deviations.NoMissMeasure = noMiss
	if in.Second == nil {
		rec.Deviations.DoubleNotLabeled = in.Folder.Manifest.Double
	}
	for _, s := range checked.Design.Strata {
		w := 0.0
		if s.Sample > 0 {
			w = float64(s.Population) / float64(s.Sample)
		}
		rec.Strata = append(rec.Strata, record.StratumCount{Label: s.Label, Population: s.Population, Sample: s.Sample, Weight: w})
	}
	if seq {
		if rec.OC, err = verdict.SequentialOC(p, OCPoints, ocTop(p)); err != nil {
			return nil, inputerr.Errorf("%w: %v", ErrInput, err)
		}
	} else {
		for _, pt := range p.OC(OCPoints) {
			rec.OC = append(rec.OC, record.OCPoint{Error: pt.Error, AcceptProbability: pt.AcceptProbability})
		}
		if a := res.Applied; a != nil && a.Kind == verdict.CountRule {
			// the curve of the rule actually applied, on the same grid
			errs := make([]float64, len(rec.OC))
			for i, pt := range rec.OC {
				errs[i] = pt.Error
			}
			if rec.OC, err = a.OC(errs); err != nil {
				return nil, err
			}
		}
	}
	if rec.Signoff, err = signoff(o.Signoff, set, rec); err != nil {
		return nil, err
	}
	rec.Caveats = caveats(rec)
	if rec.Completeness = in.Folder.Manifest.Completeness; rec.Completeness != nil {
		if cv, ok := completenessCaveat(rec.Completeness); ok {
			rec.Caveats = append(rec.Caveats, cv)
		}
	}
	rec.Normalize()
	if rec.RecordID, err = record.ID(rec); err != nil {
		return nil, err
	}
	return rec, nil
}

// chronology is the record's time line: the plan's creation time (from
// the plan file), the draw time (from the manifest) and the issue time,
// refused (an input error naming the three times) unless in that order.
func chronology(in *Inputs, issued chrono.Stamp) (*chrono.Chronology, error) {
	c := &chrono.Chronology{PlanCreated: chrono.Stamp{Time: chrono.Second(in.Plan.Created), Source: in.Plan.CreatedFrom}, Issued: issued}
	if d := in.Folder.Manifest.Drawn; d != nil {
		c.Drawn = chrono.Stamp{Time: chrono.Second(d.Time), Source: d.Source}
	}
	if in.Trail != nil {
		if s := in.Trail.Summary(); s.Events > 0 {
			c.Labeled = &chrono.Span{First: chrono.Second(s.First), Last: chrono.Second(s.Last)}
		}
	}
	err := c.Check()
	var oe *chrono.OrderError
	if !errors.As(err, &oe) {
		return c, err
	}
	e := &inputerr.Error{Msg: err.Error(), Err: errors.Join(ErrChronology, err),
		Hint: "a record is issued after its sample was drawn, and the sample drawn after its plan was made: check the times given, and that the plan and the draw folder are this audit's"}
	switch oe.Step {
	case "issued", "labeled last":
	case "labeled":
		e.Hint = "the label trail records labels given before the sample was drawn: it is not this draw's trail, or the clocks disagree"
	default:
		e.File, e.Field = in.Folder.Path(drawfolder.ManifestFile), "drawn"
		if c.Drawn.IsZero() {
			e.Hint = "draw the sample again with this version of probity: its manifest records when the sample was drawn"
		}
	}
	return nil, e
}

// ErrChronology is wrapped by the refusal of a record whose times are out
// of order (plan created, sample drawn, record issued), so the command
// can name its option in the hint.
var ErrChronology = errors.New("chronology out of order")

// trailSummary is what the record says about the label trail.
func trailSummary(s labeltrail.Summary) *record.LabelTrail {
	t := &record.LabelTrail{Labelers: s.Labelers, Events: s.Events, Changed: s.Changed}
	if s.Events > 0 {
		t.FirstLabel, t.LastLabel = labeltrail.FormatTime(s.First), labeltrail.FormatTime(s.Last)
	}
	return t
}

// checkRevision returns the revision number (0 reads as 1) after checking
// it against the id of the record superseded: a first issue supersedes
// nothing, a later one names the record it replaces.
func checkRevision(revision int, supersedes string) (int, error) {
	if revision == 0 {
		revision = 1
	}
	switch {
	case revision < 1:
		return 0, inputerr.Errorf("%w: revision %d is not a positive whole number", ErrInput, revision)
	case supersedes != "" && !record.IsID(supersedes):
		return 0, inputerr.Errorf("%w: %q is not a record id (%d lowercase hex digits, as record.json's record_id)", ErrInput, supersedes, record.IDLength)
	case supersedes != "" && revision == 1:
		return 0, inputerr.Errorf("%w: a record that supersedes another is revision 2 or later", ErrInput)
	case supersedes == "" && revision > 1:
		return 0, inputerr.Errorf("%w: revision %d must name the record it supersedes", ErrInput, revision)
	}
	return revision, nil
}

// resolve checks the second worksheet and the adjudications against the
// ledger and the labeled worksheet and gives every item its final label.
func resolve(in *Inputs, o Options) (*agreement.Result, error) {
	return agreement.Resolve(agreement.Input{
		Classes: in.Plan.Classes,
		Ledger:  in.Folder.Ledger, LedgerFile: in.Folder.Path(drawfolder.LedgerFile),
		First: in.Labels.Rows, FirstFile: in.Labels.Path,
		Second: in.Second.Rows, SecondFile: in.Second.Path,
		Adjudications: in.Adjudications, AdjudicationFile: in.AdjudicationFile,
		Strict: o.Strict, AllowUnadjudicated: o.AllowUnadjudicated,
		Ceiling: in.Plan.Inputs.Ceiling,
	})
}

func checkUse(use string) error {
	for _, u := range templates.Uses() {
		if u == use {
			return nil
		}
	}
	return inputerr.Errorf("%w: use %q is not one of %s", ErrInput, use, strings.Join(templates.Uses(), ", "))
}

// judge runs the verdict package on the checked items, with the
// anticipated errors per stratum the draw recorded (Neyman allocation).
func judge(p *plan.File, c *intake.Result, m *drawfolder.Manifest) (*verdict.Result, error) {
	in := verdict.Input{Plan: p, Design: c.Design, Items: c.Items, Rates: m.AnticipatedRates()}
	if p.Sequential != nil {
		return verdict.JudgeSequential(in)
	}
	return verdict.Judge(in)
}

// weightsNote says what the allocation did to the inclusion weights
// N_h/n_h, when they differ: through the rounding of proportional shares,
// a minimum per stratum or another allocation rule.
func weightsNote(m *drawfolder.Manifest, d verdict.Design) string {
	s := d.MaxWeightSpread()
	if s <= 1e-12 {
		return ""
	}
	why := "the " + m.Allocation.Rule + " allocation"
	if m.Allocation.Rule == "proportional" || m.Allocation.Rule == "" {
		why = "the rounding of the proportional allocation"
	}
	if m.Allocation.MinPerStratum > 0 {
		why += fmt.Sprintf(" and the minimum of %d per stratum", m.Allocation.MinPerStratum)
	}
	// below twice the smallest the difference reads as a percentage; above
	// it, as a factor ("up to 2853.85 % apart" read as a misprint)
	spread := strings.TrimSuffix(fmt.Sprintf("%.2f", 100*s), ".00") + " % above the smallest"
	if s >= 1 {
		spread = strings.TrimSuffix(fmt.Sprintf("%.2f", 1+s), ".00") + " times the smallest"
	}
	return fmt.Sprintf("The strata's inclusion weights N_h/n_h differ through %s: the largest is %s. The estimate weights each stratum by N_h/N, and the verdict uses a rule that holds whatever the weights (see the method).",
		why, spread)
}

// ocTop is the right end of a sequential plan's OC curve: three times the
// ceiling, at most 1.
func ocTop(p *plan.File) float64 {
	return min(1, 3*p.Inputs.Ceiling)
}

// planInfo repeats the plan's rule and inputs.
func planInfo(p *plan.File, fp string, f *drawfolder.Folder) record.PlanInfo {
	in := p.Inputs
	return record.PlanInfo{
		Fingerprint: fp, Method: in.Method, Model: p.Rule.Model, Design: in.Design,
		Multiplicity: in.Multiplicity, Require: in.Require, Ceiling: in.Ceiling, Confidence: in.Confidence,
		CandidateCount: in.CandidateCount, Anticipated: in.Anticipated, Population: record.LotSize(in.Population),
		SampleSize: p.Rule.SampleSize, AcceptanceNumber: p.Rule.AcceptanceNumber,
		PerCandidateRisk: p.Rule.PerCandidateRisk, ConsumerRisk: p.Rule.ConsumerRisk, ProducerRisk: p.Rule.ProducerRisk,
		Seed: p.Seed, SelectionSeed: f.Manifest.SelectionSeed,
	}
}

// signoff returns the three sign-off lines in print order (prepared,
// reviewed, approved), each with its meaning (the templates' default when
// the sign-off file gave none) and blank when not given.
func signoff(given []record.Signoff, set *templates.Set, rec *record.Record) ([]record.Signoff, error) {
	byRole := map[string]record.Signoff{}
	for _, s := range given {
		byRole[s.Role] = s
	}
	// No record id: a meaning is part of what the id covers (and the
	// templates refuse a meaning that prints it).
	f := templates.Fields{System: rec.System, SystemVersion: rec.SystemVersion, Period: rec.Period, Date: rec.Date, Use: rec.Use}
	f.ReleaseRule, f.Released, f.NoRelease = rec.ReleaseFields()
	var out []record.Signoff
	for _, role := range templates.Roles() {
		s := byRole[role]
		s.Role = role
		if strings.TrimSpace(s.Meaning) == "" {
			m, err := set.SignatureMeaning(role, f)
			if err != nil {
				return nil, err
			}
			s.Meaning = strings.TrimSpace(m)
		}
		out = append(out, s)
	}
	return out, nil
}
