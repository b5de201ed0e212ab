//go:build !purego

#include "textflag.h"

// func synthSumAVX2(v *[16][64]float64, newest int, d *[512]float64, o *[32]float64)
//
// o[j] = sum over k = 0..15 of U_k[j] * D[32k + j] (see synthSum), the 32
// outputs in Y0-Y7, four each. Row k of U is block (newest + k) & 15 of v,
// its first half for even k and its second half for odd k; row k of D
// starts at byte 256k. Products are rounded before they are added
// (VMULPD, VADDPD: no fused multiply-add) and added in the order k = 0..15,
// as the Go loop does.
TEXT ·synthSumAVX2(SB), NOSPLIT, $0-32
	MOVQ v+0(FP), SI
	MOVQ newest+8(FP), AX
	MOVQ d+16(FP), DI
	MOVQ o+24(FP), DX
	// k = 0: the products start the sums.
	MOVQ AX, BX
	ANDQ $15, BX
	SHLQ $9, BX
	ADDQ SI, BX
	VMOVUPD 0(BX), Y0
	VMULPD 0(DI), Y0, Y0
	VMOVUPD 32(BX), Y1
	VMULPD 32(DI), Y1, Y1
	VMOVUPD 64(BX), Y2
	VMULPD 64(DI), Y2, Y2
	VMOVUPD 96(BX), Y3
	VMULPD 96(DI), Y3, Y3
	VMOVUPD 128(BX), Y4
	VMULPD 128(DI), Y4, Y4
	VMOVUPD 160(BX), Y5
	VMULPD 160(DI), Y5, Y5
	VMOVUPD 192(BX), Y6
	VMULPD 192(DI), Y6, Y6
	VMOVUPD 224(BX), Y7
	VMULPD 224(DI), Y7, Y7
	MOVQ $1, CX
loop:
	// BX = row k of U: block (newest + k) & 15, half k & 1.
	LEAQ (AX)(CX*1), BX
	ANDQ $15, BX
	SHLQ $9, BX
	ADDQ SI, BX
	MOVQ CX, R9
	ANDQ $1, R9
	SHLQ $8, R9
	ADDQ R9, BX
	// R10 = row k of D.
	MOVQ CX, R10
	SHLQ $8, R10
	ADDQ DI, R10
	VMOVUPD 0(BX), Y8
	VMULPD 0(R10), Y8, Y8
	VADDPD Y8, Y0, Y0
	VMOVUPD 32(BX), Y9
	VMULPD 32(R10), Y9, Y9
	VADDPD Y9, Y1, Y1
	VMOVUPD 64(BX), Y10
	VMULPD 64(R10), Y10, Y10
	VADDPD Y10, Y2, Y2
	VMOVUPD 96(BX), Y11
	VMULPD 96(R10), Y11, Y11
	VADDPD Y11, Y3, Y3
	VMOVUPD 128(BX), Y8
	VMULPD 128(R10), Y8, Y8
	VADDPD Y8, Y4, Y4
	VMOVUPD 160(BX), Y9
	VMULPD 160(R10), Y9, Y9
	VADDPD Y9, Y5, Y5
	VMOVUPD 192(BX), Y10
	VMULPD 192(R10), Y10, Y10
	VADDPD Y10, Y6, Y6
	VMOVUPD 224(BX), Y11
	VMULPD 224(R10), Y11, Y11
	VADDPD Y11, Y7, Y7
	INCQ CX
	CMPQ CX, $16
	JLT loop
	VMOVUPD Y0, 0(DX)
	VMOVUPD Y1, 32(DX)
	VMOVUPD Y2, 64(DX)
	VMOVUPD Y3, 96(DX)
	VMOVUPD Y4, 128(DX)
	VMOVUPD Y5, 160(DX)
	VMOVUPD Y6, 192(DX)
	VMOVUPD Y7, 224(DX)
	VZEROUPPER
	RET
