package drawfolder

import (
	"bytes"
	"encoding/json"
	"errors"
	"fmt"
	"io"

	"probity/plan/chrono"
	"probity/plan/inputerr"
	"probity/plan/inputfile"
)

// ManifestFormat is the version of the manifest layout written by this code.
const ManifestFormat = 1

// Manifest is manifest.json: what a draw read, how it allocated and what it
// wrote. Keys and their order are stable; later steps and reviewers read
// them by name.
type Manifest struct {
	Format      int    `json:"format"`
	ToolVersion string `json:"tool_version"`
	// Drawn is when the sample was drawn (UTC, to the second) and where
	// that time came from; nil in a folder drawn before draws were timed.
	Drawn *chrono.Stamp `json:"drawn"`
	// PlanFingerprint is the SHA-256 of the plan file's bytes.
	PlanFingerprint string `json:"plan_fingerprint"`
	// Seed is the plan's seed; Period and PeriodSeed are set for a
	// periodic draw (PeriodSeed = sha256hex(seed + ":period:" + period)),
	// and then SelectionSeed = PeriodSeed, else SelectionSeed = Seed.
	Seed          string `json:"seed"`
	Period        string `json:"period,omitempty"`
	PeriodSeed    string `json:"period_seed,omitempty"`
	SelectionSeed string `json:"selection_seed"`
	// KeyDefinition states the key in words, for reviewers.
	KeyDefinition string   `json:"key_definition"`
	Log           LogInfo  `json:"log"`
	IDColumn      string   `json:"id_column"`
	StrataColumns []string `json:"strata_columns"`
	// Bands are the score bands that define strata, e.g. "score=0.5,0.9".
	Bands       []string       `json:"bands"`
	ShowColumns []string       `json:"show_columns"`
	Allocation  AllocationInfo `json:"allocation"`
	Strata      []StratumInfo  `json:"strata"`
	// SampleSize is Σ n_h (the plan's n, or less when the log is smaller
	// in some strata); Spares is Σ spares.
	SampleSize int `json:"sample_size"`
	Spares     int `json:"spares"`
	// Files maps "worksheet.csv" and "ledger.csv" to their SHA-256.
	Files map[string]string `json:"files"`
	// Engine is set when the selection ran inside a database (nil for a
	// draw from a log file).
	Engine *EngineInfo `json:"engine"`
	// Where lists the filters that define the scope ("COLUMN=V1,V2").
	Where []string `json:"where"`
	// Dedupe is "first" when repeated ids were allowed (first row kept),
	// else "". DuplicatesDropped counts the repeated rows dropped.
	Dedupe            string `json:"dedupe"`
	DuplicatesDropped int    `json:"duplicates_dropped"`
	// Double is the number of items drawn for a second label: the first
	// Double items in key order are also in worksheet-second.csv.
	Double int `json:"double"`
	// LotSize is the number of rows in scope (after filters and dropped
	// repeats): the lot a finite-population plan judges. For a periodic
	// draw of a --population plan it is the period's lot size.
	LotSize int64 `json:"lot_size"`
	// Measures is set for a plan with measures (allocation rule
	// "measures"): each claim's design on these strata.
	Measures *MeasuresInfo `json:"measures,omitempty"`
	// Completeness is what the log's time column says about the period:
	// the first and last time in scope and the days without a row (nil,
	// and absent, when the draw read no time column).
	Completeness *chrono.Completeness `json:"completeness,omitempty"`
}

// LogInfo describes the prediction log a draw read.
type LogInfo struct {
	Path   string `json:"path"`
	SHA256 string `json:"sha256"`
	// ContentSHA256 is the SHA-256 of the log's decompressed bytes (equal
	// to SHA256 for a log that is not compressed), so a log compressed
	// again is known for the same log; empty in manifests from before it
	// was recorded, and for a draw inside a database.
	ContentSHA256 string `json:"content_sha256,omitempty"`
	Bytes         int64  `json:"bytes"`
	Rows          int64  `json:"rows"`
	Format        string `json:"format"`      // csv, tsv or jsonl
	Compression   string `json:"compression"` // none or gzip
}

// AllocationInfo records the allocation rule and its parameters.
type AllocationInfo struct {
	Rule string `json:"rule"` // proportional, neyman or equal
	// MinPerStratum is the minimum per stratum applied (0 when none was,
	// including a default minimum the sample had no room for).
	MinPerStratum int `json:"min_per_stratum"`
	Spare         int `json:"spare"`
	// NeymanSource names the anticipated-error file or band for neyman.
	NeymanSource string `json:"neyman_source,omitempty"`
	// Rounding is how proportional shares were rounded: "up" (every
	// stratum at least its share ⌈n·N_h/N⌉) or "largest-remainder"; empty
	// in manifests written before it was recorded (largest remainder).
	Rounding string `json:"rounding,omitempty"`
	// Note says what the allocation did to the inclusion weights N_h/n_h
	// (shares rounded up, strata raised to the minimum, strata left without
	// an item), in words; empty when the weights are equal.
	Note string `json:"note,omitempty"`
}

// StratumInfo is one stratum's line in the manifest.
type StratumInfo struct {
	Label      string  `json:"label"`
	Population int64   `json:"population"` // N_h
	Sample     int     `json:"sample"`     // n_h
	Spare      int     `json:"spare"`      // spares drawn
	Weight     float64 `json:"weight"`     // N_h / n_h (0 when n_h = 0)
	// Anticipated is p_h, the anticipated error used by neyman allocation
	// (0 under the other rules).
	Anticipated float64 `json:"anticipated,omitempty"`
}

// EngineInfo records a selection run inside a database engine.
type EngineInfo struct {
	Dialect     string `json:"dialect"` // postgres, duckdb or clickhouse
	Table       string `json:"table"`
	QuerySHA256 string `json:"query_sha256"`
	// CountsSHA256 and CountsQuerySHA256 are set for a draw made in two
	// steps (clickhouse): the SHA-256 of the counts query's result file,
	// from which the allocation was computed, and of the counts query.
	CountsSHA256      string `json:"counts_sha256,omitempty"`
	CountsQuerySHA256 string `json:"counts_query_sha256,omitempty"`
}

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
	data, err := inputfile.ReadFile(path, "manifest", inputfile.SmallLimit)
	if err != nil {
		return nil, nil, err
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

// AnticipatedRates are the anticipated error rates per stratum the draw
// recorded (its Neyman allocation's), in the order of Strata, or nil when
// it recorded none (a judgement then takes the plan's).
func (m *Manifest) AnticipatedRates() []float64 {
	var out []float64
	for _, s := range m.Strata {
		if s.Anticipated <= 0 {
			return nil
		}
		out = append(out, s.Anticipated)
	}
	return out
}
