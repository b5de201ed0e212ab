//go:build !purego

#include "textflag.h"
#include "go_asm.h"

// func energyPairSSE2(s *kweightLanes, a, b []float64) (ea, eb float64)
//
// One iteration is one sample of each channel, lane 0 from a, lane 1 from
// b, computed exactly as Energy computes it:
//
//	u = (b0·x + b1·x1 + b2·x2 − a2·u2) − a1·u1
//	v = (u − 2·u1 + u2 − c2·v2) − c1·v1
//	e += v·v
//
// Registers: X0 a1, X1 c1, X2 b0, X3 b1, X4 b2 (a2 and c2 are loaded from
// s, off the critical path); state X5 x1, X6 x2, X7 u1, X8 u2, X9 v1,
// X10 v2; X11 e; X12–X14 scratch. SI, DI the inputs, DX s, BX index, CX
// length.
TEXT ·energyPairSSE2(SB), NOSPLIT, $0-72
	MOVQ s+0(FP), DX
	MOVQ a_base+8(FP), SI
	MOVQ a_len+16(FP), CX
	MOVQ b_base+32(FP), DI

	MOVUPD kweightLanes_a1(DX), X0
	MOVUPD kweightLanes_c1(DX), X1
	MOVUPD kweightLanes_b0(DX), X2
	MOVUPD kweightLanes_b1(DX), X3
	MOVUPD kweightLanes_b2(DX), X4
	MOVUPD kweightLanes_x1(DX), X5
	MOVUPD kweightLanes_x2(DX), X6
	MOVUPD kweightLanes_u1(DX), X7
	MOVUPD kweightLanes_u2(DX), X8
	MOVUPD kweightLanes_v1(DX), X9
	MOVUPD kweightLanes_v2(DX), X10
	XORPD  X11, X11

	XORQ BX, BX
	CMPQ BX, CX
	JGE  done

loop:
	MOVSD  (SI)(BX*8), X12
	MOVHPD (DI)(BX*8), X12 // X12 = x

	// Shelf: X13 = ((b0·x + b1·x1) + b2·x2 − a2·u2) − a1·u1.
	MOVAPD X12, X13
	MULPD  X2, X13
	MOVAPD X5, X14
	MULPD  X3, X14
	ADDPD  X14, X13
	MULPD  X4, X6  // x2 is not needed after this
	ADDPD  X6, X13
	MOVAPD X5, X6  // x2 = x1
	MOVAPD X12, X5 // x1 = x
	MOVUPD kweightLanes_a2(DX), X14
	MULPD  X8, X14
	SUBPD  X14, X13
	MOVAPD X7, X14
	MULPD  X0, X14
	SUBPD  X14, X13 // X13 = u

	// High-pass: X12 = (((u − 2·u1) + u2) − c2·v2) − c1·v1.
	MOVAPD X7, X14
	ADDPD  X7, X14 // 2·u1, exact
	MOVAPD X13, X12
	SUBPD  X14, X12
	ADDPD  X8, X12
	MOVAPD X7, X8  // u2 = u1
	MOVAPD X13, X7 // u1 = u
	MOVUPD kweightLanes_c2(DX), X14
	MULPD  X10, X14
	SUBPD  X14, X12
	MOVAPD X9, X14
	MULPD  X1, X14
	SUBPD  X14, X12 // X12 = v
	MOVAPD X9, X10  // v2 = v1
	MOVAPD X12, X9  // v1 = v

	MULPD X12, X12
	ADDPD X12, X11 // e += v·v

	INCQ BX
	CMPQ BX, CX
	JLT  loop

done:
	MOVUPD X5, kweightLanes_x1(DX)
	MOVUPD X6, kweightLanes_x2(DX)
	MOVUPD X7, kweightLanes_u1(DX)
	MOVUPD X8, kweightLanes_u2(DX)
	MOVUPD X9, kweightLanes_v1(DX)
	MOVUPD X10, kweightLanes_v2(DX)
	MOVSD  X11, ea+56(FP)
	MOVHPD X11, eb+64(FP)
	RET
