// Package sha256pair runs the SHA-256 compression function (FIPS 180-4
// §6.2.2) on two independent (state, block) pairs at once, or on one.
//
// A selection key is the SHA-256 of a short message, so a draw spends
// most of its hashing time in one or two compressions per row. On x86-64
// processors with the SHA extensions the two compressions run
// interleaved, which roughly doubles the throughput of one stream (a
// single stream waits on the latency of each round instruction); other
// processors use a portable Go implementation. Padding, the prefix
// midstate and the digest bytes are the caller's business: this package
// does only the compression.
package sha256pair

//go:generate go run gen.go
