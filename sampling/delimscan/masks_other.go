//go:build !amd64 || purego

package delimscan

func masks(data []byte, sep, quote byte, seps, nls, quotes []uint64) bool {
	return masksPortable(data, sep, quote, seps, nls, quotes)
}

// Accelerated reports whether the masks are built with vector
// instructions.
func Accelerated() bool { return false }
