//go:build !noasm && !gccgo && !safe

#include "textflag.h"

// func hpBinsAVX2(x *[256]float64, tw *float64, groups int, re, im *[128]float64)
//
// The DFT bins of hpBinsGo, eight a group: for each j in order, x[j] times
// the group's eight cosines (two 256-bit registers) added to the real
// parts, and x[j] times its eight sines subtracted from the imaginary parts
// (VMULPD, then VADDPD or VSUBPD with the running sum as the first operand:
// no fused multiply-add), which is what hpBinsGo does for each bin, so each
// bin gets the same bits (TestHighPassBinsExact runs both). Groups go two
// at a time (eight running sums in registers), the last one alone if their
// count is odd. tw holds, for each group and each j, the group's 8 cosines
// then its 8 sines (hpTwiddles: 128 bytes per j, 32 KiB per group). The
// bins past kMax in the last group are computed and not used.
//
// Measured as hpBinsGo (BenchmarkBlockChecks, 512 Hz: 65 bins, 9 groups):
// 2.61 ns a sample against 3.40 with hpBinsGo, the rest of the checks
// unchanged.
TEXT ·hpBinsAVX2(SB), NOSPLIT, $0
	MOVQ x+0(FP), SI
	MOVQ tw+8(FP), R8
	MOVQ groups+16(FP), CX
	MOVQ re+24(FP), R10
	MOVQ im+32(FP), R11

pair:
	CMPQ CX, $2
	JL   single
	LEAQ 32768(R8), R9 // the second group's table
	VXORPD Y0, Y0, Y0 // first group: real parts of bins 1-4, 5-8 (of the group)
	VXORPD Y1, Y1, Y1
	VXORPD Y2, Y2, Y2 // imaginary parts
	VXORPD Y3, Y3, Y3
	VXORPD Y4, Y4, Y4 // second group: real parts
	VXORPD Y5, Y5, Y5
	VXORPD Y6, Y6, Y6 // imaginary parts
	VXORPD Y7, Y7, Y7
	XORQ   DX, DX     // j = 0

pairloop:
	VBROADCASTSD (SI)(DX*8), Y8 // x[j] in every lane
	VMULPD       (R8), Y8, Y9
	VADDPD       Y9, Y0, Y0
	VMULPD       32(R8), Y8, Y10
	VADDPD       Y10, Y1, Y1
	VMULPD       64(R8), Y8, Y11
	VSUBPD       Y11, Y2, Y2
	VMULPD       96(R8), Y8, Y12
	VSUBPD       Y12, Y3, Y3
	VMULPD       (R9), Y8, Y13
	VADDPD       Y13, Y4, Y4
	VMULPD       32(R9), Y8, Y14
	VADDPD       Y14, Y5, Y5
	VMULPD       64(R9), Y8, Y15
	VSUBPD       Y15, Y6, Y6
	VMULPD       96(R9), Y8, Y9
	VSUBPD       Y9, Y7, Y7
	ADDQ         $128, R8
	ADDQ         $128, R9
	INCQ         DX
	CMPQ         DX, $256
	JL           pairloop

	VMOVUPD Y0, (R10)
	VMOVUPD Y1, 32(R10)
	VMOVUPD Y4, 64(R10)
	VMOVUPD Y5, 96(R10)
	VMOVUPD Y2, (R11)
	VMOVUPD Y3, 32(R11)
	VMOVUPD Y6, 64(R11)
	VMOVUPD Y7, 96(R11)
	ADDQ    $128, R10
	ADDQ    $128, R11
	MOVQ    R9, R8 // the next pair's table
	SUBQ    $2, CX
	JMP     pair

single:
	CMPQ CX, $1
	JL   done
	VXORPD Y0, Y0, Y0
	VXORPD Y1, Y1, Y1
	VXORPD Y2, Y2, Y2
	VXORPD Y3, Y3, Y3
	XORQ   DX, DX

singleloop:
	VBROADCASTSD (SI)(DX*8), Y8
	VMULPD       (R8), Y8, Y9
	VADDPD       Y9, Y0, Y0
	VMULPD       32(R8), Y8, Y10
	VADDPD       Y10, Y1, Y1
	VMULPD       64(R8), Y8, Y11
	VSUBPD       Y11, Y2, Y2
	VMULPD       96(R8), Y8, Y12
	VSUBPD       Y12, Y3, Y3
	ADDQ         $128, R8
	INCQ         DX
	CMPQ         DX, $256
	JL           singleloop

	VMOVUPD Y0, (R10)
	VMOVUPD Y1, 32(R10)
	VMOVUPD Y2, (R11)
	VMOVUPD Y3, 32(R11)

done:
	VZEROUPPER
	RET
