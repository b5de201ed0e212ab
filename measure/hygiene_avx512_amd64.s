//go:build !purego

#include "textflag.h"

// The hygiene probes' AVX-512 kernels (see hygiene_kernel.go). They use
// AVX-512's masks and EVEX forms on Y registers only (AVX-512 VL): the
// probe sums are running sums in frame order, one addition per frame each,
// so their cost is the latency of that addition, and on the project's
// machine a 512-bit addition's is about 3.4 cycles against 2 for a
// 256-bit one (a Z-register version of the stereo kernel was 0.83× the
// AVX2 one). What AVX-512 buys here is fewer shuffles: a frame's
// (l, r, l², r²) comes from one broadcast load and one merge-masked
// multiply. As in the AVX2 kernels, every running sum lives in its own
// lane and takes one addition per frame, in frame order, exactly as the Go
// loop adds it; products are rounded before they are added (no FMA).

// FRAMEVL adds the L/R frame at off(SI) to the window sums: Y7 =
// (l r l r) from memory, squared in lanes 2–3 only (K3) to
// (l, r, l·l, r·r), into Y0 = (sl, sr, sll, srr); l·r (lane 0 of Y7 times
// r from memory) into X1 = slr.
#define FRAMEVL(off) \
	VBROADCASTF128 off(SI), Y7 \
	VMULPD         Y7, Y7, K3, Y7 \
	VADDPD         Y7, Y0, Y0 \
	VMULSD         (off+8)(SI), X7, X8 \
	VADDSD         X8, X1, X1

// func stereoStretchAVX512(seg []float64, s *pairSums, full uint64) bool
//
// stereoStretchGo over the len(seg)/2 frames of seg: the sums a frame at a
// time (FRAMEVL); |L−R| and the full-scale test two frames per step (a
// masked load for a last odd frame): Y2 the running maxima of |L−R| in
// every lane (the maximum is exact in any order, and NaN is never taken,
// as in Go), Y3 the largest bit pattern of |x| seen (unsigned, so NaN is
// above every finite value), compared with full once at the end (if there
// was a frame at all). Registers: SI seg, CX frames left, DI s, R8 the
// frame count; Y14 the mask of all but the sign bit; K3 lanes 2–3.
TEXT ·stereoStretchAVX512(SB), NOSPLIT, $0-41
	MOVQ         seg_base+0(FP), SI
	MOVQ         seg_len+8(FP), CX
	MOVQ         s+24(FP), DI
	SHRQ         $1, CX
	MOVQ         CX, R8
	MOVL         $0x0c, AX
	KMOVB        AX, K3
	MOVQ         $0x7fffffffffffffff, AX
	VPBROADCASTQ AX, Y14
	VMOVUPD      0(DI), Y0
	VMOVSD       32(DI), X1
	VBROADCASTSD 40(DI), Y2
	VPXORQ       Y3, Y3, Y3
	CMPQ         CX, $2
	JLT          vtail

vpair:
	VMOVUPD   (SI), Y4        // l0 r0 l1 r1
	VPERMILPD $5, Y4, Y5      // r0 l0 r1 l1
	VSUBPD    Y5, Y4, Y5      // l−r, r−l (the same magnitude)
	VANDPD    Y14, Y5, Y5
	VMAXPD    Y2, Y5, Y2      // |l−r| > md ? |l−r| : md
	VPANDQ    Y14, Y4, Y6     // bits of |x|
	VPMAXUQ   Y6, Y3, Y3
	FRAMEVL(0)
	FRAMEVL(16)
	ADDQ      $32, SI
	SUBQ      $2, CX
	CMPQ      CX, $2
	JGE       vpair

vtail:
	TESTQ     CX, CX
	JZ        vdone
	VMOVUPD   (SI), X4        // the last frame: l r
	VPERMILPD $1, X4, X5
	VSUBPD    X5, X4, X5
	VANDPD    X14, X5, X5
	VMAXPD    X2, X5, X5
	VBLENDPD  $0x03, Y5, Y2, Y2 // into lanes 0, 1
	VPANDQ    X14, X4, X6
	VPMAXUQ   Y6, Y3, Y3        // (lanes 2, 3 of Y6 are 0)
	FRAMEVL(0)

vdone:
	VEXTRACTF128 $1, Y2, X5
	VMAXPD       X5, X2, X2
	VPERMILPD    $1, X2, X5
	VMAXPD       X5, X2, X2
	VMOVUPD      Y0, 0(DI)
	VMOVSD       X1, 32(DI)
	VMOVSD       X2, 40(DI)
	KXORB        K4, K4, K4
	TESTQ        R8, R8
	JZ           vflag
	MOVQ         full+32(FP), AX
	VPBROADCASTQ AX, Y15
	VPCMPUQ      $5, Y15, Y3, K4 // |x| bits ≥ full

vflag:
	KORTESTB K4, K4
	SETNE    ret+40(FP)
	VZEROUPPER
	RET
