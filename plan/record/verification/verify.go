package verification

import (
	"crypto/ed25519"
	"errors"
	"fmt"
	"os"
	"path/filepath"
	"time"

	"probity/plan/inputerr"
	"probity/plan/inputfile"
	"probity/plan/record"
	"probity/plan/record/assemble"
	"probity/plan/record/signature"
	"probity/templates"
)

// Status is the outcome of one check.
type Status int

const (
	// OK: the check passed.
	OK Status = iota
	// Failed: the check found a difference or a bad signature.
	Failed
	// Skipped: the check was not run, for want of an input (Detail says
	// which).
	Skipped
	// Limited: the check could not be done in full; Detail states the
	// limitation and what the result rests on instead. It does not fail
	// the verification.
	Limited
)

// String is "ok", "failed" or "skipped".
func (s Status) String() string {
	switch s {
	case OK:
		return "ok"
	case Failed:
		return "failed"
	case Limited:
		return "limited"
	}
	return "skipped"
}

// Names of the checks (Check.Name).
const (
	CheckRecord         = "record"         // record.json well formed and canonical
	CheckRecordID       = "record id"      // the record id recomputed from record.json
	CheckSignature      = "signature"      // record.sig over a file, or its absence
	CheckSigningKey     = "signing key"    // the seal's key: the one record.json names, and trusted
	CheckPeople         = "people"         // the people's signatures (signatures.txt)
	CheckAuthentication = "authentication" // whether the signatures authenticate the record
	CheckRendering      = "rendering"      // record.pdf against a fresh rendering
	CheckFingerprint    = "fingerprint"    // an input's SHA-256 against the record's
	CheckJudgement      = "judgement"      // the record recomputed from its inputs
	CheckSample         = "sample"         // the sample drawn again from the log
	CheckChronology     = "chronology"     // plan created ≤ sample drawn ≤ record issued
)

// Check is the outcome of one check.
type Check struct {
	// Name says what was checked (CheckRecord, CheckSignature, …).
	Name   string
	Status Status
	// Detail says what was found, naming the file: one sentence.
	Detail string
}

// Report is the checks Verify ran, in order.
type Report struct {
	Checks []Check
}

// Count returns how many checks have status st.
func (r *Report) Count(st Status) int {
	n := 0
	for _, c := range r.Checks {
		if c.Status == st {
			n++
		}
	}
	return n
}

// Failed returns the checks that failed, in order.
func (r *Report) Failed() []Check {
	var out []Check
	for _, c := range r.Checks {
		if c.Status == Failed {
			out = append(out, c)
		}
	}
	return out
}

func (r *Report) add(name string, s Status, format string, args ...any) {
	r.Checks = append(r.Checks, Check{Name: name, Status: s, Detail: fmt.Sprintf(format, args...)})
}

// Names says how the user gives each input, for the checks' wording: a
// command line passes its flag names ("--pub"), so that a skipped check
// can say what to pass. An empty name reads as the input in words.
type Names struct {
	TrustedKey, Signers     string
	Templates               string
	Plan, Draw, Labels, Log string
	Second, Adjudications   string
	Trail                   string
}

// or returns name, or words when name is empty.
func or(name, words string) string {
	if name == "" {
		return words
	}
	return name
}

func (n Names) trustedKey() string    { return or(n.TrustedKey, "a trusted key") }
func (n Names) signers() string       { return or(n.Signers, "a signers file") }
func (n Names) templates() string     { return or(n.Templates, "templates") }
func (n Names) plan() string          { return or(n.Plan, "the plan") }
func (n Names) draw() string          { return or(n.Draw, "the draw folder") }
func (n Names) labels() string        { return or(n.Labels, "the labels") }
func (n Names) log() string           { return or(n.Log, "the log") }
func (n Names) second() string        { return or(n.Second, "the second worksheet") }
func (n Names) adjudications() string { return or(n.Adjudications, "the adjudications") }
func (n Names) trail() string         { return or(n.Trail, "the label trail") }

// Input is the record folder and whatever inputs are given.
type Input struct {
	// Dir is the record folder (record.json, record.pdf, record.sig).
	Dir string
	// Trust is what the signatures are checked against.
	Trust Trust
	// Templates is the wording record.pdf is rendered with again (nil:
	// the built-in wording); TemplatesDir names its folder ("" for the
	// built-in wording).
	Templates    *templates.Set
	TemplatesDir string
	// Files are the record's inputs; any may be empty. Log is the
	// prediction log the sample was drawn from ("" when not given); it
	// needs Files.Plan and Files.Draw.
	Files assemble.Files
	Log   string
	// MaxLine bounds a line of the log (0: the log reader's default).
	MaxLine int64
	// ToolVersion is this probity's version: a record.pdf made by another
	// version may lay the record out differently, so when it is not the
	// rendering of record.json it is authenticated by the signature over
	// it instead (a stated limitation), or fails.
	ToolVersion string
	// Names is how the user gives each input, for the wording.
	Names Names
}

// Trust is what a record's signatures are checked against: nothing else
// makes a verification pass.
type Trust struct {
	// Keys are the public keys trusted to seal records (the operator's).
	Keys []TrustedKey
	// Signers binds keys to people and roles: the people's signatures are
	// checked against it, and a seal against its operators. nil: none.
	Signers *signature.Signers
	// Now is the verifier's clock: a signature dated more than
	// ClockSkew after it fails. The zero time skips that check.
	Now time.Time
}

