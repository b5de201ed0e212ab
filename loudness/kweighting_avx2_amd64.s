//go:build !purego

#include "textflag.h"
#include "go_asm.h"

// func energyQuadAVX2(s *kweightQuad, a, b, c, d []float64) (ea, eb, ec, ed float64)
//
// energyPairSSE2 (kweighting_amd64.s) with four channels in the four lanes
// of AVX2 registers, lane 0 from a … lane 3 from d, each computed exactly
// as Energy computes it:
//
//	u = (b0·x + b1·x1 + b2·x2 − a2·u2) − a1·u1
//	v = (u − 2·u1 + u2 − c2·v2) − c1·v1
//	e += v·v
//
// Registers: Y0 a1, Y1 c1, Y2 b0, Y3 b1, Y4 b2 (a2 and c2 are read from s);
// state Y5 x1, Y6 x2, Y7 u1, Y8 u2, Y9 v1, Y10 v2; Y11 e; Y12–Y14 scratch.
// SI, DI, R8, R9 the inputs, DX s, BX index, CX length.
TEXT ·energyQuadAVX2(SB), NOSPLIT, $0-136
	MOVQ s+0(FP), DX
	MOVQ a_base+8(FP), SI
	MOVQ a_len+16(FP), CX
	MOVQ b_base+32(FP), DI
	MOVQ c_base+56(FP), R8
	MOVQ d_base+80(FP), R9

	VMOVUPD kweightQuad_a1(DX), Y0
	VMOVUPD kweightQuad_c1(DX), Y1
	VMOVUPD kweightQuad_b0(DX), Y2
	VMOVUPD kweightQuad_b1(DX), Y3
	VMOVUPD kweightQuad_b2(DX), Y4
	VMOVUPD kweightQuad_x1(DX), Y5
	VMOVUPD kweightQuad_x2(DX), Y6
	VMOVUPD kweightQuad_u1(DX), Y7
	VMOVUPD kweightQuad_u2(DX), Y8
	VMOVUPD kweightQuad_v1(DX), Y9
	VMOVUPD kweightQuad_v2(DX), Y10
	VXORPD  Y11, Y11, Y11

	XORQ BX, BX
	CMPQ BX, CX
	JGE  done

loop:
	VMOVSD      (SI)(BX*8), X12
	VMOVHPD     (DI)(BX*8), X12, X12
	VMOVSD      (R8)(BX*8), X13
	VMOVHPD     (R9)(BX*8), X13, X13
	VINSERTF128 $1, X13, Y12, Y12 // Y12 = x

	// Shelf: Y13 = ((b0·x + b1·x1) + b2·x2 − a2·u2) − a1·u1.
	VMULPD  Y2, Y12, Y13
	VMULPD  Y3, Y5, Y14
	VADDPD  Y14, Y13, Y13
	VMULPD  Y4, Y6, Y6    // x2 is not needed after this
	VADDPD  Y6, Y13, Y13
	VMOVAPD Y5, Y6        // x2 = x1
	VMOVAPD Y12, Y5       // x1 = x
	VMULPD  kweightQuad_a2(DX), Y8, Y14
	VSUBPD  Y14, Y13, Y13
	VMULPD  Y0, Y7, Y14
	VSUBPD  Y14, Y13, Y13 // Y13 = u

	// High-pass: Y12 = (((u − 2·u1) + u2) − c2·v2) − c1·v1.
	VADDPD  Y7, Y7, Y14   // 2·u1, exact
	VSUBPD  Y14, Y13, Y12
	VADDPD  Y8, Y12, Y12
	VMOVAPD Y7, Y8        // u2 = u1
	VMOVAPD Y13, Y7       // u1 = u
	VMULPD  kweightQuad_c2(DX), Y10, Y14
	VSUBPD  Y14, Y12, Y12
	VMULPD  Y1, Y9, Y14
	VSUBPD  Y14, Y12, Y12 // Y12 = v
	VMOVAPD Y9, Y10       // v2 = v1
	VMOVAPD Y12, Y9       // v1 = v

	VMULPD Y12, Y12, Y12
	VADDPD Y12, Y11, Y11  // e += v·v

	INCQ BX
	CMPQ BX, CX
	JLT  loop

done:
	VMOVUPD      Y5, kweightQuad_x1(DX)
	VMOVUPD      Y6, kweightQuad_x2(DX)
	VMOVUPD      Y7, kweightQuad_u1(DX)
	VMOVUPD      Y8, kweightQuad_u2(DX)
	VMOVUPD      Y9, kweightQuad_v1(DX)
	VMOVUPD      Y10, kweightQuad_v2(DX)
	VEXTRACTF128 $1, Y11, X12
	VMOVSD       X11, ea+104(FP)
	VMOVHPD      X11, eb+112(FP)
	VMOVSD       X12, ec+120(FP)
	VMOVHPD      X12, ed+128(FP)
	VZEROUPPER
	RET
