//go:build !purego

#include "textflag.h"
#include "go_asm.h"

// kweightMinusTwo is the middle coefficient of the high-pass numerator.
DATA kweightMinusTwo<>+0(SB)/8, $-2.0
GLOBL kweightMinusTwo<>(SB), RODATA|NOPTR, $8

// func energyQuadAVX2(s *kweightQuad, a, b, c, d []float64) (ea, eb, ec, ed float64)
//
// Four channels in the four lanes of AVX2 registers, lane 0 from a … lane
// 3 from d, each computed exactly as Energy computes it, with fused
// multiply-adds (one rounding each, as math.FMA; VFNMADD231PD computes
// −(p·q) + r, which is fma(−p, q, r) bit for bit, the negation exact):
//
//	u = fma(−a1, u1, fma(−a2, u2, fma(b0, x, fma(b1, x1, b2·x2))))
//	v = fma(−c1, v1, fma(−c2, v2, u + fma(−2, u1, u2)))
//	e = fma(v, v, e)
//
// Registers: Y0 a1, Y1 c1, Y2 b0, Y3 b1, Y4 b2 (a2 and c2 are read from s),
// Y15 −2; state Y5 x1, Y6 x2, Y7 u1, Y8 u2, Y9 v1, Y10 v2; Y11 e;
// Y12–Y14 scratch. SI, DI, R8, R9 the inputs, DX s, BX index, CX length.
// The CPU must have FMA (bestKernels checks).
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
	VBROADCASTSD kweightMinusTwo<>(SB), Y15

	XORQ BX, BX
	CMPQ BX, CX
	JGE  done

loop:
	VMOVSD      (SI)(BX*8), X12
	VMOVHPD     (DI)(BX*8), X12, X12
	VMOVSD      (R8)(BX*8), X13
	VMOVHPD     (R9)(BX*8), X13, X13
	VINSERTF128 $1, X13, Y12, Y12 // Y12 = x

	// Shelf: Y13 = fma(−a1, u1, fma(−a2, u2, fma(b0, x, fma(b1, x1, b2·x2)))).
	VMULPD       Y4, Y6, Y13
	VFMADD231PD  Y3, Y5, Y13
	VFMADD231PD  Y2, Y12, Y13
	VFNMADD231PD kweightQuad_a2(DX), Y8, Y13
	VFNMADD231PD Y0, Y7, Y13 // Y13 = u
	VMOVAPD      Y5, Y6      // x2 = x1
	VMOVAPD      Y12, Y5     // x1 = x

	// High-pass: Y12 = fma(−c1, v1, fma(−c2, v2, u + fma(−2, u1, u2))).
	VFMADD231PD  Y15, Y7, Y8 // u2 is not needed after this
	VADDPD       Y8, Y13, Y12
	VMOVAPD      Y7, Y8      // u2 = u1
	VMOVAPD      Y13, Y7     // u1 = u
	VFNMADD231PD kweightQuad_c2(DX), Y10, Y12
	VFNMADD231PD Y1, Y9, Y12 // Y12 = v
	VMOVAPD      Y9, Y10     // v2 = v1
	VMOVAPD      Y12, Y9     // v1 = v

	VFMADD231PD Y12, Y12, Y11 // e = fma(v, v, e)

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

