// Package sqlquery runs a probity draw inside a database engine. It emits
// one self-contained SQL query per dialect (PostgreSQL, DuckDB) that
// computes the selection keys, the stratum counts, the allocation and the
// selected rows exactly as the streaming draw of package sampling does, and
// it imports the query's result file back into the usual draw folder after
// checking every key against its id and seed, the allocation against the
// counts, and the result against the plan it claims to come from.
//
// Identifiers are always double-quoted (with "" doubling) and every string
// the user supplies reaches the query as a literal it cannot break out of,
// so a table or column name with quotes, spaces or SQL keywords is safe.
//
// The package computes and never prints.
package sqlquery
