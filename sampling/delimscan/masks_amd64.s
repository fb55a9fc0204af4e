//go:build amd64 && !purego

#include "textflag.h"

// func masksAVX2(data *byte, sep, watch byte, seps, nls *uint64, blocks int) bool
//
// For each 64-byte block: compare its two 32-byte halves with the
// separator and with '\n' broadcast to every byte; VPMOVMSKB gives one
// bit per byte, byte 0 in bit 0; the halves are joined into one word.
// Compares with watch are ORed into Y9, tested once at the end.
TEXT ·masksAVX2(SB), NOSPLIT, $0-41
	MOVQ data+0(FP), SI
	MOVBLZX sep+8(FP), AX
	MOVBLZX watch+9(FP), BX
	MOVQ seps+16(FP), DI
	MOVQ nls+24(FP), R8
	MOVQ blocks+32(FP), CX
	MOVQ AX, X0
	VPBROADCASTB X0, Y0
	MOVQ $0x0a, AX
	MOVQ AX, X1
	VPBROADCASTB X1, Y1
	MOVQ BX, X8
	VPBROADCASTB X8, Y8
	VPXOR Y9, Y9, Y9

loop:
	VMOVDQU 0(SI), Y2
	VMOVDQU 32(SI), Y3
	VPCMPEQB Y0, Y2, Y4
	VPCMPEQB Y0, Y3, Y5
	VPCMPEQB Y1, Y2, Y6
	VPCMPEQB Y1, Y3, Y7
	VPCMPEQB Y8, Y2, Y10
	VPCMPEQB Y8, Y3, Y11
	VPOR Y10, Y9, Y9
	VPOR Y11, Y9, Y9
	VPMOVMSKB Y4, AX
	VPMOVMSKB Y5, BX
	VPMOVMSKB Y6, DX
	VPMOVMSKB Y7, R9
	SHLQ $32, BX
	ORQ BX, AX
	SHLQ $32, R9
	ORQ R9, DX
	MOVQ AX, 0(DI)
	MOVQ DX, 0(R8)
	ADDQ $64, SI
	ADDQ $8, DI
	ADDQ $8, R8
	DECQ CX
	JNZ loop
	VPTEST Y9, Y9
	SETNE ret+40(FP)
	VZEROUPPER
	RET
