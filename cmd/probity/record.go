package main

import (
	"crypto/ed25519"
	"errors"
	"fmt"
	"strings"

	"github.com/spf13/cobra"

	"probity/pdfreport"
	"probity/plan/agreement"
	"probity/plan/chrono"
	"probity/plan/inputerr"
	"probity/plan/inputfile"
	"probity/plan/numfmt"
	"probity/plan/record"
	"probity/plan/record/assemble"
	"probity/plan/record/intake"
	"probity/plan/record/signature"
	"probity/templates"
)

// recordOptions are the flags of probity record.
type recordOptions struct {
	planPath        string
	drawDir         string
	labels          string
	trail           string
	out             string
	signoff         string
	use             string
	signKey         string
	allowIncomplete bool
	date            string
	paper           string
	templatesDir    string
	bound           string
	force           bool
	json            bool
	// supersedes is the id of the record this one replaces, revision its
	// revision number (0: 1, or 2 with supersedes).
	supersedes string
	revision   int
	passphrase passphraseSource
	// quality holds the double-labeling flags (record_quality.go).
	quality labelQualityOptions
}

// newRecordCommand builds `probity record`.
func newRecordCommand(d deps) *cobra.Command {
	opts := &recordOptions{}
	cmd := &cobra.Command{
		Use:   "record --plan PLAN.yaml --draw DIR (--labels FILE | --trail FILE) --out RECDIR",
		Short: "Judge the candidates from the labels and write the acceptance record",
		Long: `record checks the labeled worksheet against the plan and the draw folder,
judges every candidate and writes the acceptance record into RECDIR:
record.json (canonical, machine-readable), record.pdf (for the reviewer) and,
with --sign-key, record.sig: the operator's seal, an Ed25519 signature over
both that shows the record was not changed after it was issued and with
which key. The seal is not the signature of a person: the people named in
the sign-off sign the record afterwards with 'probity sign'.

The record id is the digest of everything record.json says (the inputs'
fingerprints, the judgement, the use, the bound, the date, the sealing key,
the wording, the revision), so no two records share one. Re-issuing a
record is a revision: --supersedes RECORD_ID names the record it replaces,
and the PDF shows the revision on every page (--revision N, default 2 with
--supersedes).

Before anything is computed it checks that the draw was made from this plan,
that the ledger and worksheet are the files the draw wrote, that the labeled
worksheet has the same items, ids and order as the ledger, that every label
is one of the plan's classes, blank or "unsure", and that spare items only
replace unlabeled or unsure items of their stratum, in order. Incomplete
labeling is refused unless --allow-incomplete, which counts every item left
unlabeled or unsure as an error for every candidate and says so in the record.

` + labelCellHelp + `

Labels given on the labeling page (probity label) are in the draw folder's
audit trail, label-trail.jsonl: pass it with --trail, in place of --labels
(and of --second when it holds second labels). record checks its hash chain
and that it belongs to this draw, derives the labeled worksheets from it,
fingerprints it, and states on the record who labeled, the first and last
label time and how many labels were changed. A worksheet passed beside the
trail must be the one the trail gives, byte for byte.

A self-weighting sample is judged by the plan's rule (accept when errors ≤ c),
with the exact Clopper–Pearson bound (or the exact hypergeometric bound for a
finite lot). A stratified sample is judged by the plan's rule only when its
allocation is exactly proportional; any other allocation (rounded shares,
equal, Neyman, a minimum per stratum, strata left without an item) is judged
by the stratified count rule, which keeps the stated risk wherever the errors
sit: at most c errors among the counted items, c set at the least favourable
spread of errors over the strata (Hoeffding 1956), a stratum without items
counting as unknown. The record names the rule applied and why; the error is
estimated stratum by stratum (weighted by N_h/N), with the Korn–Graubard bound
as a descriptive figure. A sequential plan is labeled from the top
of the worksheet without gaps and each candidate is judged by the plan's
boundaries where they decide (probity progress says when to stop); items
below that point may stay blank.

A plan with error measures (plan --measure) is judged claim by claim: each
measure of each candidate against its own ceiling, by the exact test the
draw's design fixed before any label, under the plan's multiplicity over
the family of claims; a candidate is accepted when all its claims are. The
record shows every claim (labeled counts, estimate, one-sided upper bound,
verdict), each candidate's estimated confusion in the population, and names
the candidate the plan's release rule picks (--release): "released" is null,
and record exits 1, when none qualifies. With --use safety, medical or
vehicle such a plan must claim the miss rate (fnr) or the false omission
rate (for), or state why not (plan --no-miss-measure-reason), which the
record shows on page 1 as a deviation.

The sign-off file names who is to prepare, review and approve the record
and what each signature means; each key is optional. Its names and dates
are printed as the intended signers, not as signatures: every role reads
NOT SIGNED until its signer runs 'probity sign'. Names may not hold control,
zero-width or direction-overriding characters.

  prepared: {name: Dana Example, title: ML engineer, date: 2026-12-01}
  reviewed: {name: Jo Example, title: Model-risk reviewer}
  approved: {name: Sam Example, title: Head of quality,
             meaning: "I approve the release of version 2.4"}

` + passphraseHelp + `

` + exitHelp("the audit passes: every candidate the plan requires is accepted, or with\nmeasures the release rule names a candidate (the record is written)",
			"the audit is rejected, or with measures no candidate qualifies for release\n(the record is written)", true),
		Args: cobra.NoArgs,
		PreRunE: func(cmd *cobra.Command, args []string) error {
			return opts.validate()
		},
		RunE: func(cmd *cobra.Command, args []string) error {
			return runRecord(d, opts)
		},
	}
	fl := cmd.Flags()
	fl.StringVar(&opts.planPath, "plan", "", "the plan `FILE` the sample was drawn from")
	fl.StringVar(&opts.drawDir, "draw", "", "the draw folder `DIR` (manifest.json, ledger.csv, worksheet.csv)")
	fl.StringVar(&opts.labels, "labels", "", "the labeled worksheet `FILE`")
	fl.StringVar(&opts.trail, "trail", "", "the label `TRAIL` of probity label (label-trail.jsonl in the draw folder), in place of --labels")
	fl.StringVar(&opts.out, "out", "", "the record folder `DIR` to write (must not exist or be empty)")
	fl.StringVar(&opts.signoff, "signoff", "", "sign-off `FILE` (YAML: prepared/reviewed/approved with name, title, date, meaning)")
	fl.StringVar(&opts.use, "use", "general", "declared `USE`: "+strings.Join(templates.Uses(), ", "))
	fl.StringVar(&opts.signKey, "sign-key", "", "the operator's private `KEY` from probity keygen; writes record.sig, the operator's seal")
	fl.BoolVar(&opts.allowIncomplete, "allow-incomplete", false, "count unlabeled and unsure items as errors for every candidate instead of refusing")
	fl.StringVar(&opts.date, "date", "", dateFlagUsage("the record is issued"))
	fl.StringVar(&opts.paper, "paper", "a4", "`PAPER` size of record.pdf: a4 or letter")
	fl.StringVar(&opts.templatesDir, "templates", "", "folder `DIR` of wording files overriding the built-in ones")
	fl.StringVar(&opts.bound, "bound", "", "no longer used (`BOUND`): stratified samples are judged by the stratified count rule")
	fl.MarkHidden("bound")
	fl.BoolVar(&opts.force, "force", false, "write into a non-empty --out folder, replacing the record files")
	fl.BoolVar(&opts.json, "json", false, "print record.json to stdout instead of the summary")
	fl.StringVar(&opts.supersedes, "supersedes", "", "the `RECORD_ID` of the record this one replaces (a revision)")
	fl.IntVar(&opts.revision, "revision", 0, "the revision number `N` of this record (default 1, or 2 with --supersedes)")
	addPassphraseFlag(cmd, &opts.passphrase)
	addLabelQualityFlags(cmd, &opts.quality)
	return cmd
}

