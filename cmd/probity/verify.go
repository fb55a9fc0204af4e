package main

import (
	"bytes"
	"crypto/ed25519"
	"errors"
	"fmt"
	"io/fs"
	"os"
	"path/filepath"
	"strings"

	"github.com/spf13/cobra"

	"probity/pdfreport"
	"probity/plan"
	"probity/plan/inputerr"
	"probity/plan/record"
	"probity/plan/record/assemble"
	"probity/plan/record/signature"
	"probity/plan/verdict"
	"probity/sampling"
	"probity/templates"
)

// verifyOptions are the flags of probity verify.
type verifyOptions struct {
	dir      string
	pub      string
	planPath string
	drawDir  string
	labels   string
	logPath  string
	// second and adjudicated are the labeled second worksheet and the
	// adjudication file of a record judged on double labels.
	second      string
	adjudicated string
	// templatesDir is the wording record.pdf was rendered with.
	templatesDir string
}

// newVerifyCommand builds `probity verify`.
func newVerifyCommand(d deps) *cobra.Command {
	opts := &verifyOptions{}
	cmd := &cobra.Command{
		Use:   "verify RECDIR [--pub KEY.pub] [--plan PLAN.yaml] [--draw DIR] [--labels WORKSHEET.csv] [--log FILE]",
		Short: "Check a record's signatures and recompute it from its inputs",
		Long: `verify checks an acceptance record folder and prints each check with its
outcome:

  - record.json is well formed and in canonical form (not edited by hand);
  - record.sig's signatures over record.json and record.pdf are valid, and
    the signing key is the one record.json names; with --pub, that it is
    your trusted key (without --pub the key is only reported);
  - record.pdf is byte for byte the rendering of record.json (A4 or Letter,
    the built-in wording or --templates), when this probity version made it;
  - with --plan, --draw, --labels: each input's SHA-256 is the one the
    record holds; given all three, the judgement is recomputed and compared
    with record.json field by field (a record judged on double labels also
    needs --second and, if it had one, --adjudicated);
  - with --log (and --plan, --draw): the sample is drawn again from the log
    and compared with the draw folder, so the items labeled are exactly the
    ones chance picked.

` + exitCodesHelp + `

verify exits 0 when every check it ran passed and 1 when any failed (the
failing checks say which file and what); 2 on bad usage or unreadable input.`,
		Args: func(cmd *cobra.Command, args []string) error {
			if len(args) != 1 {
				return inputerr.Errorf("verify needs exactly one record folder, got %d arguments", len(args)).WithHint("probity verify RECDIR [--pub KEY.pub]")
			}
			return nil
		},
		PreRunE: func(cmd *cobra.Command, args []string) error {
			if opts.adjudicated != "" && opts.second == "" {
				return inputerr.Errorf("--adjudicated needs --second").WithHint("pass the labeled worksheet-second.csv the record was made with")
			}
			if opts.logPath != "" && (opts.drawDir == "" || opts.planPath == "") {
				return inputerr.Errorf("--log needs --plan and --draw").WithHint("the sample is drawn again from the log with the plan's seed and the draw folder's settings")
			}
			return nil
		},
		RunE: func(cmd *cobra.Command, args []string) error {
			opts.dir = args[0]
			return runVerify(d, opts)
		},
	}
	fl := cmd.Flags()
	fl.StringVar(&opts.pub, "pub", "", "trusted public key (NAME.pub from probity keygen)")
	fl.StringVar(&opts.planPath, "plan", "", "the plan file, to check and recompute from")
	fl.StringVar(&opts.drawDir, "draw", "", "the draw folder, to check and recompute from")
	fl.StringVar(&opts.labels, "labels", "", "the labeled worksheet, to check and recompute from")
	fl.StringVar(&opts.logPath, "log", "", "the prediction log, to draw the sample again")
	fl.StringVar(&opts.second, "second", "", "the labeled second worksheet of a record judged on double labels, to check and recompute from")
	fl.StringVar(&opts.adjudicated, "adjudicated", "", "the adjudication file of such a record, to check and recompute from")
	fl.StringVar(&opts.templatesDir, "templates", "", "the --templates folder the record was made with, to re-render record.pdf")
	return cmd
}

// checkList collects the outcome of each check.
type checkList struct {
	lines  []string
	failed []string
}

func (c *checkList) ok(format string, args ...any) {
	c.lines = append(c.lines, "ok    "+fmt.Sprintf(format, args...))
}

func (c *checkList) fail(format string, args ...any) {
	msg := fmt.Sprintf(format, args...)
	c.lines = append(c.lines, "FAIL  "+msg)
	c.failed = append(c.failed, msg)
}

