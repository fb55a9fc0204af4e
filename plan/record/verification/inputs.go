package verification

import (
	"errors"
	"fmt"
	"io/fs"
	"path/filepath"
	"strings"
	"time"

	"probity/plan/chrono"
	"probity/plan/inputerr"
	"probity/plan/inputfile"
	"probity/plan/planfile"
	"probity/plan/record"
	"probity/plan/record/assemble"
	"probity/sampling/drawfolder"
)

// checkInputs compares the given inputs' fingerprints with the record's,
// recomputes the record when the plan, the draw folder and the labels are
// all given, and draws the sample again when the log is given.
func checkInputs(rep *Report, in Input, rec *record.Record) error {
	f, n := in.Files, in.Names
	labels := n.labels()
	if rec.Fingerprints.Trail != "" {
		labels = n.trail()
	}
	if f.Plan == "" && f.Draw == "" && f.Labels == "" && f.Trail == "" {
		rep.add(CheckJudgement, Skipped, "inputs: pass %s, %s and %s to recompute the judgement", n.plan(), n.draw(), labels)
		return nil
	}
	if err := checkFingerprints(rep, in, rec); err != nil {
		return err
	}
	switch {
	case f.Plan == "" || f.Draw == "" || f.Labels == "" && f.Trail == "":
		rep.add(CheckJudgement, Skipped, "judgement not recomputed: it needs all of %s, %s and %s", n.plan(), n.draw(), labels)
	case rec.Fingerprints.Trail != "" && f.Trail == "":
		rep.add(CheckJudgement, Skipped, "judgement not recomputed: the record's labels were derived from a label trail; pass it with %s", n.trail())
	case rec.Fingerprints.Trail == "" && f.Labels == "":
		rep.add(CheckJudgement, Skipped, "judgement not recomputed: the record was judged on a labeled worksheet; pass it with %s", n.labels())
	default:
		if err := recompute(rep, in, rec); err != nil {
			return err
		}
	}
	if in.Log != "" {
		return redraw(rep, in)
	}
	return nil
}

// checkFingerprints compares the SHA-256 of each given input with the one
// the record holds.
func checkFingerprints(rep *Report, in Input, rec *record.Record) error {
	fp, f := rec.Fingerprints, in.Files
	same := func(what, path, got, want string) {
		if got == want {
			rep.add(CheckFingerprint, OK, "%s: SHA-256 matches the record's %s", path, what)
		} else {
			rep.add(CheckFingerprint, Failed, "%s: SHA-256 %s… is not the record's %s %s…", path, short12(got), what, short12(want))
		}
	}
	if f.Plan != "" {
		// the one loader: an edited plan is bad input, refused before
		// anything is compared
		_, h, err := planfile.Load(f.Plan)
		if err != nil {
			return err
		}
		same("plan fingerprint", f.Plan, h, fp.Plan)
	}
	if f.Draw != "" {
		mpath := filepath.Join(f.Draw, drawfolder.ManifestFile)
		m, mb, err := drawfolder.ReadManifest(mpath)
		if err != nil {
			return err
		}
		same("manifest fingerprint", mpath, record.SHA256(mb), fp.Manifest)
		same("log fingerprint (from the manifest)", mpath, m.Log.SHA256, fp.Log)
		lpath := filepath.Join(f.Draw, drawfolder.LedgerFile)
		lh, err := fileHash(lpath)
		if err != nil {
			return err
		}
		same("ledger fingerprint", lpath, lh, fp.Ledger)
	}
	if f.Labels != "" {
		h, err := fileHash(f.Labels)
		if err != nil {
			return err
		}
		same("labels fingerprint", f.Labels, h, fp.Labels)
	}
	if f.Trail != "" {
		h, err := fileHash(f.Trail)
		if err != nil {
			return err
		}
		if fp.Trail == "" {
			rep.add(CheckFingerprint, Failed, "%s: the record's labels were not derived from a label trail, but %s was given", f.Trail, in.Names.trail())
		} else {
			same("label trail fingerprint", f.Trail, h, fp.Trail)
		}
	}
	if f.Second == "" {
		return nil
	}
	lq := rec.LabelQuality
	if lq == nil {
		rep.add(CheckFingerprint, Failed, "%s: the record was not judged on double labels, but %s was given", f.Second, in.Names.second())
		return nil
	}
	h, err := fileHash(f.Second)
	if err != nil {
		return err
	}
	same("second-worksheet fingerprint", f.Second, h, lq.SecondWorksheet)
	switch {
	case f.Adjudications != "":
		h, err := fileHash(f.Adjudications)
		if err != nil {
			return err
		}
		same("adjudications fingerprint", f.Adjudications, h, lq.Adjudications)
	case lq.Adjudications != "":
		rep.add(CheckFingerprint, Failed, "the record was judged with an adjudication file (SHA-256 %s…); pass it with %s", short12(lq.Adjudications), in.Names.adjudications())
	}
	return nil
}

