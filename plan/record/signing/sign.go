// Package signing adds a person's electronic signature to a record folder:
// it checks that the folder is what it claims (record.json canonical with
// its id recomputing, the seal and the earlier signatures valid and
// chained, record.pdf exactly the rendering the signer is shown), then
// makes the signature manifestation (package signature) for the signer's
// name, sign-off role and meaning at the time given, renders record.pdf
// again with it shown, and signs. It returns the new files; the command
// writes them.
//
// Like the verification of a record, it renders the PDF (package
// pdfreport), so nothing but the command imports it. The package never
// prints and reads no clock (the time is passed in).
package signing

import (
	"bytes"
	"crypto/ed25519"
	"errors"
	"io/fs"
	"path/filepath"
	"slices"
	"strings"
	"time"

	"probity/pdfreport"
	"probity/plan/inputerr"
	"probity/plan/inputfile"
	"probity/plan/personname"
	"probity/plan/record"
	"probity/plan/record/signature"
	"probity/templates"
)

// Sentinel causes of refusals, so the command can add hints that name its
// flags.
var (
	// ErrNotSignable: the folder is not a record in the state it claims
	// (edited, a broken chain, a PDF that is not its rendering).
	ErrNotSignable = errors.New("the record cannot be signed")
	// ErrRole: the role is unknown or already signed.
	ErrRole = errors.New("the role cannot be signed")
	// ErrSigner: the key, the name or the clock does not fit.
	ErrSigner = errors.New("the signer cannot sign")
	// ErrNoName: no name was given and the sign-off names no signer for
	// the role.
	ErrNoName = errors.New("the signer's name is not known")
	// ErrWording: record.pdf was rendered with wording other than the one
	// given.
	ErrWording = errors.New("the record's wording was not given")
)

// Request is a signature to add.
type Request struct {
	// Dir is the record folder.
	Dir string
	// Role is the sign-off role signed (prepared, reviewed, approved).
	Role string
	// Name is the signer's printed name; "" takes the name the sign-off
	// file gave for the role.
	Name string
	// Key is the signer's private key.
	Key ed25519.PrivateKey
	// Signers, when given, must bind the key to the name and the role.
	Signers *signature.Signers
	// Templates is the wording the record was made with (nil: built-in).
	Templates *templates.Set
	// Now is the time of signing (from the system clock).
	Now time.Time
}

// Result is a signed record's new files and what was signed.
type Result struct {
	// Signature is the new signature, the last of Chain.
	Signature signature.Manifestation
	Chain     []signature.Manifestation
	// SignaturesFile and PDF are the new signatures.txt and record.pdf.
	SignaturesFile []byte
	PDF            []byte
	// Previous is signatures.txt as read (nil when there was none), so a
	// writer can refuse to replace a file another signer changed meanwhile.
	Previous []byte
	// Paper is the record.pdf's paper size (a4 or letter).
	Paper string
	// Record is the record signed; Unsigned lists the roles still
	// unsigned, in print order.
	Record   *record.Record
	Unsigned []string
}