func (c *checkList) skip(format string, args ...any) {
	c.lines = append(c.lines, "skip  "+fmt.Sprintf(format, args...))
}

func runVerify(d deps, o *verifyOptions) error {
	st, err := os.Stat(o.dir)
	if err != nil || !st.IsDir() {
		return inputerr.Errorf("%s is not a record folder", o.dir).WithHint("pass the --out folder of probity record")
	}
	var trusted ed25519.PublicKey
	if o.pub != "" {
		if trusted, err = loadPublicKey(o.pub); err != nil {
			return err
		}
	}
	c := &checkList{}
	jsonPath := filepath.Join(o.dir, recordJSON)
	js, err := os.ReadFile(jsonPath)
	if err != nil {
		return inputerr.Errorf("cannot read %s: %v", jsonPath, errors.Unwrap(err)).WithHint("pass the --out folder of probity record").Wrap(err)
	}
	rec, err := record.Decode(js)
	switch {
	case err != nil:
		c.fail("%s: not a valid record: %v", jsonPath, err)
	case !record.IsCanonical(js):
		c.fail("%s is not in canonical form: it was edited after it was written", jsonPath)
	default:
		c.ok("%s is a canonical record (id %s, %s, overall %s)", jsonPath, rec.RecordID, rec.Date, rec.OverallVerdict)
	}
	verifySignatures(c, o, rec, js, trusted)
	if rec != nil {
		if err := verifyRendering(c, o, rec, d.version); err != nil {
			return err
		}
		if err := verifyInputs(c, o, rec); err != nil {
			return err
		}
	}
	for _, l := range c.lines {
		fmt.Fprintln(d.stdout, l)
	}
	if len(c.failed) > 0 {
		return rejected("verification failed: %d of %d checks (%s)", len(c.failed), len(c.lines), c.failed[0])
	}
	fmt.Fprintf(d.stdout, "verified: %d checks passed\n", len(c.lines))
	return nil
}

// verifySignatures checks record.sig against record.json and record.pdf.
func verifySignatures(c *checkList, o *verifyOptions, rec *record.Record, js []byte, trusted ed25519.PublicKey) {
	sigPath := filepath.Join(o.dir, signature.FileName)
	pdfPath := filepath.Join(o.dir, recordPDF)
	pdf, pdfErr := os.ReadFile(pdfPath)
	if pdfErr != nil {
		c.fail("%s is missing or unreadable: %v", pdfPath, errors.Unwrap(pdfErr))
	}
	data, err := os.ReadFile(sigPath)
	if errors.Is(err, fs.ErrNotExist) {
		switch {
		case trusted != nil:
			c.fail("%s is missing: the record is not signed, so it cannot be checked against --pub", sigPath)
		case rec != nil && rec.SigningKey != "":
			c.fail("%s is missing, but record.json says it was signed by %s", sigPath, rec.SigningKey)
		default:
			c.skip("signatures: the record is unsigned (no %s)", signature.FileName)
		}
		return
	}
	if err != nil {
		c.fail("%s: %v", sigPath, err)
		return
	}
	sig, err := signature.Parse(data, sigPath)
	if err != nil {
		c.fail("%v", err)
		return
	}
	fp := signature.Fingerprint(sig.PublicKey)
	for _, f := range []struct {
		name string
		data []byte
		ok   bool
	}{{recordJSON, js, true}, {recordPDF, pdf, pdfErr == nil}} {
		if !f.ok {
			continue
		}
		if err := sig.Verify(f.name, f.data); err != nil {
			c.fail("%s (in %s)", err, o.dir)
		} else {
			c.ok("%s: signature valid", filepath.Join(o.dir, f.name))
		}
	}
	if rec != nil && rec.SigningKey != fp {
		c.fail("%s names signing key %q, but %s was made with %s", recordJSON, rec.SigningKey, signature.FileName, fp)
	}
	switch {
	case trusted == nil:
		c.skip("signing key %s not checked against a trusted key (pass --pub KEY.pub)", fp)
	case signature.Fingerprint(trusted) != fp:
		c.fail("%s was signed with key %s, not with --pub %s (%s)", signature.FileName, fp, o.pub, signature.Fingerprint(trusted))
	default:
		c.ok("signed with the trusted key %s (%s)", o.pub, fp)
	}
}

