package verification

import (
	"errors"
	"io/fs"
	"os"
	"path/filepath"

	"probity/plan/record"
	"probity/plan/record/signature"
)

// checkSignatures checks record.sig against record.json and record.pdf,
// the signing key record.json names, and the trusted key when given. rec
// is nil when record.json is not a valid record.
func checkSignatures(rep *Report, in Input, rec *record.Record, js []byte) {
	sigPath := filepath.Join(in.Dir, signature.FileName)
	pdfPath := filepath.Join(in.Dir, record.PDFFile)
	pdf, pdfErr := os.ReadFile(pdfPath)
	if pdfErr != nil {
		rep.add(CheckSignature, Failed, "%s is missing or unreadable: %v", pdfPath, errors.Unwrap(pdfErr))
	}
	data, err := os.ReadFile(sigPath)
	if errors.Is(err, fs.ErrNotExist) {
		switch {
		case in.TrustedKey != nil:
			rep.add(CheckSignature, Failed, "%s is missing: the record is not signed, so it cannot be checked against %s", sigPath, in.Names.trustedKey())
		case rec != nil && rec.SigningKey != "":
			rep.add(CheckSignature, Failed, "%s is missing, but record.json says it was signed by %s", sigPath, rec.SigningKey)
		default:
			rep.add(CheckSignature, Skipped, "signatures: the record is unsigned (no %s)", signature.FileName)
		}
		return
	}
	if err != nil {
		rep.add(CheckSignature, Failed, "%s: %v", sigPath, err)
		return
	}
	sig, err := signature.Parse(data, sigPath)
	if err != nil {
		rep.add(CheckSignature, Failed, "%v", err)
		return
	}
	fp := signature.Fingerprint(sig.PublicKey)
	for _, f := range []struct {
		name string
		data []byte
		ok   bool
	}{{record.JSONFile, js, true}, {record.PDFFile, pdf, pdfErr == nil}} {
		if !f.ok {
			continue
		}
		if err := sig.Verify(f.name, f.data); err != nil {
			rep.add(CheckSignature, Failed, "%s (in %s)", err, in.Dir)
		} else {
			rep.add(CheckSignature, OK, "%s: signature valid", filepath.Join(in.Dir, f.name))
		}
	}
	if rec != nil && rec.SigningKey != fp {
		rep.add(CheckSigningKey, Failed, "%s names signing key %q, but %s was made with %s", record.JSONFile, rec.SigningKey, signature.FileName, fp)
	}
	switch {
	case in.TrustedKey == nil:
		rep.add(CheckSigningKey, Skipped, "signing key %s not checked against a trusted key (pass %s KEY.pub)", fp, in.Names.trustedKey())
	case signature.Fingerprint(in.TrustedKey) != fp:
		rep.add(CheckSigningKey, Failed, "%s was signed with key %s, not with %s %s (%s)", signature.FileName, fp, in.Names.trustedKey(), in.TrustedKeyPath, signature.Fingerprint(in.TrustedKey))
	default:
		rep.add(CheckSigningKey, OK, "signed with the trusted key %s (%s)", in.TrustedKeyPath, fp)
	}
}
