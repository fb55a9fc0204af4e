package main

import (
	"path/filepath"

	"probity/plan/inputerr"
	"probity/plan/record/signature"
	"probity/sampling/drawfolder"
	"probity/sampling/labeltrail"
	"probity/sampling/safewrite"
)

// namedFile is one file of a record folder.
type namedFile struct {
	name string
	data []byte
}

// recordOutHint is the hint for an --out folder that is not empty.
const recordOutHint = "name a new folder, or pass --force to replace the record files in it"

// checkOutWritable refuses an --out that a write would refuse (not a
// folder, or not empty without force), before anything is computed.
func checkOutWritable(dir string, force bool) error {
	return recordOutError(safewrite.CheckFolder(dir, force))
}

// recordOutError adds the record command's hint to a refused --out.
func recordOutError(err error) error {
	if inputerr.Is(err) && inputerr.HintOf(err) == "" {
		return inputerr.SetHint(err, recordOutHint)
	}
	return err
}

// writeRecordFolder writes the files into dir through safewrite: a new
// folder appears whole; into an existing one (force) the files are
// replaced together; the people's signatures of an earlier record
// (signatures.txt) are removed, and so is its record.sig when this record
// is not sealed. None of the record's inputs is
// ever written over.
func writeRecordFolder(dir string, files []namedFile, force bool, inputs []string) error {
	out := make([]safewrite.File, len(files))
	for i, f := range files {
		out[i] = safewrite.File{Path: f.name, Data: f.data}
	}
	return recordOutError(safewrite.WriteFolder(dir, out, safewrite.FolderOptions{
		Replace: force, Protected: inputs, Stale: []string{signature.FileName, signature.SignaturesFile},
	}))
}

// recordInputFiles are the files a record is made from.
func recordInputFiles(o *recordOptions) []string {
	in := []string{o.planPath, o.labels, o.trail, o.signoff, o.signKey, o.quality.second, o.quality.adjudicated}
	for _, name := range []string{drawfolder.ManifestFile, drawfolder.LedgerFile, drawfolder.WorksheetFile, drawfolder.WorksheetSecondFile, labeltrail.FileName} {
		in = append(in, filepath.Join(o.drawDir, name))
	}
	return in
}
