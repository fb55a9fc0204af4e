package verification

import (
	"bytes"
	"path/filepath"
	"strconv"
	"strings"

	"probity/pdfreport"
	"probity/plan/record"
	"probity/plan/record/signature"
	"probity/templates"
)

// checkRendering renders record.json again, with the people's signatures
// it carries, and compares it with record.pdf: a match proves that the PDF
// shows exactly what record.json and the signatures hold. It then renders
// the record as each signer saw it (with the signatures up to theirs) and
// as it was issued (with none), and compares those with the PDF digests
// the signatures and the seal signed.
//
// A record.pdf that is not the rendering fails, with one exception stated
// as a limitation: a record made by another probity version, which may lay
// the record out differently, whose record.pdf is byte for byte the PDF
// the last trusted signature signed (the last person's, or the seal when
// no person signed).
func checkRendering(rep *Report, in Input, rec *record.Record, a *auth, pdf []byte) {
	pdfPath := filepath.Join(in.Dir, record.PDFFile)
	set := in.Templates
	if set == nil {
		var err error
		if set, err = templates.Load(""); err != nil {
			rep.add(CheckRendering, Failed, "%s not re-rendered: %v", pdfPath, err)
			return
		}
	}
	if rec.Wording.Digest != set.Fingerprint() {
		made := "the built-in wording of another version"
		if len(rec.Wording.Replaced) > 0 {
			made = "custom wording (" + strings.Join(rec.Wording.Replaced, ", ") + " replaced)"
		}
		rep.add(CheckRendering, Failed, "%s cannot be compared with a rendering: the record was made with %s, wording digest %s…, and the wording given (%s) has digest %s…; pass the %s folder it was made with",
			pdfPath, made, short12(rec.Wording.Digest), wordingName(in), short12(set.Fingerprint()), in.Names.templates())
		return
	}
	var shown []record.ElectronicSignature
	if a.people != nil {
		shown = signature.Shown(a.people)
	}
	paper := ""
	for _, p := range []string{"a4", "letter"} {
		again, err := pdfreport.Render(rec, pdfreport.Options{Paper: p, Templates: set, Signatures: shown})
		if err != nil {
			rep.add(CheckRendering, Failed, "%s not re-rendered: %v", pdfPath, err)
			return
		}
		if bytes.Equal(again, pdf) {
			paper = p
			break
		}
	}
	if paper == "" {
		unmatched(rep, in, rec, a, pdf, pdfPath)
		return
	}
	with := ""
	if n := len(shown); n > 0 {
		with = " and its " + plural(n, "signature", "signatures")
	}
	rep.add(CheckRendering, OK, "%s is exactly the rendering of %s%s (%s)", pdfPath, record.JSONFile, with, paper)
	// What each signer signed, and the PDF as issued.
	for k := 0; k <= len(shown); k++ {
		want := a.issuedPDF
		if k > 0 {
			want = a.people[k-1].PDFSHA256
		}
		if want == "" {
			continue
		}
		again, err := pdfreport.Render(rec, pdfreport.Options{Paper: paper, Templates: set, Signatures: shown[:k]})
		if err != nil {
			rep.add(CheckRendering, Failed, "%s not re-rendered: %v", pdfPath, err)
			return
		}
		got := record.SHA256(again)
		switch {
		case got == want && k == 0 && len(shown) > 0:
			rep.add(CheckRendering, OK, "the seal's %s is the rendering of %s as issued, before the people's signatures", record.PDFFile, record.JSONFile)
		case got != want && k == 0:
			a.fail(rep, CheckRendering, "the seal in %s covers a %s (SHA-256 %s…) that is not the rendering of %s as issued (%s…)", signature.FileName, record.PDFFile, short12(want), record.JSONFile, short12(got))
		case got != want:
			m := a.people[k-1]
			a.fail(rep, CheckRendering, "signature %d (%s) was given over a %s (SHA-256 %s…) that is not the rendering of the record with the signatures up to it (%s…)", m.Sequence, m.Name, record.PDFFile, short12(want), short12(got))
		}
	}
}

// unmatched handles a record.pdf that is not the rendering of record.json.
func unmatched(rep *Report, in Input, rec *record.Record, a *auth, pdf []byte, pdfPath string) {
	if rec.ToolVersion == in.ToolVersion {
		rep.add(CheckRendering, Failed, "%s is not the rendering of %s with %s by this probity version (%s): it was changed or swapped", pdfPath, record.JSONFile, wordingName(in), in.ToolVersion)
		return
	}
	digest, who, trusted := "", "", false
	switch {
	case len(a.people) > 0:
		last := a.people[len(a.people)-1]
		digest, who = last.PDFSHA256, "signature "+itoa(last.Sequence)+" ("+last.Name+")"
		trusted = a.peopleValid && a.trusted[len(a.trusted)-1]
	case a.seal != nil:
		digest, who, trusted = a.issuedPDF, "the seal ("+a.sealWho+")", a.sealWho != ""
	}
	if digest != "" && digest == record.SHA256(pdf) && trusted {
		rep.add(CheckRendering, Limited, "%s was not compared with a rendering of %s: the record was made by probity %s and this is %s, which may lay it out differently. It is byte for byte the PDF that %s signed, so that it shows what %s holds rests on that signature",
			pdfPath, record.JSONFile, rec.ToolVersion, in.ToolVersion, who, record.JSONFile)
		return
	}
	rep.add(CheckRendering, Failed, "%s cannot be authenticated: it is not the rendering of %s by this probity version (%s; the record was made by %s), and no trusted signature covers it",
		pdfPath, record.JSONFile, in.ToolVersion, rec.ToolVersion)
}

// wordingName says which wording was given.
func wordingName(in Input) string {
	if in.TemplatesDir != "" {
		return "the wording in " + in.TemplatesDir
	}
	return "the built-in wording"
}

func itoa(n int) string { return strconv.Itoa(n) }

// plural is "1 signature" or "n signatures".
func plural(n int, one, many string) string {
	if n == 1 {
		return "1 " + one
	}
	return itoa(n) + " " + many
}
