//go:build amd64 && !purego

#include "textflag.h"

// func masksAVX2(data *byte, sep, quote byte, seps, nls, quotes *uint64, blocks int) bool
//
// For each 64-byte block: compare its two 32-byte halves with the
// separator, '\n' and the quote broadcast to every byte; VPMOVMSKB gives
// one bit per byte, byte 0 in bit 0; the halves are joined into one word.
// The quote words are ORed into R12 for the result.
TEXT ·masksAVX2(SB), NOSPLIT, $0-49
	MOVQ data+0(FP), SI
	MOVBLZX sep+8(FP), AX
	MOVBLZX quote+9(FP), BX
	MOVQ seps+16(FP), DI
	MOVQ nls+24(FP), R8
	MOVQ quotes+32(FP), R10
	MOVQ blocks+40(FP), CX
	MOVQ AX, X0
	VPBROADCASTB X0, Y0
	MOVQ $0x0a, AX
	MOVQ AX, X1
	VPBROADCASTB X1, Y1
	MOVQ BX, X8
	VPBROADCASTB X8, Y8
	XORQ R12, R12

loop:
	VMOVDQU 0(SI), Y2
	VMOVDQU 32(SI), Y3
	VPCMPEQB Y0, Y2, Y4
	VPCMPEQB Y0, Y3, Y5
	VPCMPEQB Y1, Y2, Y6
	VPCMPEQB Y1, Y3, Y7
	VPCMPEQB Y8, Y2, Y10
	VPCMPEQB Y8, Y3, Y11
	VPMOVMSKB Y4, AX
	VPMOVMSKB Y5, BX
	VPMOVMSKB Y6, DX
	VPMOVMSKB Y7, R9
	VPMOVMSKB Y10, R11
	VPMOVMSKB Y11, R13
	SHLQ $32, BX
	ORQ BX, AX
	SHLQ $32, R9
	ORQ R9, DX
	SHLQ $32, R13
	ORQ R13, R11
	MOVQ AX, 0(DI)
	MOVQ DX, 0(R8)
	MOVQ R11, 0(R10)
	ORQ R11, R12
	ADDQ $64, SI
	ADDQ $8, DI
	ADDQ $8, R8
	ADDQ $8, R10
	DECQ CX
	JNZ loop
	TESTQ R12, R12
	SETNE ret+48(FP)
	VZEROUPPER
	RET
