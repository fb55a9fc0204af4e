package verification

import (
	"errors"
	"fmt"
	"io/fs"
	"path/filepath"
	"slices"
	"strings"
	"time"

	"probity/plan/inputfile"
	"probity/plan/record"
	"probity/plan/record/signature"
)

// auth is what the signatures of a record established, for the rendering
// check and the summary.
type auth struct {
	// seal is record.sig's bytes (nil: no seal); sealValid that its
	// signature over record.json holds; sealWho who sealed, when trusted
	// ("" when not).
	seal      []byte
	sealValid bool
	sealWho   string
	// issuedPDF is the SHA-256 of record.pdf as issued, as the seal
	// signed it; "" when the seal signs no PDF or its signature fails.
	issuedPDF string
	// people are the people's signatures (nil when none, or when the
	// file cannot be read); peopleValid that the chain holds, trusted
	// which of them are checked against the signers file.
	people      []signature.Manifestation
	peopleValid bool
	trusted     []bool
	// failed is set when any authentication check failed.
	failed bool
}

// fail reports a failed authentication check.
func (a *auth) fail(rep *Report, name, format string, args ...any) {
	a.failed = true
	rep.add(name, Failed, format, args...)
}

// issueTime is the earliest time a signature of rec can have been given:
// the start (UTC) of the record's date.
func issueTime(rec *record.Record) (time.Time, bool) {
	t, err := time.Parse("2006-01-02", rec.Date)
	return t, err == nil
}

// authenticate checks the operator's seal (record.sig) and the people's
// signatures (signatures.txt) of the record in dir: that each is valid,
// bound to record.json and to each other, and made with a key trust
// vouches for. pdf is record.pdf's bytes (nil: not checked here). rec is
// nil when record.json is not a record; nothing is checked then.
func authenticate(rep *Report, dir string, trust Trust, names Names, rec *record.Record, js, pdf []byte) *auth {
	a := &auth{}
	if rec == nil {
		return a
	}
	peoplePath := filepath.Join(dir, signature.SignaturesFile)
	peopleData, peopleErr := inputfile.ReadFile(peoplePath, "signatures file", inputfile.SmallLimit)
	hasPeople := peopleErr == nil
	if hasPeople {
		ms, err := signature.ParseSignatures(peopleData, peoplePath)
		if err != nil {
			a.fail(rep, CheckPeople, "%v", err)
		} else {
			a.people = ms
		}
	} else if !errors.Is(peopleErr, fs.ErrNotExist) {
		a.fail(rep, CheckPeople, "%s cannot be read: %s", peoplePath, messageOf(peopleErr))
	}
	checkSeal(rep, a, dir, trust, names, rec, js, pdf, hasPeople)
	checkPeople(rep, a, peoplePath, trust, names, rec, js)
	return a
}

// checkSeal checks record.sig.
func checkSeal(rep *Report, a *auth, dir string, trust Trust, names Names, rec *record.Record, js, pdf []byte, hasPeople bool) {
	sigPath := filepath.Join(dir, signature.FileName)
	data, err := inputfile.ReadFile(sigPath, "seal", inputfile.SmallLimit)
	if errors.Is(err, fs.ErrNotExist) {
		switch {
		case rec.SigningKey != "":
			a.fail(rep, CheckSignature, "%s is missing, but %s says the record was sealed with %s", sigPath, record.JSONFile, rec.SigningKey)
		case len(trust.Keys) > 0:
			a.fail(rep, CheckSignature, "%s is missing: the record has no operator's seal to check against %s", sigPath, names.trustedKey())
		}
		return
	}
	if err != nil {
		a.fail(rep, CheckSignature, "%s cannot be read: %s", sigPath, messageOf(err))
		return
	}
	sig, err := signature.Parse(data, sigPath)
	if err != nil {
		a.fail(rep, CheckSignature, "%v", err)
		return
	}
	a.seal = data
	fp := signature.Fingerprint(sig.PublicKey)
	if err := sig.Verify(record.JSONFile, js); err != nil {
		a.fail(rep, CheckSignature, "%s (in %s)", err, dir)
	} else {
		a.sealValid = true
		rep.add(CheckSignature, OK, "%s: seal valid (key %s)", filepath.Join(dir, record.JSONFile), fp)
	}
	switch {
	case pdf == nil:
	case !hasPeople:
		if err := sig.Verify(record.PDFFile, pdf); err != nil {
			a.fail(rep, CheckSignature, "%s (in %s)", err, dir)
		} else {
			a.issuedPDF = record.SHA256(pdf)
			rep.add(CheckSignature, OK, "%s: seal valid", filepath.Join(dir, record.PDFFile))
		}
	default:
		// The people's signatures re-rendered record.pdf; the seal covers
		// the PDF as issued, which the rendering check recomputes.
		d, err := sig.VerifySigned(record.PDFFile)
		if err != nil {
			a.fail(rep, CheckSignature, "%s (in %s)", err, dir)
		} else {
			a.issuedPDF = d
		}
	}
	if rec.SigningKey != fp {
		a.fail(rep, CheckSigningKey, "%s names sealing key %q, but %s was made with %s", record.JSONFile, rec.SigningKey, signature.FileName, fp)
		return
	}
	who, problem := trust.sealer(fp, names)
	if problem != "" {
		a.fail(rep, CheckSigningKey, "%s", problem)
		return
	}
	a.sealWho = who
	rep.add(CheckSigningKey, OK, "sealed by %s", who)
}

