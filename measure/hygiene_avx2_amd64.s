//go:build !purego

#include "textflag.h"

// The hygiene probes' AVX2 kernels (see hygiene_kernel.go). Each running
// sum lives in its own lane and takes one addition per frame, in frame
// order, exactly as the Go loop adds it; products are rounded before they
// are added (no FMA). The full-scale test compares the bits of |x| as
// integers, which puts NaN above every finite value.

// Offsets in frameState (TestFrameStateLayout checks them).
#define ST_SUMS 0
#define ST_PAIR 64
#define ST_GAINS 112
#define ST_CHANNELS 240
#define ST_LEFT 248
#define ST_RIGHT 256
#define ST_FULL 264
#define ST_LANES 272
#define ST_GAINS2 336

// func stereoStretchAVX2(seg []float64, s *pairSums, full uint64) bool
//
// Two frames per step, each sum still taking one frame at a time:
// registers SI seg, CX frames left, DI s; Y0 (sl, sr, sll, srr), X1 slr
// (lane 0), Y2 the running maxima of |L−R| (every lane: the maximum is
// exact in any order, and NaN is never taken, as in Go), Y3 the
// full-scale flags; Y15 full−1, Y14 the mask of all but the sign bit,
// Y13 ones.
TEXT ·stereoStretchAVX2(SB), NOSPLIT, $0-41
	MOVQ         seg_base+0(FP), SI
	MOVQ         seg_len+8(FP), CX
	MOVQ         s+24(FP), DI
	MOVQ         full+32(FP), AX
	SHRQ         $1, CX
	DECQ         AX
	MOVQ         AX, X15
	VPBROADCASTQ X15, Y15
	MOVQ         $0x7fffffffffffffff, AX
	MOVQ         AX, X14
	VPBROADCASTQ X14, Y14
	MOVQ         $0x3ff0000000000000, AX
	MOVQ         AX, X13
	VPBROADCASTQ X13, Y13
	VMOVUPD      0(DI), Y0
	VMOVSD       32(DI), X1
	VBROADCASTSD 40(DI), Y2
	VPXOR        Y3, Y3, Y3
	CMPQ         CX, $2
	JLT          sone

spair:
	VMOVUPD      (SI), Y4          // l0 r0 l1 r1
	VMULPD       Y4, Y4, Y5        // l0² r0² l1² r1²
	VPERM2F128   $0x20, Y5, Y4, Y6 // l0 r0 l0² r0²
	VPERM2F128   $0x31, Y5, Y4, Y7 // l1 r1 l1² r1²
	VADDPD       Y6, Y0, Y0        // frame 0 into sl sr sll srr
	VADDPD       Y7, Y0, Y0        // frame 1
	VPERMILPD    $5, Y4, Y8        // r0 l0 r1 l1
	VMULPD       Y8, Y4, Y9        // l0·r0 · l1·r1 ·
	VADDSD       X9, X1, X1        // slr += l0·r0
	VEXTRACTF128 $1, Y9, X10
	VADDSD       X10, X1, X1       // slr += l1·r1
	VSUBPD       Y8, Y4, Y10       // l0−r0 · l1−r1 ·
	VANDPD       Y14, Y10, Y10
	VMAXPD       Y2, Y10, Y2       // |l−r| > md ? |l−r| : md
	VPAND        Y14, Y4, Y11      // bits of |x|
	VPCMPGTQ     Y15, Y11, Y11     // ≥ full
	VPOR         Y11, Y3, Y3
	ADDQ         $32, SI
	SUBQ         $2, CX
	CMPQ         CX, $2
	JGE          spair

sone:
	TESTQ          CX, CX
	JZ             sdone
	VBROADCASTF128 (SI), Y4           // l r l r
	VBLENDPD       $0x0C, Y4, Y13, Y5 // 1 1 l r
	VMULPD         Y5, Y4, Y5         // l r l·l r·r
	VADDPD         Y5, Y0, Y0
	VPERMILPD      $1, X4, X6         // r l
	VMULPD         X6, X4, X7         // l·r
	VADDSD         X7, X1, X1
	VSUBPD         X6, X4, X7         // l−r
	VANDPD         X14, X7, X7
	VMAXPD         X2, X7, X7
	VBLENDPD       $0x03, Y7, Y2, Y2  // into lanes 0, 1
	VPAND          X14, X4, X8
	VPCMPGTQ       X15, X8, X8
	VPOR           Y8, Y3, Y3

sdone:
	VEXTRACTF128 $1, Y2, X10
	VMAXPD       X10, X2, X2
	VPERMILPD    $1, X2, X10
	VMAXPD       X10, X2, X2
	VMOVUPD      Y0, 0(DI)
	VMOVSD       X1, 32(DI)
	VMOVSD       X2, 40(DI)
	VPTEST       Y3, Y3
	SETNE        ret+40(FP)
	VZEROUPPER
	RET

