package sqlquery

import (
	"bytes"
	"encoding/json"
	"errors"
	"fmt"

	"probity/plan"
	"probity/sampling"
)

// QueryFormat is the version of the query layout and of its result file.
// A result made by a query of another format is refused, because the
// query's SHA-256 recorded in the manifest could not be reproduced.
const QueryFormat = 1

// ErrSpec is wrapped by every error about a draw specification that
// cannot be turned into a query.
var ErrSpec = errors.New("invalid SQL draw")

// Spec is everything a query depends on: the plan's identity and seed, the
// table and its columns, the strata and the allocation. The query is a
// pure function of its Spec, and the Spec travels inside the query (as a
// literal) into the first row of the result, so the result file names the
// plan, seed and settings it was made for and the importer can rebuild the
// very same query to record its SHA-256.
type Spec struct {
	// Format is QueryFormat.
	Format int `json:"format"`
	// ToolVersion is the probity version that wrote the query.
	ToolVersion string `json:"tool_version"`
	// Dialect is the engine the query is written for.
	Dialect Dialect `json:"dialect"`
	// PlanFingerprint is the SHA-256 of the plan file's bytes.
	PlanFingerprint string `json:"plan_fingerprint"`
	// Seed is the plan's seed; Period the --period label (or empty);
	// SelectionSeed the seed the keys are made with (the period seed for
	// a periodic draw, else Seed).
	Seed          string `json:"seed"`
	Period        string `json:"period"`
	SelectionSeed string `json:"selection_seed"`
	// Table is the table reference as given to --table (see
	// ParseTableName).
	Table string `json:"table"`
	// IDColumn, Strata and Show are the log columns, exactly as for a
	// draw from a file; Bands and Where are the --band and --where
	// definitions as sampling.Band.String and sampling.Filter.String write
	// them ("score=0.5,0.9", "channel=web,app").
	IDColumn string   `json:"id_column"`
	Strata   []string `json:"strata"`
	Bands    []string `json:"bands"`
	Where    []string `json:"where"`
	Show     []string `json:"show"`
	// Candidates are the plan's candidates, in plan order (their columns
	// are carried into the result for the ledger's predictions).
	Candidates []plan.Candidate `json:"-"`
	// SampleSize is the plan's n (see SampleSize).
	SampleSize int `json:"sample_size"`
	// Allocation is the rule: "proportional" or "equal", or
	// sampling.Measures for a plan with measures (the strata and bands
	// then end with the plan's prediction strata, as
	// sampling.AddPredictionStrata adds them).
	Allocation    string `json:"allocation"`
	MinPerStratum int    `json:"min_per_stratum"`
	Spare         int    `json:"spare"`
	// Rounding of proportional shares: sampling.RoundUp or
	// sampling.RoundLargestRemainder ("" is the latter).
	Rounding string `json:"rounding,omitempty"`
	// Double is --double k: the first k sample items get a second label.
	Double int `json:"double"`
}

// SampleSize is the sample a draw of p allocates, as the draw from a file
// takes it: the plan's n, or for a plan with measures the total of its
// planned design (the design is sized again on the counted strata).
func SampleSize(p *plan.File) int {
	if p.Measures != nil {
		return p.Measures.Design.Total
	}
	return p.Rule.SampleSize
}

// TwoStep reports whether the draw runs as two queries, the stratum
// counts and then the selection: always in ClickHouse, and in every
// dialect for a plan with measures, whose design probity sizes on the
// counted strata (sampling.AllocateMeasures), which no query can.
func (s *Spec) TwoStep() bool {
	return s.Dialect.TwoStep() || s.Allocation == sampling.Measures
}

// valueColumns is what the result carries besides keys and strata:
// the distinct log columns the candidates read, in plan order, then the
// --show columns. Each is one "value_i" column of the result.
func (s *Spec) valueColumns() []string {
	var cols []string
	seen := map[string]bool{}
	add := func(c string) {
		if !seen[c] {
			seen[c] = true
			cols = append(cols, c)
		}
	}
	for _, c := range s.Candidates {
		for _, col := range c.Columns() {
			add(col)
		}
	}
	for _, c := range s.Show {
		add(c)
	}
	return cols
}

// specJSON is the Spec as it appears in the query and the result: the
// fields above plus the value columns, so the result file says which log
// column each value_i column holds.
type specJSON struct {
	Spec
	Values []string `json:"values"`
	// CountsSHA256 is set in the description a ClickHouse selection query
	// carries: the SHA-256 of the counts file it was made from.
	CountsSHA256 string `json:"counts_sha256,omitempty"`
}

// MarshalDetail returns the canonical JSON of the Spec that the query
// carries: compact, keys in struct order, no HTML escaping.
func (s *Spec) MarshalDetail() ([]byte, error) {
	return s.marshalDetail("")
}

// marshalDetail is MarshalDetail with the counts file's SHA-256 (for a
// ClickHouse selection query; "" otherwise).
func (s *Spec) marshalDetail(countsSHA256 string) ([]byte, error) {
	var buf bytes.Buffer
	enc := json.NewEncoder(&buf)
	enc.SetEscapeHTML(false)
	v := specJSON{Spec: *s, Values: s.valueColumns(), CountsSHA256: countsSHA256}
	if v.Strata == nil {
		v.Strata = []string{}
	}
	if v.Bands == nil {
		v.Bands = []string{}
	}
	if v.Where == nil {
		v.Where = []string{}
	}
	if v.Show == nil {
		v.Show = []string{}
	}
	if err := enc.Encode(v); err != nil {
		return nil, err
	}
	return bytes.TrimSuffix(buf.Bytes(), []byte("\n")), nil
}

// parseDetail decodes the JSON a result's draw row carries. Candidates are
// not in it; the caller takes them from the plan.
func parseDetail(data string) (*specJSON, error) {
	dec := json.NewDecoder(bytes.NewReader([]byte(data)))
	dec.DisallowUnknownFields()
	var v specJSON
	if err := dec.Decode(&v); err != nil {
		return nil, fmt.Errorf("the draw description is not valid: %v", err)
	}
	return &v, nil
}