// sealer says who sealed with the key fp, or why the seal is not trusted.
func (t Trust) sealer(fp string, names Names) (who, problem string) {
	if signature.IsDemoKey(fp) {
		return "", fmt.Sprintf("sealed with a published demonstration key (%s): anyone can make this seal, so it authenticates nothing; the record is a demonstration", fp)
	}
	for _, k := range t.Keys {
		if signature.Fingerprint(k.Key) == fp {
			return fmt.Sprintf("the trusted key %s (%s)", k.Path, fp), ""
		}
	}
	if t.Signers != nil {
		if s, ok := t.Signers.Lookup(fp); ok {
			if slices.Contains(s.Roles, signature.OperatorRole) {
				return fmt.Sprintf("%s, an operator in %s (line %d; key %s)", s.Name, t.Signers.Path, s.Line, fp), ""
			}
			return "", fmt.Sprintf("sealed with key %s, which %s gives to %s as %s, not as %s", fp, t.Signers.Path, s.Name, strings.Join(s.Roles, ", "), signature.OperatorRole)
		}
	}
	if t.none() {
		return "", fmt.Sprintf("sealed with key %s, which was not checked: pass %s KEY.pub or %s FILE to say which keys to trust", fp, names.trustedKey(), names.signers())
	}
	var given []string
	for _, k := range t.Keys {
		given = append(given, k.Path)
	}
	if t.Signers != nil {
		given = append(given, "an operator in "+t.Signers.Path)
	}
	return "", fmt.Sprintf("sealed with key %s, which is not a trusted key (%s)", fp, strings.Join(given, ", "))
}

// checkPeople checks the people's signatures: the chain, each signer's key
// against the signers file, and each time against the record's date and
// the verifier's clock.
func checkPeople(rep *Report, a *auth, path string, trust Trust, names Names, rec *record.Record, js []byte) {
	if a.people == nil {
		return
	}
	errs := signature.CheckChain(a.people, signature.Binding{RecordJSON: js, RecordID: rec.RecordID, Seal: a.seal})
	for _, err := range errs {
		a.fail(rep, CheckPeople, "%s: %v", path, err)
	}
	a.peopleValid = len(errs) == 0
	issued, hasDate := issueTime(rec)
	a.trusted = make([]bool, len(a.people))
	for i := range a.people {
		m := &a.people[i]
		fp := m.KeyFingerprint()
		at := m.SignedAt.UTC().Format("2006-01-02 15:04:05") + " UTC"
		who := fmt.Sprintf("signature %d: %s signed as %s on %s", m.Sequence, m.Name, m.Role, at)
		var problems []string
		switch {
		case signature.IsDemoKey(fp):
			problems = append(problems, "with a published demonstration key ("+fp+"): anyone can make it, so it authenticates nothing")
		case trust.Signers == nil:
			problems = append(problems, "with key "+fp+", which was not checked: pass "+names.signers()+" FILE, the file that says whose keys sign in which role")
		default:
			if err := trust.Signers.Check(fp, m.Name, m.Role); err != nil {
				problems = append(problems, err.Error())
			}
		}
		if hasDate && m.SignedAt.Before(issued) {
			problems = append(problems, "it is dated before the record's date "+rec.Date+", when it cannot have been given")
		}
		if !trust.Now.IsZero() && m.SignedAt.After(trust.Now.Add(ClockSkew)) {
			problems = append(problems, "it is dated after this computer's clock ("+trust.Now.UTC().Format("2006-01-02 15:04:05")+" UTC)")
		}
		if len(problems) > 0 {
			a.fail(rep, CheckPeople, "%s — %s", who, strings.Join(problems, "; "))
			continue
		}
		a.trusted[i] = true
		s, _ := trust.Signers.Lookup(fp)
		rep.add(CheckPeople, OK, "%s, with key %s (%s line %d)", who, fp, trust.Signers.Path, s.Line)
	}
}

// summarise adds the authentication verdict: the record is authenticated
// when it carries at least one signature and every signature it carries
// checked against the trust given.
func (a *auth) summarise(rep *Report, names Names, rec *record.Record) {
	if a.seal == nil && a.people == nil && !a.failed {
		a.fail(rep, CheckAuthentication, "nothing authenticates the record: it carries neither an operator's seal (%s) nor people's signatures (%s)", signature.FileName, signature.SignaturesFile)
		return
	}
	if a.failed {
		return
	}
	var parts []string
	if a.seal != nil {
		parts = append(parts, "sealed by "+a.sealWho)
	}
	signed := map[string]string{}
	for _, m := range a.people {
		signed[m.Role] = m.Name
	}
	var given, open []string
	for _, role := range record.SignoffRoles {
		if name, ok := signed[role]; ok {
			given = append(given, role+" by "+name)
		} else {
			open = append(open, role)
		}
	}
	if len(given) > 0 {
		parts = append(parts, "signed: "+strings.Join(given, ", "))
	}
	if len(open) > 0 {
		parts = append(parts, "not yet signed: "+strings.Join(open, ", "))
	}
	rep.add(CheckAuthentication, OK, "%s authenticated: %s", record.JSONFile, strings.Join(parts, "; "))
}