// validate checks the flags that need no file.
func (o *recordOptions) validate() error {
	for _, f := range []struct{ name, v string }{{"plan", o.planPath}, {"draw", o.drawDir}, {"out", o.out}} {
		if f.v == "" {
			return inputerr.Errorf("--%s is required", f.name).WithHint("see 'probity record --help'")
		}
	}
	if o.labels == "" && o.trail == "" {
		return inputerr.Errorf("--labels or --trail is required").WithHint("pass the labeled worksheet, or the label trail of probity label")
	}
	if !oneOf(o.use, templates.Uses()) {
		return inputerr.Errorf("--use %q is not one of %s", o.use, strings.Join(templates.Uses(), ", ")).WithHint("pick the use the classifier's decisions serve")
	}
	o.paper = strings.ToLower(o.paper)
	if !oneOf(o.paper, []string{"a4", "letter"}) {
		return inputerr.Errorf("--paper %q is not a4 or letter", o.paper)
	}
	if err := parseDateFlag(o.date); err != nil {
		return err
	}
	if o.bound != "" {
		return inputerr.Errorf("--bound is no longer an option: a stratified sample is judged by the stratified count rule, which keeps the stated risk under any allocation (the Korn–Graubard bound is reported beside it as a descriptive figure)").
			WithHint("drop --bound")
	}
	if o.supersedes != "" && !record.IsID(o.supersedes) {
		return inputerr.Errorf("--supersedes %q is not a record id (%d lowercase hex digits)", o.supersedes, record.IDLength).
			WithHint("copy the record_id of the superseded record's record.json")
	}
	switch {
	case o.revision < 0:
		return inputerr.Errorf("--revision %d is not a positive whole number", o.revision)
	case o.revision == 0 && o.supersedes != "":
		o.revision = 2
	case o.revision == 0:
		o.revision = 1
	case o.revision == 1 && o.supersedes != "":
		return inputerr.Errorf("--revision 1 with --supersedes: a record that supersedes another is revision 2 or later")
	case o.revision > 1 && o.supersedes == "":
		return inputerr.Errorf("--revision %d needs --supersedes", o.revision).WithHint("name the record this revision replaces: --supersedes RECORD_ID")
	}
	return o.quality.validate(o.trail != "")
}