// verifyInputs compares the given inputs' fingerprints with the record's,
// recomputes the judgement when the plan, draw and labels are all given,
// and draws the sample again with --log.
func verifyInputs(c *checkList, o *verifyOptions, rec *record.Record) error {
	fp := rec.Fingerprints
	if o.planPath == "" && o.drawDir == "" && o.labels == "" {
		c.skip("inputs: pass --plan, --draw and --labels to recompute the judgement")
		return nil
	}
	same := func(what, path, got, want string) {
		if got == want {
			c.ok("%s: SHA-256 matches the record's %s", path, what)
		} else {
			c.fail("%s: SHA-256 %s… is not the record's %s %s…", path, short12(got), what, short12(want))
		}
	}
	readHash := func(path string) (string, error) {
		data, err := os.ReadFile(path)
		if err != nil {
			return "", inputerr.Errorf("cannot read %s: %v", path, errors.Unwrap(err)).WithHint("check the path").Wrap(err)
		}
		return record.SHA256(data), nil
	}
	if o.planPath != "" {
		h, err := readHash(o.planPath)
		if err != nil {
			return err
		}
		same("plan fingerprint", o.planPath, h, fp.Plan)
	}
	if o.drawDir != "" {
		mpath := filepath.Join(o.drawDir, sampling.ManifestFile)
		m, mb, err := sampling.ReadManifest(mpath)
		if err != nil {
			return err
		}
		same("manifest fingerprint", mpath, record.SHA256(mb), fp.Manifest)
		same("log fingerprint (from the manifest)", mpath, m.Log.SHA256, fp.Log)
		lh, err := readHash(filepath.Join(o.drawDir, sampling.LedgerFile))
		if err != nil {
			return err
		}
		same("ledger fingerprint", filepath.Join(o.drawDir, sampling.LedgerFile), lh, fp.Ledger)
	}
	if o.labels != "" {
		h, err := readHash(o.labels)
		if err != nil {
			return err
		}
		same("labels fingerprint", o.labels, h, fp.Labels)
	}
	if err := verifyLabelQualityInputs(c, o, rec, readHash, same); err != nil {
		return err
	}
	if o.planPath != "" && o.drawDir != "" && o.labels != "" {
		if err := recompute(c, o, rec); err != nil {
			return err
		}
	} else {
		c.skip("judgement not recomputed: it needs all of --plan, --draw and --labels")
	}
	if o.logPath != "" {
		return redraw(c, o)
	}
	return nil
}

// recompute builds the record again from the inputs, with the record's own
// date, use, sign-off and signing key, and compares it field by field.
func recompute(c *checkList, o *verifyOptions, rec *record.Record) error {
	in, err := loadRecordInputs(o.planPath, o.drawDir, o.labels)
	if err != nil {
		// A file that cannot be read is a usage error; bad content in
		// one is a failed check.
		var pe *fs.PathError
		if inputerr.Is(err) && !errors.As(err, &pe) {
			c.fail("the inputs do not give a record: %s", err.Error())
			return nil
		}
		return err
	}
	bound := verdict.UnequalBoundOf(rec.Method.Bound)
	if rec.LabelQuality != nil && o.second == "" {
		c.skip("judgement not recomputed: the record was judged on double labels; pass --second (and --adjudicated) as well")
		return nil
	}
	var quality labelQualityOptions
	if rec.LabelQuality != nil {
		quality = labelQualityOptions{second: o.second, adjudicated: o.adjudicated,
			allowUnadjudicated: rec.LabelQuality.AllowUnadjudicated, strict: rec.LabelQuality.Strict}
	}
	adjust, err := labelQualityAdjust(quality, in.plan, in.folder, in.labels)
	if err != nil {
		c.fail("the inputs do not give a record: %s", err.Error())
		return nil
	}
	again, err := assemble.Assemble(assemble.Input{
		Plan: in.plan, PlanFP: in.planFP, Folder: in.folder, Labels: in.labels,
		AllowIncomplete: rec.Deviations.AllowIncomplete, Bound: bound, Use: rec.Use, Date: rec.Date,
		Signoff: rec.Signoff, ToolVersion: rec.ToolVersion, SigningKey: rec.SigningKey, Adjust: adjust,
	})
	if err != nil {
		c.fail("the inputs do not give a record: %s", err.Error())
		return nil
	}
	// The fingerprints (and so the record id) were compared above, input
	// by input; this compares what was computed from them.
	again.RecordID, again.Fingerprints = rec.RecordID, rec.Fingerprints
	diffs, err := diffRecords(rec, again)
	if err != nil {
		return &internalError{msg: err.Error()}
	}
	if len(diffs) == 0 {
		c.ok("judgement recomputed from the inputs: every field of %s agrees", recordJSON)
		return nil
	}
	listed := diffs
	if len(listed) > 8 {
		listed = append(listed[:8:8], fmt.Sprintf("and %d more", len(diffs)-8))
	}
	c.fail("%s differs from the judgement recomputed from the inputs: %s", recordJSON, strings.Join(listed, "; "))
	return nil
}

