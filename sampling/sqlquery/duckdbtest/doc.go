// Package duckdbtest runs probity's DuckDB drawing query in a real DuckDB
// (through its Go driver, which ships the engine inside the module) and
// checks it against the draw from a file. It is a module of its own so
// that the probity binary never needs cgo; run its tests with
// `cd sampling/sqlquery/duckdbtest && go test ./...`.
package duckdbtest
