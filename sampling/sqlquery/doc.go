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
// A plan with measures draws in the same two steps in every dialect
// (Spec.TwoStep): its strata end with the candidates' predictions, and its
// design is sized again on the counted strata by
// sampling.AllocateMeasures, the file draw's own allocation, which no query
// can compute. For PostgreSQL and DuckDB the counts query is the one
// query's checks and counts, and the selection query the one query with
// the allocation written in as literals; the manifest gets the design's
// measures block, as a draw from a file does.
//
// Identifiers are always quoted and every string the user supplies reaches
// the query as a literal it cannot break out of, so a table or column name
// with quotes, backslashes, spaces or SQL keywords is safe.
//
// The package computes and never prints.
package sqlquery
