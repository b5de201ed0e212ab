//go:build !purego

#include "textflag.h"

// func dct32AVX2(s *[32]float64, n int, c *[32]float64)
//
// c[m] = sum over k = 0..n-1 of s[k] * dctMatrix[k][m] (see dct32), the 32
// outputs in Y0-Y7, four each; row k of the matrix starts at byte 256k.
// Products are rounded before they are added (VMULPD, VADDPD: no fused
// multiply-add) and added in the order k = 0..n-1, as the Go loop does;
// n >= 1.
TEXT ·dct32AVX2(SB), NOSPLIT, $0-24
	MOVQ s+0(FP), SI
	MOVQ n+8(FP), CX
	MOVQ c+16(FP), DX
	LEAQ ·dctMatrix(SB), DI
	VBROADCASTSD (SI), Y9
	VMULPD 0(DI), Y9, Y0
	VMULPD 32(DI), Y9, Y1
	VMULPD 64(DI), Y9, Y2
	VMULPD 96(DI), Y9, Y3
	VMULPD 128(DI), Y9, Y4
	VMULPD 160(DI), Y9, Y5
	VMULPD 192(DI), Y9, Y6
	VMULPD 224(DI), Y9, Y7
	DECQ CX
	JZ done
loop:
	ADDQ $8, SI
	ADDQ $256, DI
	VBROADCASTSD (SI), Y9
	VMULPD 0(DI), Y9, Y10
	VADDPD Y10, Y0, Y0
	VMULPD 32(DI), Y9, Y11
	VADDPD Y11, Y1, Y1
	VMULPD 64(DI), Y9, Y12
	VADDPD Y12, Y2, Y2
	VMULPD 96(DI), Y9, Y13
	VADDPD Y13, Y3, Y3
	VMULPD 128(DI), Y9, Y10
	VADDPD Y10, Y4, Y4
	VMULPD 160(DI), Y9, Y11
	VADDPD Y11, Y5, Y5
	VMULPD 192(DI), Y9, Y12
	VADDPD Y12, Y6, Y6
	VMULPD 224(DI), Y9, Y13
	VADDPD Y13, Y7, Y7
	DECQ CX
	JNZ loop
done:
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
