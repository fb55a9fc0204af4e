// Package sqlquery runs a probity draw inside a database engine. It emits
// one self-contained SQL query per dialect (PostgreSQL, DuckDB) that
// computes the selection keys, the stratum counts, the allocation and the
// selected rows exactly as the streaming draw of package sampling does, and
// it imports the query's result file back into the usual draw folder after
// checking every key against its id and seed, the allocation against the
// counts, and the result against the plan it claims to come from.
//
// ClickHouse (18.16, as Debian packages it) has neither window functions
// nor query parameters, so there the draw takes two queries: CountsQuery
// counts the strata, ReadCounts checks its result and allocates the sample
// in Go, SelectionQuery selects each stratum's rows with the smallest keys
// (on every shard of a Distributed table, then across shards), and
// ImportSelection checks that result against the counts file as well.
//
// Identifiers are always quoted and every string the user supplies reaches
// the query as a literal it cannot break out of, so a table or column name
// with quotes, backslashes, spaces or SQL keywords is safe.
//
// The package computes and never prints.
package sqlquery