// func energyStagedAVX2(s *kweightStaged, a, b []float64) (e0, e1 float64)
//
// Two channels, both stages, in the four lanes of one AVX2 register: lanes
// 0 and 1 run the shelf of channels a and b on sample i, lanes 2 and 3 the
// high-pass of the same channels on sample i−4, whose input is the shelf
// output of lanes 0 and 1 four iterations earlier. Both stages are the
// same biquad form with fused multiply-adds (VFNMADD231PD computes
// −(p·q) + r, fma(−p, q, r) bit for bit), the high-pass with the
// numerator [1, −2, 1], for which the form is Energy's high-pass exactly
// (1·u2 = u2, so fma(−2, u1, 1·u2) is fma(−2, u1, u2), and
// fma(1, u, s) = u + s), so every lane computes exactly what Energy
// computes:
//
//	y = fma(−A1, y1, fma(−A2, y2, fma(B0, x, fma(B1, x1, B2·x2))))
//	e = fma(y, y, e)
//
// Why four samples apart: the loop-carried chains are the feedback steps,
// one fused multiply-add (4 cycles on the project's CPU) an iteration
// through y1 and two every two iterations through y2, and the path from a
// shelf output through the high-pass lanes, which are in the same
// register: the insert (3 cycles), fma(B0, x, …) and the two feedback
// steps, 15 cycles, plus one or two steps more through x1 and x2 (19 and
// 23 cycles, one and two iterations longer). Spread over four, five and
// six iterations these stay under 4 cycles an iteration; over three (the
// lag of the unfused kernel, whose iteration took 8 cycles) they made 5.
// The CPU must have FMA (bestKernels checks).
//
// The caller runs the shelf of samples 0…3 before and the high-pass of the
// last four samples after (energyPairStaged), so the loop covers samples
// 4 … len(a)−1 of the shelf; it returns Σ y² of lanes 2 and 3 (the
// high-pass outputs of samples 0 … len(a)−5), added in sample order from 0.
//
// Registers: Y0 B0, Y1 B1, Y2 B2, Y3 A1, Y4 A2; state Y5 x1, Y6 x2,
// Y7 y1, Y8 y2, Y13 and Y14 the shelf outputs of three and four samples
// ago (s.d[0], s.d[1]); Y9 e; Y10, Y11 scratch. SI, DI the inputs, DX s,
// BX index, CX length.
TEXT ·energyStagedAVX2(SB), NOSPLIT, $0-72
	MOVQ s+0(FP), DX
	MOVQ a_base+8(FP), SI
	MOVQ a_len+16(FP), CX
	MOVQ b_base+32(FP), DI

	VMOVUPD kweightStaged_b0(DX), Y0
	VMOVUPD kweightStaged_b1(DX), Y1
	VMOVUPD kweightStaged_b2(DX), Y2
	VMOVUPD kweightStaged_a1(DX), Y3
	VMOVUPD kweightStaged_a2(DX), Y4
	VMOVUPD kweightStaged_x1(DX), Y5
	VMOVUPD kweightStaged_x2(DX), Y6
	VMOVUPD kweightStaged_y1(DX), Y7
	VMOVUPD kweightStaged_y2(DX), Y8
	VMOVUPD kweightStaged_d(DX), Y13
	VMOVUPD kweightStaged_d+32(DX), Y14
	VXORPD  Y9, Y9, Y9

	MOVQ $4, BX

	// Twelve samples per iteration while twelve are left (loop12): the
	// histories rotate through registers instead of being moved (x, x1,
	// x2 through Y10, Y5, Y6, the new sample loaded into the register of
	// the x2 no longer needed; y1, y2 and the shelf outputs of three and
	// four samples ago through Y7, Y8, Y13, Y14, each new y written into
	// the register whose four-samples-ago value the insert has just
	// taken), and after twelve samples every value is back in the register
	// loop expects it in.
