package sampling

import (
	"bytes"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"os"
	"probity/plan/inputerr"
)

// MarshalManifest encodes m as manifest.json: keys in struct order (maps
// sorted by key), two-space indent, no HTML escaping, a trailing newline.
// Nil lists are written as [] rather than null, so the bytes depend only on
// the content.
func MarshalManifest(m *Manifest) ([]byte, error) {
	c := *m
	if c.StrataColumns == nil {
		c.StrataColumns = []string{}
	}
	if c.Bands == nil {
		c.Bands = []string{}
	}
	if c.ShowColumns == nil {
		c.ShowColumns = []string{}
	}
	if c.Where == nil {
		c.Where = []string{}
	}
	if c.Strata == nil {
		c.Strata = []StratumInfo{}
	}
	if c.Files == nil {
		c.Files = map[string]string{}
	}
	var buf bytes.Buffer
	enc := json.NewEncoder(&buf)
	enc.SetEscapeHTML(false)
	enc.SetIndent("", "  ")
	if err := enc.Encode(&c); err != nil {
		return nil, fmt.Errorf("encoding manifest: %w", err)
	}
	return buf.Bytes(), nil
}

// WriteManifest writes MarshalManifest(m) to w.
func WriteManifest(w io.Writer, m *Manifest) error {
	b, err := MarshalManifest(m)
	if err != nil {
		return err
	}
	_, err = w.Write(b)
	return err
}

// ParseManifest decodes manifest.json bytes; name is used in errors.
// Unknown keys and a format other than ManifestFormat are refused.
func ParseManifest(data []byte, name string) (*Manifest, error) {
	dec := json.NewDecoder(bytes.NewReader(data))
	dec.DisallowUnknownFields()
	var m Manifest
	if err := dec.Decode(&m); err != nil {
		line := 0
		var se *json.SyntaxError
		var te *json.UnmarshalTypeError
		switch {
		case errors.As(err, &se):
			line = lineAt(data, se.Offset)
		case errors.As(err, &te):
			line = lineAt(data, te.Offset)
		}
		return nil, &inputerr.Error{File: name, Line: line, Msg: "not a valid manifest: " + err.Error(), Err: err}
	}
	if dec.More() {
		return nil, inputErrorf(name, 0, "", "not a valid manifest: extra data after the JSON object")
	}
	if m.Format != ManifestFormat {
		return nil, inputErrorf(name, 0, "format", "format %d is not supported (this probity reads format %d)", m.Format, ManifestFormat)
	}
	if m.SelectionSeed == "" {
		return nil, inputErrorf(name, 0, "selection_seed", "selection_seed is empty")
	}
	return &m, nil
}

// ReadManifest reads and decodes a manifest.json. It also returns the raw
// bytes, which later steps fingerprint.
func ReadManifest(path string) (*Manifest, []byte, error) {
	data, err := os.ReadFile(path)
	if err != nil {
		return nil, nil, inputerr.FromPath(err)
	}
	m, err := ParseManifest(data, path)
	if err != nil {
		return nil, nil, err
	}
	return m, data, nil
}

// lineAt returns the 1-based line of byte offset off in data.
func lineAt(data []byte, off int64) int {
	if off > int64(len(data)) {
		off = int64(len(data))
	}
	if off < 0 {
		off = 0
	}
	return bytes.Count(data[:off], []byte("\n")) + 1
}
