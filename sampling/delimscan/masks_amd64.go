//go:build amd64 && !purego

package delimscan

import "golang.org/x/sys/cpu"

// masksAVX2 builds the masks of len(seps) whole 64-byte blocks with AVX2
// compares (masks_amd64.s) and reports whether the byte watch occurs.
//
//go:noescape
func masksAVX2(data *byte, sep, watch byte, seps, nls *uint64, blocks int) bool

var useAVX2 = cpu.X86.HasAVX2

func masks(data []byte, sep, watch byte, seps, nls []uint64) bool {
	if !useAVX2 || len(seps) == 0 {
		return masksPortable(data, sep, watch, seps, nls)
	}
	_ = data[64*len(seps)-1]
	_ = nls[len(seps)-1]
	return masksAVX2(&data[0], sep, watch, &seps[0], &nls[0], len(seps))
}

// Accelerated reports whether the masks are built with vector
// instructions.
func Accelerated() bool { return useAVX2 }
