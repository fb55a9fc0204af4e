//go:build amd64 && !purego

package delimscan

import "golang.org/x/sys/cpu"

// masksAVX2 builds the masks of len(seps) whole 64-byte blocks with AVX2
// compares (masks_amd64.s).
//
//go:noescape
func masksAVX2(data *byte, sep byte, seps, nls *uint64, blocks int)

var useAVX2 = cpu.X86.HasAVX2

func masks(data []byte, sep byte, seps, nls []uint64) {
	if !useAVX2 || len(seps) == 0 {
		masksPortable(data, sep, seps, nls)
		return
	}
	_ = data[64*len(seps)-1]
	_ = nls[len(seps)-1]
	masksAVX2(&data[0], sep, &seps[0], &nls[0], len(seps))
}

// Accelerated reports whether the masks are built with vector
// instructions.
func Accelerated() bool { return useAVX2 }
