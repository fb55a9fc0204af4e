//go:build amd64 && !purego

package sha256pair

import "golang.org/x/sys/cpu"

// compress2 is the interleaved SHA-NI compression in compress2_amd64.s.
//
//go:noescape
func compress2(sa, sb *[8]uint32, ba, bb *[64]byte)

// compress1 is the same compression for one state and block.
//
//go:noescape
func compress1(s *[8]uint32, blk *[64]byte)

// cpuid returns the registers of CPUID leaf eax, subleaf ecx.
func cpuid(eax, ecx uint32) (a, b, c, d uint32)

// useAsm: the processor has the SHA extensions (CPUID leaf 7, EBX bit
// 29), SSSE3 (PSHUFB) and SSE4.1 (PBLENDW), and the assembly agrees with
// the portable code on a test vector.
var useAsm = hasSHANI() && cpu.X86.HasSSSE3 && cpu.X86.HasSSE41 && selfCheck()

func hasSHANI() bool {
	if max, _, _, _ := cpuid(0, 0); max < 7 {
		return false
	}
	_, b, _, _ := cpuid(7, 0)
	return b&(1<<29) != 0
}

// selfCheck compares the assembly with the portable code on two blocks.
func selfCheck() bool {
	var ba, bb [64]byte
	for i := range ba {
		ba[i], bb[i] = byte(i*7+1), byte(255-i*3)
	}
	sa, sb := Init, Init
	sb[3] ^= 0x5a5a
	ra, rb, s1 := sa, sb, sa
	compress2(&sa, &sb, &ba, &bb)
	compress1(&s1, &ba)
	Compress(&ra, &ba)
	Compress(&rb, &bb)
	return sa == ra && sb == rb && s1 == ra
}
