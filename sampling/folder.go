package sampling

// Names of the files in a draw folder.
const (
	WorksheetFile = "worksheet.csv"
	LedgerFile    = "ledger.csv"
	ManifestFile  = "manifest.json"
	// WorksheetSecondFile is the second, independent worksheet written
	// for the items marked by `draw --double k`.
	WorksheetSecondFile = "worksheet-second.csv"
)

// ManifestFormat is the version of the manifest layout written by this code.
const ManifestFormat = 1

// Manifest is manifest.json: what a draw read, how it allocated and what it
// wrote. Keys and their order are stable; later steps and reviewers read
// them by name.
type Manifest struct {
	Format      int    `json:"format"`
	ToolVersion string `json:"tool_version"`
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
	// Bands are the --band definitions, e.g. "score=0.5,0.9".
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
	// Where lists the --where filters that define the scope ("COLUMN=V1,V2").
	Where []string `json:"where"`
	// Dedupe is "first" when repeated ids were allowed (first row kept),
	// else "". DuplicatesDropped counts the repeated rows dropped.
	Dedupe            string `json:"dedupe"`
	DuplicatesDropped int    `json:"duplicates_dropped"`
	// Double is k of --double k: the first k items in key order are also in
	// worksheet-second.csv.
	Double int `json:"double"`
	// LotSize is the number of rows in scope (after filters and dropped
	// repeats): the lot a finite-population plan judges. For a periodic
	// draw of a --population plan it is the period's lot size.
	LotSize int64 `json:"lot_size"`
}

// LogInfo describes the prediction log a draw read.
type LogInfo struct {
	Path        string `json:"path"`
	SHA256      string `json:"sha256"`
	Bytes       int64  `json:"bytes"`
	Rows        int64  `json:"rows"`
	Format      string `json:"format"`      // csv, tsv or jsonl
	Compression string `json:"compression"` // none or gzip
}

// AllocationInfo records the allocation rule and its parameters.
type AllocationInfo struct {
	Rule          string `json:"rule"` // proportional, neyman or equal
	MinPerStratum int    `json:"min_per_stratum"`
	Spare         int    `json:"spare"`
	// NeymanSource names the anticipated-error file or band for neyman.
	NeymanSource string `json:"neyman_source,omitempty"`
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

// LedgerRow is one row of ledger.csv, kept by the audit owner. Columns, in
// order: item, record_id, stratum, stratum_size, stratum_sample, weight,
// key, spare, double, then one column per candidate (named as the
// candidate) with its prediction.
type LedgerRow struct {
	Item          int      // 1-based position in the worksheet
	RecordID      string   // the log's id
	Stratum       string   // stratum label (values joined with "|")
	StratumSize   int64    // N_h
	StratumSample int      // n_h (spares not counted)
	Weight        float64  // N_h / n_h
	Key           string   // lowercase hex SHA-256 of "<seed>:<record id>"
	Spare         bool     // drawn as a spare
	Predictions   []string // one per plan candidate, in plan order
	// Double marks an item that also goes to worksheet-second.csv for an
	// independent second label (`draw --double k`).
	Double bool
}

// WorksheetRow is one row of worksheet.csv, what labelers get: item,
// record_id, the --show columns, label, note (and, once label quality is
// tracked, labeler). It never carries a prediction, score or stratum.
type WorksheetRow struct {
	Item     int
	RecordID string
	Show     []string
	Label    string
	Note     string
	Labeler  string
	// Line is the 1-based line in the file it was read from (0 if written).
	Line int
}