// Sign checks the record folder and adds the signature. Refusals are
// *inputerr.Error values wrapping one of the sentinels above.
func Sign(r Request) (*Result, error) {
	refuse := func(sentinel error, file string, format string, args ...any) error {
		return inputerr.At(file, 0, "", format, args...).Wrap(sentinel)
	}
	jsonPath := filepath.Join(r.Dir, record.JSONFile)
	js, err := inputfile.ReadFile(jsonPath, "record", inputfile.TableLimit)
	if err != nil {
		return nil, err
	}
	rec, err := record.Decode(js)
	if err != nil {
		return nil, refuse(ErrNotSignable, jsonPath, "not a valid record: %v", err)
	}
	if rec.Format != record.Format {
		return nil, refuse(ErrNotSignable, jsonPath, "a record of format %d (probity %s); this probity signs format %d", rec.Format, rec.ToolVersion, record.Format)
	}
	if !record.IsCanonical(js) {
		return nil, refuse(ErrNotSignable, jsonPath, "not in canonical form: it was edited after it was written")
	}
	if id, err := record.ID(rec); err != nil || id != rec.RecordID {
		return nil, refuse(ErrNotSignable, jsonPath, "record_id %s is not the digest of the record's content: the record was edited", rec.RecordID)
	}
	seal, err := readSeal(r.Dir, rec, js)
	if err != nil {
		return nil, err
	}
	sigPath := filepath.Join(r.Dir, signature.SignaturesFile)
	previous, err := inputfile.ReadFile(sigPath, "signatures file", inputfile.SmallLimit)
	var chain []signature.Manifestation
	switch {
	case errors.Is(err, fs.ErrNotExist):
		previous = nil
	case err != nil:
		return nil, inputerr.FromPath(err)
	default:
		if chain, err = signature.ParseSignatures(previous, sigPath); err != nil {
			return nil, err
		}
	}
	binding := signature.Binding{RecordJSON: js, RecordID: rec.RecordID, Seal: seal}
	if errs := signature.CheckChain(chain, binding); len(errs) > 0 {
		return nil, refuse(ErrNotSignable, sigPath, "%v", errs[0])
	}
	if !slices.Contains(record.SignoffRoles, r.Role) {
		return nil, inputerr.Errorf("role %q is not one of %s", r.Role, strings.Join(record.SignoffRoles, ", ")).Wrap(ErrRole)
	}
	for _, m := range chain {
		if m.Role == r.Role {
			return nil, refuse(ErrRole, sigPath, "the role %s is already signed, by %s on %s UTC (signature %d)", r.Role, m.Name, m.SignedAt.UTC().Format("2006-01-02 15:04:05"), m.Sequence)
		}
	}
	set := r.Templates
	if set == nil {
		if set, err = templates.Load(""); err != nil {
			return nil, err
		}
	}
	if set.Fingerprint() != rec.Wording.Digest {
		made := "the built-in wording of another probity version"
		if len(rec.Wording.Replaced) > 0 {
			made = "custom wording (" + strings.Join(rec.Wording.Replaced, ", ") + " replaced)"
		}
		return nil, refuse(ErrWording, jsonPath, "the record was made with %s (wording digest %s…); the wording given has digest %s…", made, short(rec.Wording.Digest), short(set.Fingerprint()))
	}
	pdfPath := filepath.Join(r.Dir, record.PDFFile)
	pdf, err := inputfile.ReadFile(pdfPath, "record PDF", inputfile.TableLimit)
	if err != nil {
		return nil, err
	}
	shown := signature.Shown(chain)
	paper := ""
	for _, p := range []string{"a4", "letter"} {
		again, err := pdfreport.Render(rec, pdfreport.Options{Paper: p, Templates: set, Signatures: shown})
		if err != nil {
			return nil, err
		}
		if bytes.Equal(again, pdf) {
			paper = p
			break
		}
	}
	if paper == "" {
		return nil, refuse(ErrNotSignable, pdfPath, "not the rendering of record.json and its %d signatures by this probity version: it was changed, or made by another version (the record says probity %s); a signer signs only what is shown faithfully", len(chain), rec.ToolVersion)
	}

	m := signature.Next(chain, binding)
	m.Role = r.Role
	intended := intendedSigner(rec, r.Role)
	if m.Name, err = personname.Clean(r.Name); err != nil {
		return nil, inputerr.Errorf("%v", err).Wrap(ErrSigner)
	}
	if m.Name == "" {
		m.Name = intended.Name
	}
	if m.Name == "" {
		return nil, inputerr.Errorf("the sign-off names no signer for the role %s, so the signer's name must be given", r.Role).Wrap(ErrNoName)
	}
	m.Meaning = strings.TrimSpace(intended.Meaning)
	if m.Meaning == "" {
		return nil, refuse(ErrNotSignable, jsonPath, "the sign-off states no meaning for the role %s", r.Role)
	}
	fp := signature.Fingerprint(r.Key.Public().(ed25519.PublicKey))
	if signature.IsDemoKey(fp) && !rec.Demonstration {
		return nil, inputerr.Errorf("key %s is a published demonstration key: it signs nothing but demonstration records", fp).Wrap(ErrSigner)
	}
	if r.Signers != nil {
		if err := r.Signers.Check(fp, m.Name, r.Role); err != nil {
			return nil, inputerr.Errorf("%v", err).Wrap(ErrSigner)
		}
	}
	m.SignedAt = r.Now.UTC().Truncate(time.Second)
	if issued, err := time.Parse("2006-01-02", rec.Date); err == nil && m.SignedAt.Before(issued) {
		return nil, inputerr.Errorf("the clock says %s UTC, before the record's date %s: a signature is never dated before the record it signs", m.SignedAt.Format("2006-01-02 15:04:05"), rec.Date).Wrap(ErrSigner)
	}
	if n := len(chain); n > 0 && m.SignedAt.Before(chain[n-1].SignedAt) {
		return nil, inputerr.Errorf("the clock says %s UTC, before signature %d (%s UTC): check this computer's clock", m.SignedAt.Format("2006-01-02 15:04:05"), n, chain[n-1].SignedAt.UTC().Format("2006-01-02 15:04:05")).Wrap(ErrSigner)
	}
	m.PublicKey = r.Key.Public().(ed25519.PublicKey)
	newPDF, err := pdfreport.Render(rec, pdfreport.Options{Paper: paper, Templates: set, Signatures: append(shown, m.Shown())})
	if err != nil {
		return nil, err
	}
	m.PDFSHA256 = record.SHA256(newPDF)
	m.Sign(r.Key)
	chain = append(chain, m)
	res := &Result{Signature: m, Chain: chain, SignaturesFile: signature.MarshalSignatures(chain), PDF: newPDF,
		Previous: previous, Paper: paper, Record: rec}
	signed := map[string]bool{}
	for _, x := range chain {
		signed[x.Role] = true
	}
	for _, role := range record.SignoffRoles {
		if !signed[role] {
			res.Unsigned = append(res.Unsigned, role)
		}
	}
	return res, nil
}

