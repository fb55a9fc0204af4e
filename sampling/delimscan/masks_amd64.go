//go:build amd64 && !purego

package delimscan

import "golang.org/x/sys/cpu"

// masksAVX2 builds the masks of len(seps) whole 64-byte blocks with AVX2
// compares (masks_amd64.s) and reports whether the byte quote occurs.
//
//go:noescape
func masksAVX2(data *byte, sep, quote byte, seps, nls, quotes *uint64, blocks int) bool

// useAVX2: the processor has AVX2 and the assembly agrees with the
// portable code on a test text.
var useAVX2 = cpu.X86.HasAVX2 && selfCheck()

// selfCheck compares the assembly with the portable code on two blocks
// holding every byte value.
func selfCheck() bool {
	var data [256]byte
	for i := range data {
		data[i] = byte(i*73 + 11)
	}
	var as, al, aq, ps, pl, pq [4]uint64
	aSeen := masksAVX2(&data[0], ',', '"', &as[0], &al[0], &aq[0], 4)
	pSeen := masksPortable(data[:], ',', '"', ps[:], pl[:], pq[:])
	return as == ps && al == pl && aq == pq && aSeen == pSeen
}

func masks(data []byte, sep, quote byte, seps, nls, quotes []uint64) bool {
	if !useAVX2 || len(seps) == 0 {
		return masksPortable(data, sep, quote, seps, nls, quotes)
	}
	_ = data[64*len(seps)-1]
	_ = nls[len(seps)-1]
	_ = quotes[len(seps)-1]
	return masksAVX2(&data[0], sep, quote, &seps[0], &nls[0], &quotes[0], len(seps))
}

// Accelerated reports whether the masks are built with vector
// instructions.
func Accelerated() bool { return useAVX2 }