func oneOf(v string, list []string) bool {
	for _, x := range list {
		if x == v {
			return true
		}
	}
	return false
}

func runRecord(d deps, o *recordOptions) error {
	if err := checkOutWritable(o.out, o.force); err != nil {
		return err
	}
	var signoff []record.Signoff
	if o.signoff != "" {
		data, err := inputfile.ReadFile(o.signoff, "sign-off file", inputfile.SmallLimit)
		if err != nil {
			return err
		}
		if signoff, err = record.ParseSignoff(data, o.signoff); err != nil {
			return inputerr.SetHint(err, "see 'probity record --help' for the sign-off file's keys")
		}
	}
	var priv ed25519.PrivateKey
	keyFP := ""
	if o.signKey != "" {
		k, fp, err := loadPrivateKey(d, o.signKey, "--sign-key", o.passphrase)
		if err != nil {
			return err
		}
		priv, keyFP = k, fp
	}
	set, err := templates.Load(o.templatesDir)
	if errors.Is(err, templates.ErrTemplate) {
		return inputerr.SetHint(err, "fix or remove the file in --templates; files not given fall back to the built-in wording")
	}
	if err != nil {
		return err
	}
	files := assemble.Files{Plan: o.planPath, Draw: o.drawDir, Labels: o.labels, Second: o.quality.second, Adjudications: o.quality.adjudicated, Trail: o.trail}
	rec, err := assemble.Record(files, assemble.Options{
		AllowIncomplete: o.allowIncomplete, AllowUnadjudicated: o.quality.allowUnadjudicated, Strict: o.quality.strict,
		Use: o.use, Issued: stepTime(d, o.date), Signoff: signoff, Templates: set, ToolVersion: d.version, SigningKey: keyFP,
		Revision: o.revision, Supersedes: o.supersedes, Demonstration: signature.IsDemoKey(keyFP),
	})
	if err != nil {
		return noMissMeasureHint(recordHints(err, o), o.use)
	}
	out, err := renderRecord(rec, o.paper, set, priv)
	if err != nil {
		return err
	}
	if err := writeRecordFolder(o.out, out, o.force, recordInputFiles(o)); err != nil {
		return err
	}
	if o.json {
		d.stdout.Write(out[0].data)
	} else {
		writeRecordSummary(d, o, rec, out)
	}
	reportLabelQuality(d, rec.LabelQuality, !o.json)
	if rec.OverallVerdict != record.Accept {
		return rejected("")
	}
	return nil
}

// recordHints completes the hint of a refusal that a flag can lift:
// incomplete labeling (--allow-incomplete) and open disagreements of
// double labeling (--adjudicated, --allow-unadjudicated).
func recordHints(err error, o *recordOptions) error {
	switch {
	case errors.Is(err, intake.ErrIncomplete):
		return inputerr.SetHint(err, inputerr.HintOf(err)+", or pass --allow-incomplete to count each as an error for every candidate")
	case errors.Is(err, agreement.ErrUnadjudicated):
		fix := "or pass --allow-unadjudicated to count them as errors for every candidate"
		if o.quality.adjudicated == "" {
			return inputerr.SetHint(err, inputerr.HintOf(err)+" and pass --adjudicated FILE, "+fix)
		}
		return inputerr.SetHint(err, inputerr.HintOf(err)+", "+fix)
	case errors.Is(err, assemble.ErrChronology) && o.date != "" && issuedTooEarly(err):
		return inputerr.SetHint(err, "--date "+o.date+" is not a time this record can be issued at: a record is issued after its sample was drawn and labeled; leave --date out to take the time from the clock")
	}
	return err
}