loop12:
	LEAQ 12(BX), AX
	CMPQ AX, CX
	JGT  tail
	VMOVSD       0(SI)(BX*8), X10
	VMOVHPD      0(DI)(BX*8), X10, X10
	VINSERTF128  $1, X14, Y10, Y10
	VMULPD       Y2, Y6, Y14
	VFMADD231PD  Y1, Y5, Y14
	VFMADD231PD  Y0, Y10, Y14
	VFNMADD231PD Y4, Y8, Y14
	VFNMADD231PD Y3, Y7, Y14
	VFMADD231PD  Y14, Y14, Y9
	VMOVSD       8(SI)(BX*8), X6
	VMOVHPD      8(DI)(BX*8), X6, X6
	VINSERTF128  $1, X13, Y6, Y6
	VMULPD       Y2, Y5, Y13
	VFMADD231PD  Y1, Y10, Y13
	VFMADD231PD  Y0, Y6, Y13
	VFNMADD231PD Y4, Y7, Y13
	VFNMADD231PD Y3, Y14, Y13
	VFMADD231PD  Y13, Y13, Y9
	VMOVSD       16(SI)(BX*8), X5
	VMOVHPD      16(DI)(BX*8), X5, X5
	VINSERTF128  $1, X8, Y5, Y5
	VMULPD       Y2, Y10, Y8
	VFMADD231PD  Y1, Y6, Y8
	VFMADD231PD  Y0, Y5, Y8
	VFNMADD231PD Y4, Y14, Y8
	VFNMADD231PD Y3, Y13, Y8
	VFMADD231PD  Y8, Y8, Y9
	VMOVSD       24(SI)(BX*8), X10
	VMOVHPD      24(DI)(BX*8), X10, X10
	VINSERTF128  $1, X7, Y10, Y10
	VMULPD       Y2, Y6, Y7
	VFMADD231PD  Y1, Y5, Y7
	VFMADD231PD  Y0, Y10, Y7
	VFNMADD231PD Y4, Y13, Y7
	VFNMADD231PD Y3, Y8, Y7
	VFMADD231PD  Y7, Y7, Y9
	VMOVSD       32(SI)(BX*8), X6
	VMOVHPD      32(DI)(BX*8), X6, X6
	VINSERTF128  $1, X14, Y6, Y6
	VMULPD       Y2, Y5, Y14
	VFMADD231PD  Y1, Y10, Y14
	VFMADD231PD  Y0, Y6, Y14
	VFNMADD231PD Y4, Y8, Y14
	VFNMADD231PD Y3, Y7, Y14
	VFMADD231PD  Y14, Y14, Y9
	VMOVSD       40(SI)(BX*8), X5
	VMOVHPD      40(DI)(BX*8), X5, X5
	VINSERTF128  $1, X13, Y5, Y5
	VMULPD       Y2, Y10, Y13
	VFMADD231PD  Y1, Y6, Y13
	VFMADD231PD  Y0, Y5, Y13
	VFNMADD231PD Y4, Y7, Y13
	VFNMADD231PD Y3, Y14, Y13
	VFMADD231PD  Y13, Y13, Y9
	VMOVSD       48(SI)(BX*8), X10
	VMOVHPD      48(DI)(BX*8), X10, X10
	VINSERTF128  $1, X8, Y10, Y10
	VMULPD       Y2, Y6, Y8
	VFMADD231PD  Y1, Y5, Y8
	VFMADD231PD  Y0, Y10, Y8
	VFNMADD231PD Y4, Y14, Y8
	VFNMADD231PD Y3, Y13, Y8
	VFMADD231PD  Y8, Y8, Y9
	VMOVSD       56(SI)(BX*8), X6
	VMOVHPD      56(DI)(BX*8), X6, X6
	VINSERTF128  $1, X7, Y6, Y6
	VMULPD       Y2, Y5, Y7
	VFMADD231PD  Y1, Y10, Y7
	VFMADD231PD  Y0, Y6, Y7
	VFNMADD231PD Y4, Y13, Y7
	VFNMADD231PD Y3, Y8, Y7
	VFMADD231PD  Y7, Y7, Y9
	VMOVSD       64(SI)(BX*8), X5
	VMOVHPD      64(DI)(BX*8), X5, X5
	VINSERTF128  $1, X14, Y5, Y5
	VMULPD       Y2, Y10, Y14
	VFMADD231PD  Y1, Y6, Y14
	VFMADD231PD  Y0, Y5, Y14
	VFNMADD231PD Y4, Y8, Y14
	VFNMADD231PD Y3, Y7, Y14
	VFMADD231PD  Y14, Y14, Y9
	VMOVSD       72(SI)(BX*8), X10
	VMOVHPD      72(DI)(BX*8), X10, X10
	VINSERTF128  $1, X13, Y10, Y10
	VMULPD       Y2, Y6, Y13
	VFMADD231PD  Y1, Y5, Y13
	VFMADD231PD  Y0, Y10, Y13
	VFNMADD231PD Y4, Y7, Y13
	VFNMADD231PD Y3, Y14, Y13
	VFMADD231PD  Y13, Y13, Y9
	VMOVSD       80(SI)(BX*8), X6
	VMOVHPD      80(DI)(BX*8), X6, X6
	VINSERTF128  $1, X8, Y6, Y6
	VMULPD       Y2, Y5, Y8
	VFMADD231PD  Y1, Y10, Y8
	VFMADD231PD  Y0, Y6, Y8
	VFNMADD231PD Y4, Y14, Y8
	VFNMADD231PD Y3, Y13, Y8
	VFMADD231PD  Y8, Y8, Y9
	VMOVSD       88(SI)(BX*8), X5
	VMOVHPD      88(DI)(BX*8), X5, X5
	VINSERTF128  $1, X7, Y5, Y5
	VMULPD       Y2, Y10, Y7
	VFMADD231PD  Y1, Y6, Y7
	VFMADD231PD  Y0, Y5, Y7
	VFNMADD231PD Y4, Y13, Y7
	VFNMADD231PD Y3, Y8, Y7
	VFMADD231PD  Y7, Y7, Y9
	ADDQ $12, BX
	JMP  loop12

tail:
	CMPQ BX, CX
	JGE  done

loop:
	VMOVSD      (SI)(BX*8), X10
	VMOVHPD     (DI)(BX*8), X10, X10
	VINSERTF128 $1, X14, Y10, Y10 // x: the new samples, then the shelf outputs of sample i−4

	VMULPD       Y2, Y6, Y11
	VFMADD231PD  Y1, Y5, Y11
	VFMADD231PD  Y0, Y10, Y11
	VFNMADD231PD Y4, Y8, Y11
	VFNMADD231PD Y3, Y7, Y11 // Y11 = y
	VMOVAPD      Y5, Y6      // x2 = x1
	VMOVAPD      Y10, Y5     // x1 = x
	VMOVAPD      Y13, Y14    // four samples ago = three samples ago
	VMOVAPD      Y8, Y13     // three samples ago = y2
	VMOVAPD      Y7, Y8      // y2 = y1
	VMOVAPD      Y11, Y7     // y1 = y

	VFMADD231PD Y11, Y11, Y9 // e = fma(y, y, e)

	INCQ BX
	CMPQ BX, CX
	JLT  loop

done:
	VMOVUPD      Y5, kweightStaged_x1(DX)
	VMOVUPD      Y6, kweightStaged_x2(DX)
	VMOVUPD      Y7, kweightStaged_y1(DX)
	VMOVUPD      Y8, kweightStaged_y2(DX)
	VMOVUPD      Y13, kweightStaged_d(DX)
	VMOVUPD      Y14, kweightStaged_d+32(DX)
	VEXTRACTF128 $1, Y9, X10
	VMOVSD       X10, e0+56(FP)
	VMOVHPD      X10, e1+64(FP)
	VZEROUPPER
	RET