// redraw draws the sample again from the log and compares it with the
// draw folder.
func redraw(c *checkList, o *verifyOptions) error {
	p, planFP, err := plan.Load(o.planPath)
	if err != nil {
		return err
	}
	mpath := filepath.Join(o.drawDir, sampling.ManifestFile)
	m, _, err := sampling.ReadManifest(mpath)
	if err != nil {
		return err
	}
	di, err := sampling.DrawInputFromManifest(m)
	if err != nil {
		return inFile(err, mpath)
	}
	f, err := os.Open(o.logPath)
	if err != nil {
		return inputerr.Errorf("cannot read --log %s: %v", o.logPath, errors.Unwrap(err)).WithHint("pass the log the sample was drawn from").Wrap(err)
	}
	defer f.Close()
	di.Plan, di.PlanFingerprint, di.LogPath, di.Log, di.ToolVersion = p, planFP, o.logPath, f, m.ToolVersion
	want, err := sampling.Draw(di)
	if err != nil {
		if inputerr.Is(err) {
			c.fail("drawing the sample again from %s: %v", o.logPath, inFile(err, mpath))
			return nil
		}
		return &internalError{msg: err.Error()}
	}
	rep, err := sampling.CompareFolder(o.drawDir, want)
	if err != nil {
		return err
	}
	if len(rep.Differences) == 0 {
		c.ok("sample drawn again from %s: the draw folder holds exactly the %d items and %d spares chance picked", o.logPath, rep.Items, rep.Spares)
		return nil
	}
	c.fail("the draw folder is not what chance picked from %s: %s", o.logPath, strings.Join(rep.Differences, "; "))
	return nil
}

func short12(h string) string {
	if len(h) > 12 {
		return h[:12]
	}
	return h
}

// verifyRendering renders record.json again and compares it with
// record.pdf. A match proves the PDF shows exactly what record.json holds.
// No match fails when the record was made by this very probity version
// (then the PDF was changed, swapped, or made with other --templates);
// for a record from another version it is only reported, since another
// version may lay the record out differently (the signature still ties
// the PDF to record.json).
func verifyRendering(c *checkList, o *verifyOptions, rec *record.Record, version string) error {
	pdfPath := filepath.Join(o.dir, recordPDF)
	pdf, err := os.ReadFile(pdfPath)
	if err != nil {
		return nil // reported by verifySignatures
	}
	set, err := templates.Load(o.templatesDir)
	if err != nil {
		return inputerr.SetHint(err, "pass the --templates folder the record was made with")
	}
	for _, paper := range []string{"a4", "letter"} {
		again, err := pdfreport.Render(rec, pdfreport.Options{Paper: paper, Templates: set})
		if err != nil {
			c.skip("%s not re-rendered: %v", pdfPath, err)
			return nil
		}
		if bytes.Equal(again, pdf) {
			c.ok("%s is exactly the rendering of %s (%s)", pdfPath, recordJSON, paper)
			return nil
		}
	}
	wording := "the built-in wording"
	if o.templatesDir != "" {
		wording = "the wording in " + o.templatesDir
	}
	if rec.ToolVersion == version {
		c.fail("%s is not the rendering of %s with %s by this probity version (%s): it was changed or swapped, or made with other --templates (pass them)", pdfPath, recordJSON, wording, version)
		return nil
	}
	c.skip("%s was not compared with a fresh rendering: the record was made by probity %s, this is %s", pdfPath, rec.ToolVersion, version)
	return nil
}

// verifyLabelQualityInputs compares --second and --adjudicated with the
// SHA-256 the record's label_quality holds.
func verifyLabelQualityInputs(c *checkList, o *verifyOptions, rec *record.Record, readHash func(string) (string, error), same func(what, path, got, want string)) error {
	if o.second == "" {
		return nil
	}
	lq := rec.LabelQuality
	if lq == nil {
		c.fail("%s: the record was not judged on double labels, but --second was given", o.second)
		return nil
	}
	h, err := readHash(o.second)
	if err != nil {
		return err
	}
	same("second-worksheet fingerprint", o.second, h, lq.SecondWorksheet)
	switch {
	case o.adjudicated != "":
		h, err := readHash(o.adjudicated)
		if err != nil {
			return err
		}
		same("adjudications fingerprint", o.adjudicated, h, lq.Adjudications)
	case lq.Adjudications != "":
		c.fail("the record was judged with an adjudication file (SHA-256 %s…); pass it with --adjudicated", short12(lq.Adjudications))
	}
	return nil
}
