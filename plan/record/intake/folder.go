package intake

import (
	"bytes"
	"fmt"
	"os"
	"path/filepath"

	"probity/plan/inputerr"
	"probity/plan/record"
	"probity/sampling"
)

// Folder is a draw folder as read from disk, with the bytes of each file
// for fingerprinting.
type Folder struct {
	Dir            string
	Manifest       *sampling.Manifest
	ManifestBytes  []byte
	Ledger         []sampling.LedgerRow
	LedgerBytes    []byte
	WorksheetBytes []byte
	// WorksheetHeader and Worksheet are the draw's worksheet.csv.
	WorksheetHeader []string
	Worksheet       []sampling.WorksheetRow
	// LabeledInPlace is set when worksheet.csv in the folder carries
	// labels: its bytes then differ from the manifest's, but with the
	// label, note and labeler columns emptied they are exactly what the
	// draw wrote. WorksheetSHA256 is then the manifest's value.
	LabeledInPlace  bool
	WorksheetSHA256 string
}

// Labels is the labeled worksheet given with --labels.
type Labels struct {
	Path   string
	Header []string
	Rows   []sampling.WorksheetRow
	Bytes  []byte
}

// ReadFolder reads manifest.json, ledger.csv and worksheet.csv from dir and
// checks that the ledger and the worksheet are the files the draw wrote
// (their SHA-256 against the manifest). candidates are the plan's
// candidate names, the ledger's prediction columns, and planFP the plan
// file's SHA-256, which must be the manifest's plan_fingerprint.
func ReadFolder(dir, planFP string, candidates []string) (*Folder, error) {
	f := &Folder{Dir: dir}
	var err error
	mpath := filepath.Join(dir, sampling.ManifestFile)
	if f.Manifest, f.ManifestBytes, err = sampling.ReadManifest(mpath); err != nil {
		return nil, err
	}
	if err := checkPlan(f.Manifest, mpath, planFP); err != nil {
		return nil, err
	}
	lpath := filepath.Join(dir, sampling.LedgerFile)
	if f.LedgerBytes, err = os.ReadFile(lpath); err != nil {
		return nil, inputerr.FromPath(err)
	}
	if err := matchManifest(f.Manifest, mpath, lpath, sampling.LedgerFile, f.LedgerBytes); err != nil {
		return nil, err
	}
	if f.Ledger, err = sampling.ReadLedger(lpath, candidates); err != nil {
		return nil, err
	}
	wpath := filepath.Join(dir, sampling.WorksheetFile)
	if f.WorksheetBytes, err = os.ReadFile(wpath); err != nil {
		return nil, inputerr.FromPath(err)
	}
	if f.WorksheetHeader, f.Worksheet, err = sampling.ReadWorksheet(wpath); err != nil {
		return nil, err
	}
	f.WorksheetSHA256 = record.SHA256(f.WorksheetBytes)
	if err := matchManifest(f.Manifest, mpath, wpath, sampling.WorksheetFile, f.WorksheetBytes); err != nil {
		blank, berr := blankWorksheet(f.WorksheetHeader, f.Worksheet)
		if berr != nil || record.SHA256(blank) != f.Manifest.Files[sampling.WorksheetFile] {
			return nil, err
		}
		f.LabeledInPlace = true
		f.WorksheetSHA256 = f.Manifest.Files[sampling.WorksheetFile]
	}
	return f, nil
}

// matchManifest checks a file's SHA-256 against manifest.files[name].
func matchManifest(m *sampling.Manifest, mpath, path, name string, data []byte) error {
	want, ok := m.Files[name]
	if !ok {
		return &inputerr.Error{File: mpath, Field: "files." + name, Msg: fmt.Sprintf("the manifest records no SHA-256 for %s", name),
			Hint: "use the manifest.json written by probity draw"}
	}
	if got := record.SHA256(data); got != want {
		return &inputerr.Error{File: path, Field: "sha256",
			Msg:  fmt.Sprintf("SHA-256 %s… differs from the %s… that %s records: the file was changed after the draw", got[:12], want[:12], mpath),
			Hint: fmt.Sprintf("restore the %s written by probity draw (label a copy of the worksheet and give that copy as the labels)", name)}
	}
	return nil
}

// blankWorksheet re-writes a worksheet with its label, note and labeler
// columns emptied, the way probity draw wrote it.
func blankWorksheet(header []string, rows []sampling.WorksheetRow) ([]byte, error) {
	show := header[2 : len(header)-3]
	if header[len(header)-1] != "labeler" {
		show = header[2 : len(header)-2]
	}
	blank := make([]sampling.WorksheetRow, len(rows))
	for i, r := range rows {
		blank[i] = sampling.WorksheetRow{Item: r.Item, RecordID: r.RecordID, Show: r.Show}
	}
	var buf bytes.Buffer
	if err := sampling.WriteWorksheet(&buf, show, blank); err != nil {
		return nil, err
	}
	return buf.Bytes(), nil
}

// ReadLabels reads the labeled worksheet.
func ReadLabels(path string) (*Labels, error) {
	data, err := os.ReadFile(path)
	if err != nil {
		return nil, inputerr.FromPath(err)
	}
	h, rows, err := sampling.ReadWorksheet(path)
	if err != nil {
		return nil, err
	}
	return &Labels{Path: path, Header: h, Rows: rows, Bytes: data}, nil
}
