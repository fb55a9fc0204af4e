package main

import (
	"errors"
	"fmt"
	"io"
	"os"
	"path/filepath"

	"probity/plan/inputerr"
	"probity/plan/record/signature"
)

// Names of the files in a record folder.
const (
	recordJSON = "record.json"
	recordPDF  = "record.pdf"
)

// namedFile is one file of a record folder.
type namedFile struct {
	name string
	data []byte
}

// checkOutWritable refuses an --out that exists and is not an empty folder
// (unless force), before anything is computed.
func checkOutWritable(dir string, force bool) error {
	st, err := os.Stat(dir)
	if errors.Is(err, os.ErrNotExist) {
		return nil
	}
	if err != nil {
		return inputerr.Errorf("%s: %v", dir, err)
	}
	if !st.IsDir() {
		return inputerr.Errorf("--out %s exists and is not a folder", dir).WithHint("name a new folder for the record")
	}
	if force {
		return nil
	}
	f, err := os.Open(dir)
	if err != nil {
		return inputerr.Errorf("%s: %v", dir, err)
	}
	defer f.Close()
	if _, err := f.Readdirnames(1); err != io.EOF {
		return inputerr.Errorf("--out %s is not empty", dir).WithHint("name a new folder, or pass --force to replace the record files in it")
	}
	return nil
}

// writeRecordFolder writes the files into dir so that a failure leaves
// nothing behind: everything is written into a temporary folder beside
// dir, which is renamed to dir when dir does not exist; otherwise each file
// is renamed into dir, and a stale record.sig from an earlier run is
// removed when this record is unsigned.
func writeRecordFolder(dir string, files []namedFile, force bool) (err error) {
	parent := filepath.Dir(filepath.Clean(dir))
	tmp, err := os.MkdirTemp(parent, "."+filepath.Base(dir)+".tmp-*")
	if err != nil {
		return inputerr.Errorf("cannot write into %s: %v", parent, err)
	}
	defer func() {
		if err != nil || tmp != "" {
			os.RemoveAll(tmp)
		}
	}()
	for _, f := range files {
		if err := os.WriteFile(filepath.Join(tmp, f.name), f.data, 0o644); err != nil {
			return inputerr.Errorf("writing %s: %v", f.name, err)
		}
	}
	if _, statErr := os.Stat(dir); errors.Is(statErr, os.ErrNotExist) {
		if err := os.Chmod(tmp, 0o755); err != nil {
			return inputerr.Errorf("%s: %v", tmp, err)
		}
		if err := os.Rename(tmp, dir); err != nil {
			return inputerr.Errorf("cannot create %s: %v", dir, err)
		}
		tmp = ""
		return nil
	}
	if err := checkOutWritable(dir, force); err != nil {
		return err
	}
	signed := false
	for _, f := range files {
		signed = signed || f.name == signature.FileName
		if err := os.Rename(filepath.Join(tmp, f.name), filepath.Join(dir, f.name)); err != nil {
			return fmt.Errorf("moving %s into %s: %w", f.name, dir, err)
		}
	}
	if !signed {
		if err := os.Remove(filepath.Join(dir, signature.FileName)); err != nil && !errors.Is(err, os.ErrNotExist) {
			return err
		}
	}
	return nil
}
