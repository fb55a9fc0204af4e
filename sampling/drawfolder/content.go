package drawfolder

import (
	"bytes"
	"crypto/sha256"
	"encoding/hex"
	"probity/sampling/safewrite"
)

// Content is what a draw writes into its folder: the manifest (its Files
// map is filled in by Render), the ledger and the worksheets. It is built
// by the draw from a log file and can equally be built from rows selected
// elsewhere (e.g. inside a database).
type Content struct {
	Manifest   *Manifest
	Candidates []string // candidate names, plan order (ledger columns)
	Show       []string // the shown columns (worksheet columns after record_id)
	Ledger     []LedgerRow
	Worksheet  []WorksheetRow
	// Second is worksheet-second.csv; nil when no item is doubled.
	Second []WorksheetRow
}

// NamedFile is one file of a rendered folder.
type NamedFile struct {
	Name string
	Data []byte
}

// Render encodes the folder's files in the order they are written:
// worksheet.csv, worksheet-second.csv (if any), ledger.csv, then
// manifest.json, whose Files map it sets to the SHA-256 of the others.
func (f *Content) Render() ([]NamedFile, error) {
	var files []NamedFile
	var buf bytes.Buffer
	id := ManifestDrawID(f.Manifest)
	if err := WriteDrawWorksheet(&buf, id, f.Show, f.Worksheet); err != nil {
		return nil, err
	}
	files = append(files, NamedFile{WorksheetFile, append([]byte{}, buf.Bytes()...)})
	if f.Second != nil {
		buf.Reset()
		if err := WriteDrawWorksheet(&buf, id, f.Show, f.Second); err != nil {
			return nil, err
		}
		files = append(files, NamedFile{WorksheetSecondFile, append([]byte{}, buf.Bytes()...)})
	}
	buf.Reset()
	if err := WriteLedger(&buf, f.Candidates, f.Ledger); err != nil {
		return nil, err
	}
	files = append(files, NamedFile{LedgerFile, append([]byte{}, buf.Bytes()...)})
	f.Manifest.Files = map[string]string{}
	for _, nf := range files {
		f.Manifest.Files[nf.Name] = SHA256Hex(nf.Data)
	}
	mb, err := MarshalManifest(f.Manifest)
	if err != nil {
		return nil, err
	}
	return append(files, NamedFile{ManifestFile, mb}), nil
}

// SHA256Hex is the lowercase hex SHA-256 of data.
func SHA256Hex(data []byte) string {
	s := sha256.Sum256(data)
	return hex.EncodeToString(s[:])
}

// Write renders f and writes it into dir through safewrite: a new dir
// appears whole; into an existing one (o.Replace, a forced draw) the files
// are moved into place together, manifest.json last, and a
// worksheet-second.csv of an earlier draw is removed when f has none.
func Write(dir string, f *Content, o safewrite.FolderOptions) error {
	rendered, err := f.Render()
	if err != nil {
		return err
	}
	files := make([]safewrite.File, len(rendered))
	for i, nf := range rendered {
		files[i] = safewrite.File{Path: nf.Name, Data: nf.Data}
	}
	if f.Second == nil {
		o.Stale = append(o.Stale, WorksheetSecondFile)
	}
	return safewrite.WriteFolder(dir, files, o)
}
