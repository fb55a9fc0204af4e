//go:build !amd64 || purego

package delimscan

func masks(data []byte, sep, watch byte, seps, nls []uint64) bool {
	return masksPortable(data, sep, watch, seps, nls)
}

// Accelerated reports whether the masks are built with vector
// instructions.
func Accelerated() bool { return false }
