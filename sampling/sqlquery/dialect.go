package sqlquery

import (
	"fmt"
	"strings"
)

// Dialect names the SQL engine a query is written for.
type Dialect string

// The supported dialects.
const (
	Postgres Dialect = "postgres"
	DuckDB   Dialect = "duckdb"
	// ClickHouse draws in two steps (see CountsQuery and SelectionQuery):
	// the versions this supports have neither window functions nor query
	// parameters, so the allocation is computed by probity between a
	// query for the stratum counts and one for the selected rows.
	ClickHouse Dialect = "clickhouse"
)

// Dialects lists the supported dialects in the order help texts show them.
var Dialects = []Dialect{Postgres, DuckDB, ClickHouse}

// TwoStep reports whether a draw in this dialect runs as two queries (the
// stratum counts, then the selection) rather than one.
func (d Dialect) TwoStep() bool { return d == ClickHouse }

// ParseDialect returns the dialect named s ("postgres", "duckdb" or
// "clickhouse").
func ParseDialect(s string) (Dialect, error) {
	for _, d := range Dialects {
		if s == string(d) {
			return d, nil
		}
	}
	names := make([]string, len(Dialects))
	for i, d := range Dialects {
		names[i] = string(d)
	}
	return "", fmt.Errorf("unknown SQL dialect %q (supported: %s)", s, strings.Join(names, ", "))
}

// maxIdentBytes is the longest identifier the dialect keeps whole; a longer
// one would be silently truncated (PostgreSQL's NAMEDATALEN − 1), so it is
// refused rather than risk naming another column. 0 means no limit.
func (d Dialect) maxIdentBytes() int {
	if d == Postgres {
		return 63
	}
	return 0
}
