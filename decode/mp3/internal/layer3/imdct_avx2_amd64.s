//go:build !purego

#include "textflag.h"

// func imdctLongAVX2(in *[18]float64, m *[18][36]float64, out *[36]float64)
//
// out[i] = sum over k = 0..17 of in[k] * m[k][i] (see imdctLong), the 36
// outputs in Y0-Y8, four each; row k of m starts at byte 288k. Products
// are rounded before they are added (VMULPD, VADDPD: no fused
// multiply-add) and added in the order k = 0..17, as the Go loop does.
TEXT ·imdctLongAVX2(SB), NOSPLIT, $0-24
	MOVQ in+0(FP), SI
	MOVQ m+8(FP), DI
	MOVQ out+16(FP), DX
	VBROADCASTSD (SI), Y9
	VMULPD 0(DI), Y9, Y0
	VMULPD 32(DI), Y9, Y1
	VMULPD 64(DI), Y9, Y2
	VMULPD 96(DI), Y9, Y3
	VMULPD 128(DI), Y9, Y4
	VMULPD 160(DI), Y9, Y5
	VMULPD 192(DI), Y9, Y6
	VMULPD 224(DI), Y9, Y7
	VMULPD 256(DI), Y9, Y8
	MOVQ $17, CX
loop:
	ADDQ $8, SI
	ADDQ $288, DI
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
	VMULPD 256(DI), Y9, Y10
	VADDPD Y10, Y8, Y8
	DECQ CX
	JNZ loop
	VMOVUPD Y0, 0(DX)
	VMOVUPD Y1, 32(DX)
	VMOVUPD Y2, 64(DX)
	VMOVUPD Y3, 96(DX)
	VMOVUPD Y4, 128(DX)
	VMOVUPD Y5, 160(DX)
	VMOVUPD Y6, 192(DX)
	VMOVUPD Y7, 224(DX)
	VMOVUPD Y8, 256(DX)
	VZEROUPPER
	RET
