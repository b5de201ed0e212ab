//go:build !purego

#include "textflag.h"

// func matrixAVX2(s *[32]float64, n int, v *[64]float64)
//
// The synthesis matrixing (see matrixGo): the DCT-II outputs C[m] =
// sum over k = 0..min(n,16)-1 of (s[k] + s[31-k]) * dctMatrix[k][m] for even
// m and (s[k] - s[31-k]) * dctMatrix[k][m] for odd m (see dct32) in Y0-Y7,
// four each (row k of the matrix starts at byte 256k; each k blends the sum
// into the even lanes and the difference into the odd ones; products
// rounded before they are added, VMULPD then VADDPD, in the order of k, as
// the Go loop does; n >= 1), then stored as V: V[0..15] = C[16..31],
// V[16] = 0, V[17+k] = -C[31-k] (k = 0..30) and V[48..63] = -C[0..15].
// Negation flips the sign bit, as Go's unary minus does.
TEXT ·matrixAVX2(SB), NOSPLIT, $0-24
	MOVQ s+0(FP), SI
	MOVQ n+8(FP), CX
	MOVQ v+16(FP), DX
	CMPQ CX, $16
	JLE counted
	MOVQ $16, CX
counted:
	LEAQ ·dctMatrix(SB), DI
	LEAQ 248(SI), R8 // &s[31]
	// Y13 = s[k] + s[31-k] in even lanes, s[k] - s[31-k] in odd lanes.
	VBROADCASTSD (SI), Y8
	VBROADCASTSD (R8), Y9
	VADDPD Y9, Y8, Y10
	VSUBPD Y9, Y8, Y11
	VBLENDPD $0x0a, Y11, Y10, Y13
	VMULPD 0(DI), Y13, Y0
	VMULPD 32(DI), Y13, Y1
	VMULPD 64(DI), Y13, Y2
	VMULPD 96(DI), Y13, Y3
	VMULPD 128(DI), Y13, Y4
	VMULPD 160(DI), Y13, Y5
	VMULPD 192(DI), Y13, Y6
	VMULPD 224(DI), Y13, Y7
	DECQ CX
	JZ done
loop:
	ADDQ $8, SI
	SUBQ $8, R8
	ADDQ $256, DI
	VBROADCASTSD (SI), Y8
	VBROADCASTSD (R8), Y9
	VADDPD Y9, Y8, Y10
	VSUBPD Y9, Y8, Y11
	VBLENDPD $0x0a, Y11, Y10, Y13
	VMULPD 0(DI), Y13, Y8
	VADDPD Y8, Y0, Y0
	VMULPD 32(DI), Y13, Y9
	VADDPD Y9, Y1, Y1
	VMULPD 64(DI), Y13, Y10
	VADDPD Y10, Y2, Y2
	VMULPD 96(DI), Y13, Y11
	VADDPD Y11, Y3, Y3
	VMULPD 128(DI), Y13, Y8
	VADDPD Y8, Y4, Y4
	VMULPD 160(DI), Y13, Y9
	VADDPD Y9, Y5, Y5
	VMULPD 192(DI), Y13, Y10
	VADDPD Y10, Y6, Y6
	VMULPD 224(DI), Y13, Y11
	VADDPD Y11, Y7, Y7
	DECQ CX
	JNZ loop
done:
	// Y15 = the sign bit in each lane.
	VPCMPEQQ Y15, Y15, Y15
	VPSLLQ $63, Y15, Y15
	// V[0..15] = C[16..31].
	VMOVUPD Y4, 0(DX)
	VMOVUPD Y5, 32(DX)
	VMOVUPD Y6, 64(DX)
	VMOVUPD Y7, 96(DX)
	MOVQ $0, 128(DX) // V[16]
	// V[17+4m .. 20+4m] = -(C[31-4m], C[30-4m], C[29-4m], C[28-4m]), m = 0..7;
	// m = 7 writes V[48] = -C[0], which the next stores write again.
	VPERMPD $0x1b, Y7, Y9
	VXORPD Y15, Y9, Y9
	VMOVUPD Y9, 136(DX)
	VPERMPD $0x1b, Y6, Y9
	VXORPD Y15, Y9, Y9
	VMOVUPD Y9, 168(DX)
	VPERMPD $0x1b, Y5, Y9
	VXORPD Y15, Y9, Y9
	VMOVUPD Y9, 200(DX)
	VPERMPD $0x1b, Y4, Y9
	VXORPD Y15, Y9, Y9
	VMOVUPD Y9, 232(DX)
	VPERMPD $0x1b, Y3, Y9
	VXORPD Y15, Y9, Y9
	VMOVUPD Y9, 264(DX)
	VPERMPD $0x1b, Y2, Y9
	VXORPD Y15, Y9, Y9
	VMOVUPD Y9, 296(DX)
	VPERMPD $0x1b, Y1, Y9
	VXORPD Y15, Y9, Y9
	VMOVUPD Y9, 328(DX)
	VPERMPD $0x1b, Y0, Y9
	VXORPD Y15, Y9, Y9
	VMOVUPD Y9, 360(DX)
	// V[48..63] = -C[0..15].
	VXORPD Y15, Y0, Y0
	VMOVUPD Y0, 384(DX)
	VXORPD Y15, Y1, Y1
	VMOVUPD Y1, 416(DX)
	VXORPD Y15, Y2, Y2
	VMOVUPD Y2, 448(DX)
	VXORPD Y15, Y3, Y3
	VMOVUPD Y3, 480(DX)
	VZEROUPPER
	RET