// TrustedKey is a public key trusted to seal records, and the file it was
// read from.
type TrustedKey struct {
	Key  ed25519.PublicKey
	Path string
}

// ClockSkew is how far a signature's time may lie after the verifier's
// clock before it is refused as dated in the future.
const ClockSkew = 5 * time.Minute

// none reports whether nothing is trusted.
func (t Trust) none() bool { return len(t.Keys) == 0 && t.Signers == nil }

// ErrNoRecord is the cause of the error for a folder that is not a
// record folder (missing, or without a readable record.json).
var ErrNoRecord = errors.New("not a record folder")

// Verify runs every check the inputs allow and returns them in order. A
// check that fails is reported in the Report; the error is for input that
// cannot be used at all (see the package comment).
func Verify(in Input) (*Report, error) {
	st, err := os.Stat(in.Dir)
	if err != nil || !st.IsDir() {
		return nil, inputerr.Errorf("%s is not a record folder", in.Dir).Wrap(ErrNoRecord)
	}
	rep := &Report{}
	jsonPath := filepath.Join(in.Dir, record.JSONFile)
	js, err := inputfile.ReadFile(jsonPath, "record", inputfile.TableLimit)
	if err != nil {
		return nil, inputerr.Errorf("cannot read %s: %s", jsonPath, messageOf(err)).Wrap(errors.Join(ErrNoRecord, err))
	}
	rec := checkRecord(rep, jsonPath, js)
	pdfPath := filepath.Join(in.Dir, record.PDFFile)
	pdf, pdfErr := inputfile.ReadFile(pdfPath, "record PDF", inputfile.TableLimit)
	if pdfErr != nil {
		rep.add(CheckRendering, Failed, "%s is missing or unreadable: %s", pdfPath, messageOf(pdfErr))
		pdf = nil
	}
	a := authenticate(rep, in.Dir, in.Trust, in.Names, rec, js, pdf)
	if rec == nil {
		return rep, nil
	}
	if pdf != nil {
		checkRendering(rep, in, rec, a, pdf)
	}
	checkChronology(rep, jsonPath, rec)
	a.summarise(rep, in.Names, rec)
	if err := checkInputs(rep, in, rec); err != nil {
		return nil, err
	}
	return rep, nil
}

// checkRecord checks that record.json is a record of this format in
// canonical form and that its id is the digest of its content; it returns
// the record, or nil when record.json is not one.
func checkRecord(rep *Report, jsonPath string, js []byte) *record.Record {
	rec, err := record.Decode(js)
	switch {
	case err != nil:
		rep.add(CheckRecord, Failed, "%s: not a valid record: %v", jsonPath, err)
		return nil
	case rec.Format != record.Format:
		rep.add(CheckRecord, Failed, "%s is a record of format %d, made by probity %s; this probity reads format %d", jsonPath, rec.Format, rec.ToolVersion, record.Format)
		return nil
	case !record.IsCanonical(js):
		rep.add(CheckRecord, Failed, "%s is not in canonical form: it was edited after it was written", jsonPath)
	default:
		rep.add(CheckRecord, OK, "%s is a canonical record (id %s, %s, overall %s)", jsonPath, rec.RecordID, rec.Date, rec.OverallVerdict)
	}
	id, err := record.ID(rec)
	switch {
	case err != nil:
		rep.add(CheckRecordID, Failed, "%s: the record id cannot be recomputed: %v", jsonPath, err)
	case id != rec.RecordID:
		rep.add(CheckRecordID, Failed, "%s: record_id %s is not the digest of the record's content (%s): the id was made up, or the record was edited", jsonPath, rec.RecordID, id)
	default:
		rep.add(CheckRecordID, OK, "record id %s recomputes from the content of %s", id, record.JSONFile)
	}
	return rec
}

// short12 is the first 12 digits of a fingerprint, for messages.
func short12(h string) string {
	if len(h) > 12 {
		return h[:12]
	}
	return h
}

// checkChronology checks the time line the record states: every time
// stated, the plan created no later than the sample was drawn, the sample
// drawn no later than the record was issued, and the record's date the
// day it was issued. (With the plan and the draw folder given, the
// recomputation also checks the first two times against them.)
func checkChronology(rep *Report, jsonPath string, rec *record.Record) {
	c := rec.Chronology
	if c == nil {
		rep.add(CheckChronology, Failed, "%s states no chronology (when the plan was made, the sample drawn and the record issued)", jsonPath)
		return
	}
	if err := c.Check(); err != nil {
		rep.add(CheckChronology, Failed, "%s: %v", jsonPath, err)
		return
	}
	if d := c.Issued.Time.Format(time.DateOnly); d != rec.Date {
		rep.add(CheckChronology, Failed, "%s: the date %s is not the day the record was issued (%s)", jsonPath, rec.Date, c.Issued)
		return
	}
	labeled := ""
	if c.Labeled != nil {
		labeled = ", labeled " + c.Labeled.String() + " (label trail)"
	}
	rep.add(CheckChronology, OK, "chronology in order: plan created %s, sample drawn %s%s, record issued %s", c.PlanCreated, c.Drawn, labeled, c.Issued)
}