// FOLDSTEP adds channel c's two products (gain into Lo, gain into Ro,
// times x) to X8, using X9.
#define FOLDSTEP(c) \
	VMOVDDUP (c*8)(SI), X9 \
	VMULPD   (ST_GAINS+c*16)(BX), X9, X9 \
	VADDPD   X9, X8, X8

// FOLD2 adds to Y6 the products of channels c and c+1 of two frames,
// whose samples R holds as (f[c], f[c+1], g[c], g[c+1]), using Y13.
#define FOLD2(R, c) \
	VMOVDDUP  R, Y13 \
	VMULPD    (ST_GAINS2+c*32)(BX), Y13, Y13 \
	VADDPD    Y13, Y6, Y6 \
	VPERMILPD $0xF, R, Y13 \
	VMULPD    (ST_GAINS2+c*32+32)(BX), Y13, Y13 \
	VADDPD    Y13, Y6, Y6

// func anyStretchAVX2(buf, out []float64, frames int, st *frameState) bool
//
// Registers: SI buf, DI out (0 for none), CX frames left, BX st, R8 the
// frame's size in bytes, R9 and R10 the pair's byte offsets in a frame
// (R9 < 0 for no pair), R11 the channel count; Y0, Y1 the channel sums
// (channels 0–3, 4–7), Y2 (sl, sr, sll, srr), X3 slr, X4 maxDiff, Y5 the
// full-scale flags, Y6, Y7 the load masks; Y15 full−1, Y14 the mask of all
// but the sign bit, Y13 ones.
TEXT ·anyStretchAVX2(SB), NOSPLIT, $0-65
	MOVQ         buf_base+0(FP), SI
	MOVQ         out_base+24(FP), DI
	MOVQ         frames+48(FP), CX
	MOVQ         st+56(FP), BX
	MOVQ         ST_CHANNELS(BX), R11
	LEAQ         (R11*8), R8
	MOVQ         ST_LEFT(BX), R9
	MOVQ         ST_RIGHT(BX), R10
	SHLQ         $3, R9
	SHLQ         $3, R10
	MOVQ         ST_FULL(BX), AX
	DECQ         AX
	MOVQ         AX, X15
	VPBROADCASTQ X15, Y15
	MOVQ         $0x7fffffffffffffff, AX
	MOVQ         AX, X14
	VPBROADCASTQ X14, Y14
	MOVQ         $0x3ff0000000000000, AX
	MOVQ         AX, X13
	VPBROADCASTQ X13, Y13
	VMOVDQU      ST_LANES(BX), Y6
	VMOVDQU      ST_LANES+32(BX), Y7
	VMOVUPD      ST_SUMS(BX), Y0
	VMOVUPD      ST_SUMS+32(BX), Y1
	VMOVUPD      ST_PAIR(BX), Y2
	VMOVSD       ST_PAIR+32(BX), X3
	VMOVSD       ST_PAIR+40(BX), X4
	VPXOR        Y5, Y5, Y5
	// 5.1 with L, R first and a fold-down: two frames per step (below).
	CMPQ         R11, $6
	JNE          astart
	TESTQ        DI, DI
	JZ           astart
	CMPQ         R9, $0
	JNE          astart
	CMPQ         R10, $8
	JNE          astart
	CMPQ         CX, $2
	JLT          astart

