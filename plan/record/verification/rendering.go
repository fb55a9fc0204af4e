package verification

import (
	"bytes"
	"os"
	"path/filepath"

	"probity/pdfreport"
	"probity/plan/record"
)

// checkRendering renders record.json again and compares it with
// record.pdf. A match proves the PDF shows exactly what record.json holds.
// No match fails when the record was made by this very probity version
// (then the PDF was changed, swapped, or made with other wording); for a
// record from another version it is only reported, since another version
// may lay the record out differently (the signature still ties the PDF to
// record.json).
func checkRendering(rep *Report, in Input, rec *record.Record) {
	pdfPath := filepath.Join(in.Dir, record.PDFFile)
	pdf, err := os.ReadFile(pdfPath)
	if err != nil {
		return // reported with the signatures
	}
	for _, paper := range []string{"a4", "letter"} {
		again, err := pdfreport.Render(rec, pdfreport.Options{Paper: paper, Templates: in.Templates})
		if err != nil {
			rep.add(CheckRendering, Skipped, "%s not re-rendered: %v", pdfPath, err)
			return
		}
		if bytes.Equal(again, pdf) {
			rep.add(CheckRendering, OK, "%s is exactly the rendering of %s (%s)", pdfPath, record.JSONFile, paper)
			return
		}
	}
	wording := "the built-in wording"
	if in.TemplatesDir != "" {
		wording = "the wording in " + in.TemplatesDir
	}
	if rec.ToolVersion == in.ToolVersion {
		rep.add(CheckRendering, Failed, "%s is not the rendering of %s with %s by this probity version (%s): it was changed or swapped, or made with other %s (pass them)", pdfPath, record.JSONFile, wording, in.ToolVersion, in.Names.templates())
		return
	}
	rep.add(CheckRendering, Skipped, "%s was not compared with a fresh rendering: the record was made by probity %s, this is %s", pdfPath, rec.ToolVersion, in.ToolVersion)
}