// fileHash is the SHA-256 of a file's bytes.
func fileHash(path string) (string, error) {
	data, err := inputfile.ReadFile(path, "file", inputfile.TableLimit)
	if err != nil {
		return "", err
	}
	return record.SHA256(data), nil
}

// recompute builds the record again from its inputs with the stored
// record's own options (date, use, sign-off, signing key, the
// treatment of incomplete labeling and of double labeling), through
// assemble.Record as the record command does — with a label trail, the
// worksheets are derived from it again and its chain checked — and
// compares it with the stored record field by field.
func recompute(rep *Report, in Input, rec *record.Record) error {
	files := in.Files
	o := assemble.Options{
		AllowIncomplete: rec.Deviations.AllowIncomplete,
		Use:             rec.Use, Issued: issued(rec), Signoff: rec.Signoff, ToolVersion: rec.ToolVersion, SigningKey: rec.SigningKey,
		Revision: rec.Revision, Supersedes: rec.Supersedes, Demonstration: rec.Demonstration, Templates: in.Templates,
	}
	if rec.Fingerprints.Trail == "" {
		files.Trail = ""
	}
	if lq := rec.LabelQuality; lq != nil {
		if files.Second == "" && files.Trail == "" {
			rep.add(CheckJudgement, Skipped, "judgement not recomputed: the record was judged on double labels; pass %s (and %s) as well", in.Names.second(), in.Names.adjudications())
			return nil
		}
		o.AllowUnadjudicated, o.Strict = lq.AllowUnadjudicated, lq.Strict
	} else {
		files.Second, files.Adjudications = "", ""
	}
	again, err := assemble.Record(files, o)
	if err != nil {
		// A file that cannot be read is a usage error; bad content in
		// one is a failed check.
		var pe *fs.PathError
		if inputerr.Is(err) && !errors.As(err, &pe) {
			rep.add(CheckJudgement, Failed, "the inputs do not give a record: %s", err.Error())
			return nil
		}
		return err
	}
	// The fingerprints (and so the record id) were compared above, input
	// by input; this compares what was computed from them.
	again.RecordID, again.Fingerprints = rec.RecordID, rec.Fingerprints
	diffs, err := Diff(rec, again)
	if err != nil {
		return err
	}
	if len(diffs) == 0 {
		rep.add(CheckJudgement, OK, "judgement recomputed from the inputs: every field of %s agrees", record.JSONFile)
		return nil
	}
	listed := diffs
	if len(listed) > 8 {
		listed = append(listed[:8:8], fmt.Sprintf("and %d more", len(diffs)-8))
	}
	rep.add(CheckJudgement, Failed, "%s differs from the judgement recomputed from the inputs: %s", record.JSONFile, strings.Join(listed, "; "))
	return nil
}

// issued is the issue time a record states: its chronology's, or, for a
// record made before records were timed, the start of its date (UTC) with
// no source.
func issued(rec *record.Record) chrono.Stamp {
	if rec.Chronology != nil {
		return rec.Chronology.Issued
	}
	t, _ := time.Parse(time.DateOnly, rec.Date)
	return chrono.Stamp{Time: t}
}

// messageOf is an input error's message without its file, line and
// field, or err's text.
func messageOf(err error) string {
	if e, ok := inputerr.As(err); ok {
		return e.Msg
	}
	return err.Error()
}
