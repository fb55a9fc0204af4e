package sampling

import (
	"bytes"
	"crypto/sha256"
	"encoding/hex"
	"errors"
	"io"
	"os"
	"path/filepath"
	"probity/plan/inputerr"
)

// Folder is the content of a draw folder, ready to be written: the
// manifest (its Files map is filled in by Render), the ledger and the
// worksheets. It is built by the draw from a log file and can equally be
// built from rows selected elsewhere (e.g. inside a database).
type Folder struct {
	Manifest   *Manifest
	Candidates []string // candidate names, plan order (ledger columns)
	Show       []string // --show columns (worksheet columns)
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

// ErrFolderNotEmpty is returned by WriteFolder for a non-empty directory
// when overwriting was not asked for.
var ErrFolderNotEmpty = errors.New("output folder is not empty")

// Render encodes the folder's files in the order they are written:
// worksheet.csv, worksheet-second.csv (if any), ledger.csv, then
// manifest.json, whose Files map it sets to the SHA-256 of the others.
func (f *Folder) Render() ([]NamedFile, error) {
	var files []NamedFile
	var buf bytes.Buffer
	if err := WriteWorksheet(&buf, f.Show, f.Worksheet); err != nil {
		return nil, err
	}
	files = append(files, NamedFile{WorksheetFile, append([]byte{}, buf.Bytes()...)})
	if f.Second != nil {
		buf.Reset()
		if err := WriteWorksheet(&buf, f.Show, f.Second); err != nil {
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

// CheckFolderWritable returns ErrFolderNotEmpty (wrapped, naming dir) when
// dir exists, is not empty and force is false, and an error when dir
// exists but is not a directory. A missing dir is fine.
func CheckFolderWritable(dir string, force bool) error {
	st, err := os.Stat(dir)
	if errors.Is(err, os.ErrNotExist) {
		return nil
	}
	if err != nil {
		return err
	}
	if !st.IsDir() {
		return inputerr.At(dir, 0, "", "exists and is not a folder")
	}
	if force {
		return nil
	}
	d, err := os.Open(dir)
	if err != nil {
		return err
	}
	defer d.Close()
	if _, err := d.Readdirnames(1); err == io.EOF {
		return nil
	}
	return inputerr.At(dir, 0, "", "%w", ErrFolderNotEmpty)
}

// WriteFolder renders f and writes it into dir, creating dir if needed.
// A non-empty dir is refused unless force. Each file is written to a
// temporary name in dir and renamed into place, manifest.json last; on
// failure the temporary files are removed, and so is dir if WriteFolder
// created it. With force, a stale worksheet-second.csv from an earlier draw
// is removed when f has none.
func WriteFolder(dir string, f *Folder, force bool) (err error) {
	files, err := f.Render()
	if err != nil {
		return err
	}
	if err := CheckFolderWritable(dir, force); err != nil {
		return err
	}
	created := false
	if _, statErr := os.Stat(dir); errors.Is(statErr, os.ErrNotExist) {
		if err := os.MkdirAll(dir, 0o755); err != nil {
			return err
		}
		created = true
	}
	var temps []string
	defer func() {
		if err == nil {
			return
		}
		for _, t := range temps {
			os.Remove(t)
		}
		if created {
			os.RemoveAll(dir)
		}
	}()
	for _, nf := range files {
		tmp, err := writeTemp(dir, nf)
		if tmp != "" {
			temps = append(temps, tmp)
		}
		if err != nil {
			return err
		}
	}
	for i, nf := range files {
		if err := os.Rename(temps[i], filepath.Join(dir, nf.Name)); err != nil {
			return err
		}
	}
	temps = nil
	if f.Second == nil {
		if err := os.Remove(filepath.Join(dir, WorksheetSecondFile)); err != nil && !errors.Is(err, os.ErrNotExist) {
			return err
		}
	}
	return nil
}

// writeTemp writes nf to a new temporary file in dir and returns its path.
func writeTemp(dir string, nf NamedFile) (string, error) {
	t, err := os.CreateTemp(dir, "."+nf.Name+".tmp-*")
	if err != nil {
		return "", err
	}
	if _, err := t.Write(nf.Data); err != nil {
		t.Close()
		return t.Name(), err
	}
	if err := t.Sync(); err != nil {
		t.Close()
		return t.Name(), err
	}
	if err := t.Close(); err != nil {
		return t.Name(), err
	}
	if err := os.Chmod(t.Name(), 0o644); err != nil {
		return t.Name(), err
	}
	return t.Name(), nil
}