six:
	VMOVUPD    (SI), Y8          // A = f0 f1 f2 f3 (frame f, channels 0–3)
	VMOVUPD    32(SI), Y9        // B = f4 f5 g0 g1 (g the next frame)
	VMOVUPD    64(SI), Y10       // C = g2 g3 g4 g5
	VPAND      Y14, Y8, Y11      // full scale, all twelve samples
	VPCMPGTQ   Y15, Y11, Y11
	VPOR       Y11, Y5, Y5
	VPAND      Y14, Y9, Y11
	VPCMPGTQ   Y15, Y11, Y11
	VPOR       Y11, Y5, Y5
	VPAND      Y14, Y10, Y11
	VPCMPGTQ   Y15, Y11, Y11
	VPOR       Y11, Y5, Y5
	VPERM2F128 $0x21, Y10, Y9, Y11 // G = g0 g1 g2 g3
	VADDPD     Y8, Y0, Y0        // channel sums 0–3: frame f, then g
	VADDPD     Y11, Y0, Y0
	VADDPD     X9, X1, X1        // channel sums 4–5: f, then g
	VEXTRACTF128 $1, Y10, X12
	VADDPD     X12, X1, X1
	VPERM2F128 $0x20, Y11, Y8, Y12 // Q = lf rf lg rg
	VMULPD     Y12, Y12, Y13       // their squares
	VPERM2F128 $0x20, Y13, Y12, Y6 // lf rf lf² rf²
	VPERM2F128 $0x31, Y13, Y12, Y7 // lg rg lg² rg²
	VADDPD     Y6, Y2, Y2
	VADDPD     Y7, Y2, Y2
	VPERMILPD  $5, Y12, Y13        // rf lf rg lg
	VMULPD     Y13, Y12, Y6        // lf·rf · lg·rg ·
	VADDSD     X6, X3, X3
	VEXTRACTF128 $1, Y6, X7
	VADDSD     X7, X3, X3
	VSUBPD     Y13, Y12, Y6        // lf−rf · lg−rg ·
	VANDPD     Y14, Y6, Y6
	VMAXPD     Y4, Y6, Y4
	// Fold-down, lanes Lo(f) Ro(f) Lo(g) Ro(g): each channel's two
	// samples duplicated, times its gains (ST_GAINS2), added from 0.
	VXORPD     Y6, Y6, Y6
	FOLD2(Y12, 0)
	VPERM2F128 $0x31, Y11, Y8, Y12 // f2 f3 g2 g3
	FOLD2(Y12, 2)
	VPERM2F128 $0x30, Y10, Y9, Y12 // f4 f5 g4 g5
	FOLD2(Y12, 4)
	VMOVUPD    Y6, (DI)
	ADDQ       $32, DI
	ADDQ       $96, SI
	SUBQ       $2, CX
	CMPQ       CX, $2
	JGE        six
	// Back to the one-frame registers: maxDiff in lane 0 of X4, the load
	// masks and ones.
	VEXTRACTF128 $1, Y4, X12
	VMAXPD       X12, X4, X4
	VPERMILPD    $1, X4, X12
	VMAXPD       X12, X4, X4
	VMOVDQU      ST_LANES(BX), Y6
	VMOVDQU      ST_LANES+32(BX), Y7
	MOVQ         $0x3ff0000000000000, AX
	MOVQ         AX, X13
	VPBROADCASTQ X13, Y13

astart:
	TESTQ CX, CX
	JZ    adone

aloop:
	VMASKMOVPD (SI), Y6, Y10     // channels 0–3 (0 beyond the last)
	VMASKMOVPD 32(SI), Y7, Y11   // channels 4–7
	VADDPD     Y10, Y0, Y0
	VADDPD     Y11, Y1, Y1
	VPAND      Y14, Y10, Y10
	VPCMPGTQ   Y15, Y10, Y10
	VPOR       Y10, Y5, Y5
	VPAND      Y14, Y11, Y11
	VPCMPGTQ   Y15, Y11, Y11
	VPOR       Y11, Y5, Y5
	TESTQ      R9, R9
	JS         nopair
	VMOVSD      (SI)(R9*1), X10
	VMOVHPD     (SI)(R10*1), X10, X10 // l r
	VINSERTF128 $1, X10, Y10, Y11     // l r l r
	VBLENDPD    $0x0C, Y11, Y13, Y12  // 1 1 l r
	VMULPD      Y12, Y11, Y12         // l r l·l r·r
	VADDPD      Y12, Y2, Y2
	VPERMILPD   $1, X10, X12          // r l
	VMULPD      X12, X10, X9          // l·r
	VADDPD      X9, X3, X3
	VSUBPD      X12, X10, X9          // l−r
	VANDPD      X14, X9, X9
	VMAXPD      X4, X9, X4

nopair:
	TESTQ DI, DI
	JZ    next
	// Lo, Ro = Σ gain·x from 0 in channel order, both in one register;
	// six channels (5.1) unrolled.
	CMPQ R11, $6
	JNE  foldany
	VXORPD   X8, X8, X8
	FOLDSTEP(0)
	FOLDSTEP(1)
	FOLDSTEP(2)
	FOLDSTEP(3)
	FOLDSTEP(4)
	FOLDSTEP(5)
	VMOVUPD  X8, (DI)
	ADDQ     $16, DI
	JMP      next

foldany:
	VXORPD X8, X8, X8
	MOVQ   SI, R12
	LEAQ   ST_GAINS(BX), R13
	MOVQ   R11, R14

fold:
	VMOVDDUP (R12), X9           // x x
	VMULPD   (R13), X9, X9       // x·gainLo x·gainRo
	VADDPD   X9, X8, X8
	ADDQ     $8, R12
	ADDQ     $16, R13
	DECQ     R14
	JNZ      fold
	VMOVUPD  X8, (DI)
	ADDQ     $16, DI

next:
	ADDQ R8, SI
	DECQ CX
	JNZ  aloop

adone:
	VMOVUPD Y0, ST_SUMS(BX)
	VMOVUPD Y1, ST_SUMS+32(BX)
	VMOVUPD Y2, ST_PAIR(BX)
	VMOVSD  X3, ST_PAIR+32(BX)
	VMOVSD  X4, ST_PAIR+40(BX)
	VPTEST  Y5, Y5
	SETNE   ret+64(FP)
	VZEROUPPER
	RET
