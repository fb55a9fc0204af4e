//go:build !amd64 || purego

package sha256pair

// useAsm is false where there is no assembly: Compress2 runs Compress
// twice.
const useAsm = false

func compress2(sa, sb *[8]uint32, ba, bb *[64]byte) {
	Compress(sa, ba)
	Compress(sb, bb)
}

func compress1(s *[8]uint32, blk *[64]byte) { Compress(s, blk) }