// issuedTooEarly reports whether a broken chronology is the record's issue
// time (not the draw's).
func issuedTooEarly(err error) bool {
	var oe *chrono.OrderError
	return errors.As(err, &oe) && (oe.Step == "issued" || oe.Step == "labeled last")
}

// renderRecord encodes record.json, lays out record.pdf and, with a key,
// signs both into record.sig.
func renderRecord(rec *record.Record, paper string, set *templates.Set, priv ed25519.PrivateKey) ([]namedFile, error) {
	js, err := record.Encode(rec)
	if err != nil {
		return nil, &internalError{msg: err.Error()}
	}
	pdf, err := pdfreport.Render(rec, pdfreport.Options{Paper: paper, Templates: set})
	if err != nil {
		return nil, &internalError{msg: "laying out record.pdf: " + err.Error()}
	}
	files := []namedFile{{record.JSONFile, js}, {record.PDFFile, pdf}}
	if priv != nil {
		sig := signature.Sign(priv, map[string][]byte{record.JSONFile: js, record.PDFFile: pdf})
		files = append(files, namedFile{signature.FileName, sig.Marshal()})
	}
	return files, nil
}

// writeRecordSummary prints one line per candidate and the overall verdict.
func writeRecordSummary(d deps, o *recordOptions, rec *record.Record, files []namedFile) {
	w := d.stdout
	fmt.Fprintf(w, "record %s (%s) for %s\n", rec.RecordID, rec.Date, systemName(rec))
	if rec.Supersedes != "" {
		fmt.Fprintf(w, "revision %d, superseding record %s\n", rec.Revision, rec.Supersedes)
	}
	if len(rec.Measures) > 0 {
		fmt.Fprintf(w, "confidence %s for all claims together\n", numfmt.Confidence(rec.Plan.Confidence))
		writeMeasuresSummary(d, rec)
	} else {
		fmt.Fprintf(w, "ceiling %s, confidence %s, %s\n", numfmt.Setting(rec.Plan.Ceiling), numfmt.Confidence(rec.Plan.Confidence), rec.Method.Bound)
		width := 4
		for _, c := range rec.Candidates {
			width = max(width, len([]rune(c.Name)))
		}
		for _, c := range rec.Candidates {
			fmt.Fprintf(w, "  %-*s  %s  %s/%s errors, estimate %s, upper bound %s — %s\n", width, c.Name, c.Verdict, numfmt.Count(c.Errors), numfmt.Count(c.Labeled),
				numfmt.Rate(c.Estimate), numfmt.RateUp(c.UpperBound), c.Reason)
		}
		fmt.Fprintf(w, "overall: %s (%s)\n", rec.OverallVerdict, rec.Plan.Require.Title())
	}
	if t := rec.LabelTrail; t != nil {
		fmt.Fprintf(w, "labels from the trail: %d events by %s, %s to %s, %d changed\n", t.Events, strings.Join(t.Labelers, ", "), t.FirstLabel, t.LastLabel, t.Changed)
	}
	for _, c := range rec.Caveats {
		fmt.Fprintf(w, "caveat: %s\n", c.Text)
	}
	for _, r := range rec.Deviations.Replacements {
		fmt.Fprintf(w, "spare: %s replaces %s (%s)\n", r.Spare, r.Item, r.Reason)
	}
	if u := rec.Deviations.SparesUnused; len(u) > 0 {
		fmt.Fprintf(w, "spares labeled but unused (they replaced nothing): %s\n", strings.Join(u, ", "))
	}
	if s := rec.Deviations.DoubleNotLabeledText(); s != "" {
		fmt.Fprintf(w, "deviation: %s\n", s)
	}
	if rec.Deviations.AllowIncomplete {
		fmt.Fprintf(w, "note: unlabeled or unsure items were counted as errors for every candidate (--allow-incomplete)\n")
	}
	names := make([]string, len(files))
	for i, f := range files {
		names[i] = f.name
	}
	fmt.Fprintf(w, "wrote %s into %s\n", strings.Join(names, ", "), o.out)
	if rec.SigningKey != "" {
		fmt.Fprintf(w, "sealed with key %s (the operator's seal)\n", rec.SigningKey)
	}
	if len(rec.Wording.Replaced) > 0 {
		fmt.Fprintf(w, "custom wording: %s (flagged on page 1)\n", strings.Join(rec.Wording.Replaced, ", "))
	}
	fmt.Fprintf(w, "not yet signed: %s (probity sign %s --role ROLE --key KEY)\n", strings.Join(record.SignoffRoles, ", "), o.out)
}

func systemName(rec *record.Record) string {
	s := strings.TrimSpace(rec.System + " " + rec.SystemVersion)
	if s == "" {
		return "the system under audit"
	}
	return s
}