// readSeal reads record.sig and checks its signature over record.json and
// that it is the key record.json names: what a signature is bound to must
// be intact. It returns nil when the record has no seal.
func readSeal(dir string, rec *record.Record, js []byte) ([]byte, error) {
	path := filepath.Join(dir, signature.FileName)
	data, err := inputfile.ReadFile(path, "seal", inputfile.SmallLimit)
	if errors.Is(err, fs.ErrNotExist) {
		if rec.SigningKey != "" {
			return nil, inputerr.At(path, 0, "", "is missing, but record.json says the record was sealed with %s", rec.SigningKey).Wrap(ErrNotSignable)
		}
		return nil, nil
	}
	if err != nil {
		return nil, inputerr.FromPath(err)
	}
	sig, err := signature.Parse(data, path)
	if err != nil {
		return nil, err
	}
	if err := sig.Verify(record.JSONFile, js); err != nil {
		return nil, inputerr.At(path, 0, "", "%v", err).Wrap(ErrNotSignable)
	}
	if fp := signature.Fingerprint(sig.PublicKey); fp != rec.SigningKey {
		return nil, inputerr.At(path, 0, "", "was made with key %s, but record.json names %q", fp, rec.SigningKey).Wrap(ErrNotSignable)
	}
	return data, nil
}

// intendedSigner is the sign-off entry of a role.
func intendedSigner(rec *record.Record, role string) record.Signoff {
	for _, s := range rec.Signoff {
		if s.Role == role {
			return s
		}
	}
	return record.Signoff{Role: role}
}

func short(h string) string {
	if len(h) > 12 {
		return h[:12]
	}
	return h
}
