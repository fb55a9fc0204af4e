//go:build !amd64 || purego

package delimscan

func masks(data []byte, sep byte, seps, nls []uint64) { masksPortable(data, sep, seps, nls) }

// Accelerated reports whether the masks are built with vector
// instructions.
func Accelerated() bool { return false }
