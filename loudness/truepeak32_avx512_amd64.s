//go:build !purego

#include "textflag.h"

// The float32 true-peak interpolators of truepeak32.go, sixteen windows at
// a time in the float32 lanes of a Z register (AVX-512 F and DQ): the
// eight-lane AVX2 kernels of truepeak32_avx2_amd64.s widened, each lane
// performing the very operations of the Go twin in the same order (no
// fused multiply-adds), so every set gives the same bits. A last group of
// fewer than sixteen windows runs with its loads zero-masked (K1): the
// masked lanes read nothing (no load beyond the slice, no fault) and
// interpolate silence, whose |y| = +0 cannot raise the running maximum.
// So the kernels take every window and no Go loop runs after them.

// peak4Coeffs512 holds the folded 4× coefficients of peak4Max32Go as
// float32 (each a multiple of 2⁻¹⁴ below 1, so exact): for t = 0…5 the
// four values P, R, Q, U at offset 16·t, broadcast to sixteen lanes on
// use. The same table as peak4Coeffs32 of truepeak32_avx2_amd64.s (a
// file's <> symbols are its own); a wrong entry would fail
// TestPeakMax32MatchesGo on the avx512 set.
DATA peak4Coeffs512<>+0(SB)/4, $0xbb580000
DATA peak4Coeffs512<>+4(SB)/4, $0xbcc50000
DATA peak4Coeffs512<>+8(SB)/4, $0x3ba40000
DATA peak4Coeffs512<>+12(SB)/4, $0xbba80000
DATA peak4Coeffs512<>+16(SB)/4, $0x3c540000
DATA peak4Coeffs512<>+20(SB)/4, $0x3cff8000
DATA peak4Coeffs512<>+24(SB)/4, $0xbb000000
DATA peak4Coeffs512<>+28(SB)/4, $0xbaf80000
DATA peak4Coeffs512<>+32(SB)/4, $0xbcbd8000
DATA peak4Coeffs512<>+36(SB)/4, $0xbd614000
DATA peak4Coeffs512<>+40(SB)/4, $0x3b640000
DATA peak4Coeffs512<>+44(SB)/4, $0x3b540000
DATA peak4Coeffs512<>+48(SB)/4, $0x3d258000
DATA peak4Coeffs512<>+52(SB)/4, $0x3dc34000
DATA peak4Coeffs512<>+56(SB)/4, $0xbbec0000
DATA peak4Coeffs512<>+60(SB)/4, $0xbbcc0000
DATA peak4Coeffs512<>+64(SB)/4, $0xbda5a000
DATA peak4Coeffs512<>+68(SB)/4, $0xbe3bd000
DATA peak4Coeffs512<>+72(SB)/4, $0x3caf8000
DATA peak4Coeffs512<>+76(SB)/4, $0x3c8a8000
DATA peak4Coeffs512<>+80(SB)/4, $0x3f0e0400
DATA peak4Coeffs512<>+84(SB)/4, $0x3f1f5800
DATA peak4Coeffs512<>+88(SB)/4, $0xbed5b800
DATA peak4Coeffs512<>+92(SB)/4, $0xbe212000
GLOBL peak4Coeffs512<>(SB), RODATA|NOPTR, $96

// absMask512 clears the sign bit of a float32.
DATA absMask512<>+0(SB)/4, $0x7fffffff
GLOBL absMask512<>(SB), RODATA|NOPTR, $4

// TAP4X32 is TAP32X16 (truepeak32_avx2_amd64.s) in Z registers: tap pair
// t of two groups of sixteen windows (P, R, Q, U in Z4–Z7 for windows
// 0–15 and in Z10–Z13 for windows 16–31), S = x[11−t]+x[t],
// D = x[11−t]−x[t] (hi, lo the byte offsets of x[11−t] and x[t] in the
// first window), each coefficient broadcast once (Z15) for both groups;
// Z1–Z3, Z9 and Z14 are scratch.
#define TAP4X32(hi, lo, c) \
	VMOVUPS      hi(SI), Z1 \
	VMOVUPS      lo(SI), Z2 \
	VADDPS       Z2, Z1, Z3 \
	VSUBPS       Z2, Z1, Z1 \
	VMOVUPS      (hi+64)(SI), Z2 \
	VMOVUPS      (lo+64)(SI), Z9 \
	VADDPS       Z9, Z2, Z14 \
	VSUBPS       Z9, Z2, Z2 \
	VBROADCASTSS peak4Coeffs512<>+(c+0)(SB), Z15 \
	VMULPS       Z15, Z3, Z9 \
	VADDPS       Z9, Z4, Z4 \
	VMULPS       Z15, Z14, Z9 \
	VADDPS       Z9, Z10, Z10 \
	VBROADCASTSS peak4Coeffs512<>+(c+4)(SB), Z15 \
	VMULPS       Z15, Z3, Z9 \
	VADDPS       Z9, Z5, Z5 \
	VMULPS       Z15, Z14, Z9 \
	VADDPS       Z9, Z11, Z11 \
	VBROADCASTSS peak4Coeffs512<>+(c+8)(SB), Z15 \
	VMULPS       Z15, Z1, Z9 \
	VADDPS       Z9, Z6, Z6 \
	VMULPS       Z15, Z2, Z9 \
	VADDPS       Z9, Z12, Z12 \
	VBROADCASTSS peak4Coeffs512<>+(c+12)(SB), Z15 \
	VMULPS       Z15, Z1, Z9 \
	VADDPS       Z9, Z7, Z7 \
	VMULPS       Z15, Z2, Z9 \
	VADDPS       Z9, Z13, Z13

// TAP4X16M is TAP4X32 for one group of sixteen windows (Z4–Z7) whose
// loads keep only the lanes of K1 (the others read as +0).
#define TAP4X16M(hi, lo, c) \
	VMOVUPS.Z    hi(SI), K1, Z1 \
	VMOVUPS.Z    lo(SI), K1, Z2 \
	VADDPS       Z2, Z1, Z3 \
	VSUBPS       Z2, Z1, Z1 \
	VBROADCASTSS peak4Coeffs512<>+(c+0)(SB), Z15 \
	VMULPS       Z15, Z3, Z9 \
	VADDPS       Z9, Z4, Z4 \
	VBROADCASTSS peak4Coeffs512<>+(c+4)(SB), Z15 \
	VMULPS       Z15, Z3, Z9 \
	VADDPS       Z9, Z5, Z5 \
	VBROADCASTSS peak4Coeffs512<>+(c+8)(SB), Z15 \
	VMULPS       Z15, Z1, Z9 \
	VADDPS       Z9, Z6, Z6 \
	VBROADCASTSS peak4Coeffs512<>+(c+12)(SB), Z15 \
	VMULPS       Z15, Z1, Z9 \
	VADDPS       Z9, Z7, Z7

// PEAK4MAX512 is PEAK32MAX (truepeak32_avx2_amd64.s) in Z registers: the
// four outputs y0 = P+Q, y3 = P−Q, y1 = R+U, y2 = R−U of one group, their
// signs cleared (mask in Z15), into the lane-wise maxima Z0 and Z8 (VMAXPS
// returns its second source, the running maximum, when v is NaN).
#define PEAK4MAX512(P, R, Q, U) \
	VADDPS Q, P, Z1 \
	VSUBPS Q, P, P \
	VADDPS U, R, Z2 \
	VSUBPS U, R, R \
	VANDPS Z15, Z1, Z1 \
	VANDPS Z15, P, P \
	VANDPS Z15, Z2, Z2 \
	VANDPS Z15, R, R \
	VMAXPS Z0, Z1, Z1 \
	VMAXPS Z1, P, Z0 \
	VMAXPS Z8, Z2, Z2 \
	VMAXPS Z2, R, Z8

// LANEMASK sets K1 to the lanes of min(CX, 16) windows for 0 < CX < 32,
// using AX: the low 16 bits of 2^CX − 1 (all set from CX = 16 on).
#define LANEMASK \
	MOVL  $1, AX \
	SHLL  CX, AX \
	DECL  AX \
	KMOVW AX, K1

// REDUCE512 leaves in X0 the largest lane of Z0 and Z8 (none is NaN or
// negative, so the order does not matter), using Z1.
#define REDUCE512 \
	VMAXPS        Z8, Z0, Z0 \
	VEXTRACTF32X8 $1, Z0, Y1 \
	VMAXPS        Y1, Y0, Y0 \
	VEXTRACTF128  $1, Y0, X1 \
	VMAXPS        X1, X0, X0 \
	VPERMILPS     $0x4e, X0, X1 \
	VMAXPS        X1, X0, X0 \
	VPERMILPS     $0xb1, X0, X1 \
	VMAXPS        X1, X0, X0

// func peak4Max32AVX512(w []float32) float32
//
// peak4Max32Go over all len(w)−11 windows of w: sixteen windows in the
// sixteen lanes, two such groups per iteration (loop32, each coefficient
// broadcast once for both), then groups of up to sixteen alone (rest16,
// the last one masked). Registers: SI window start, CX windows left; Z0,
// Z8 running maxima (from +0).
TEXT ·peak4Max32AVX512(SB), NOSPLIT, $0-28
	MOVQ   w_base+0(FP), SI
	MOVQ   w_len+8(FP), CX
	VXORPS Z0, Z0, Z0
	VXORPS Z8, Z8, Z8
	SUBQ   $11, CX
	CMPQ   CX, $32
	JLT    rest16

loop32:
	VMOVUPS      44(SI), Z1
	VMOVUPS      0(SI), Z2
	VADDPS       Z2, Z1, Z3
	VSUBPS       Z2, Z1, Z1
	VMOVUPS      108(SI), Z2
	VMOVUPS      64(SI), Z9
	VADDPS       Z9, Z2, Z14
	VSUBPS       Z9, Z2, Z2
	VBROADCASTSS peak4Coeffs512<>+0(SB), Z15
	VMULPS       Z15, Z3, Z4
	VMULPS       Z15, Z14, Z10
	VBROADCASTSS peak4Coeffs512<>+4(SB), Z15
	VMULPS       Z15, Z3, Z5
	VMULPS       Z15, Z14, Z11
	VBROADCASTSS peak4Coeffs512<>+8(SB), Z15
	VMULPS       Z15, Z1, Z6
	VMULPS       Z15, Z2, Z12
	VBROADCASTSS peak4Coeffs512<>+12(SB), Z15
	VMULPS       Z15, Z1, Z7
	VMULPS       Z15, Z2, Z13

	TAP4X32(40, 4, 16)
	TAP4X32(36, 8, 32)
	TAP4X32(32, 12, 48)
	TAP4X32(28, 16, 64)
	TAP4X32(24, 20, 80)

	VBROADCASTSS absMask512<>(SB), Z15
	PEAK4MAX512(Z4, Z5, Z6, Z7)
	PEAK4MAX512(Z10, Z11, Z12, Z13)

	ADDQ $128, SI
	SUBQ $32, CX
	CMPQ CX, $32
	JGE  loop32

rest16:
	TESTQ        CX, CX
	JLE          done16
	LANEMASK
	VMOVUPS.Z    44(SI), K1, Z1
	VMOVUPS.Z    0(SI), K1, Z2
	VADDPS       Z2, Z1, Z3
	VSUBPS       Z2, Z1, Z1
	VBROADCASTSS peak4Coeffs512<>+0(SB), Z15
	VMULPS       Z15, Z3, Z4
	VBROADCASTSS peak4Coeffs512<>+4(SB), Z15
	VMULPS       Z15, Z3, Z5
	VBROADCASTSS peak4Coeffs512<>+8(SB), Z15
	VMULPS       Z15, Z1, Z6
	VBROADCASTSS peak4Coeffs512<>+12(SB), Z15
	VMULPS       Z15, Z1, Z7
	TAP4X16M(40, 4, 16)
	TAP4X16M(36, 8, 32)
	TAP4X16M(32, 12, 48)
	TAP4X16M(28, 16, 64)
	TAP4X16M(24, 20, 80)
	VBROADCASTSS absMask512<>(SB), Z15
	PEAK4MAX512(Z4, Z5, Z6, Z7)
	ADDQ         $64, SI
	SUBQ         $16, CX
	JMP          rest16

done16:
	REDUCE512
	VZEROUPPER
	MOVSS X0, ret+24(FP)
	RET

// peak2Coeffs512 holds the 2× interpolator of peak2Max32Go as float32
// (multiples of 2⁻¹³ below 1, exact): for t = 0…11 h0[t] and h1[t] at
// offset 8·t, broadcast to sixteen lanes on use; the same table as
// peak2Coeffs32 of truepeak32_avx2_amd64.s.
DATA peak2Coeffs512<>+0(SB)/4, $0x3ae00000
DATA peak2Coeffs512<>+4(SB)/4, $0xbcef0000
DATA peak2Coeffs512<>+8(SB)/4, $0x3c340000
DATA peak2Coeffs512<>+12(SB)/4, $0x3cf00000
DATA peak2Coeffs512<>+16(SB)/4, $0xbca10000
DATA peak2Coeffs512<>+20(SB)/4, $0xbd540000
DATA peak2Coeffs512<>+24(SB)/4, $0x3d080000
DATA peak2Coeffs512<>+28(SB)/4, $0x3db68000
DATA peak2Coeffs512<>+32(SB)/4, $0xbd738000
DATA peak2Coeffs512<>+36(SB)/4, $0xbe2a8000
DATA peak2Coeffs512<>+40(SB)/4, $0x3e0ca000
DATA peak2Coeffs512<>+44(SB)/4, $0x3eee2000
DATA peak2Coeffs512<>+48(SB)/4, $0x3f78e000
DATA peak2Coeffs512<>+52(SB)/4, $0x3f47a000
DATA peak2Coeffs512<>+56(SB)/4, $0xbdd18000
DATA peak2Coeffs512<>+60(SB)/4, $0xbe4d2000
DATA peak2Coeffs512<>+64(SB)/4, $0x3d430000
DATA peak2Coeffs512<>+68(SB)/4, $0x3dd00000
DATA peak2Coeffs512<>+72(SB)/4, $0xbcda0000
DATA peak2Coeffs512<>+76(SB)/4, $0xbd6e8000
DATA peak2Coeffs512<>+80(SB)/4, $0x3c740000
DATA peak2Coeffs512<>+84(SB)/4, $0x3d078000
DATA peak2Coeffs512<>+88(SB)/4, $0xbc080000
DATA peak2Coeffs512<>+92(SB)/4, $0xbc9b0000
GLOBL peak2Coeffs512<>(SB), RODATA|NOPTR, $96

// TAP2X32 is TAP2X16 (truepeak32_avx2_amd64.s) in Z registers: tap t of
// both 2× phases for two groups of sixteen windows, y0 += h0[t]·x[11−t],
// y2 += h1[t]·x[t] (windows 0–15 in Z4, Z5, windows 16–31 in Z6, Z7),
// each coefficient broadcast once for both groups.
#define TAP2X32(t) \
	VBROADCASTSS peak2Coeffs512<>+(8*t)(SB), Z10 \
	VBROADCASTSS peak2Coeffs512<>+(8*t+4)(SB), Z11 \
	VMULPS       (44-4*t)(SI), Z10, Z1 \
	VADDPS       Z1, Z4, Z4 \
	VMULPS       (108-4*t)(SI), Z10, Z2 \
	VADDPS       Z2, Z6, Z6 \
	VMULPS       (4*t)(SI), Z11, Z3 \
	VADDPS       Z3, Z5, Z5 \
	VMULPS       (64+4*t)(SI), Z11, Z9 \
	VADDPS       Z9, Z7, Z7

// TAP2X16M is TAP2X32 for one group of sixteen windows (Z4, Z5), the
// products zero-masked to the lanes of K1 (masked lanes load nothing).
#define TAP2X16M(t) \
	VBROADCASTSS peak2Coeffs512<>+(8*t)(SB), Z10 \
	VBROADCASTSS peak2Coeffs512<>+(8*t+4)(SB), Z11 \
	VMULPS.Z     (44-4*t)(SI), Z10, K1, Z1 \
	VADDPS       Z1, Z4, Z4 \
	VMULPS.Z     (4*t)(SI), Z11, K1, Z3 \
	VADDPS       Z3, Z5, Z5

// MAX512 clears the sign of v (mask in Z15) and keeps the lane-wise
// maximum in acc (VMAXPS returns its second source, acc, when v is NaN).
#define MAX512(v, acc) \
	VANDPS Z15, v, v \
	VMAXPS acc, v, acc

// func peak2Max32AVX512(w []float32) float32
//
// peak2Max32Go over all len(w)−11 windows of w: sixteen windows in the
// sixteen lanes, two groups per iteration (loop2x32), then groups of up
// to sixteen alone (rest2x16, the last one masked). Registers: SI window
// start, CX windows left; Z0, Z8 running maxima (from +0), Z15 the mask.
TEXT ·peak2Max32AVX512(SB), NOSPLIT, $0-28
	MOVQ         w_base+0(FP), SI
	MOVQ         w_len+8(FP), CX
	VXORPS       Z0, Z0, Z0
	VXORPS       Z8, Z8, Z8
	VBROADCASTSS absMask512<>(SB), Z15
	SUBQ         $11, CX
	CMPQ         CX, $32
	JLT          rest2x16

loop2x32:
	VBROADCASTSS peak2Coeffs512<>+0(SB), Z10
	VBROADCASTSS peak2Coeffs512<>+4(SB), Z11
	VMULPS       44(SI), Z10, Z4
	VMULPS       108(SI), Z10, Z6
	VMULPS       0(SI), Z11, Z5
	VMULPS       64(SI), Z11, Z7
	TAP2X32(1)
	TAP2X32(2)
	TAP2X32(3)
	TAP2X32(4)
	TAP2X32(5)
	TAP2X32(6)
	TAP2X32(7)
	TAP2X32(8)
	TAP2X32(9)
	TAP2X32(10)
	TAP2X32(11)
	MAX512(Z4, Z0)
	MAX512(Z5, Z8)
	MAX512(Z6, Z0)
	MAX512(Z7, Z8)

	ADDQ $128, SI
	SUBQ $32, CX
	CMPQ CX, $32
	JGE  loop2x32

rest2x16:
	TESTQ        CX, CX
	JLE          done2x
	LANEMASK
	VBROADCASTSS peak2Coeffs512<>+0(SB), Z10
	VBROADCASTSS peak2Coeffs512<>+4(SB), Z11
	VMULPS.Z     44(SI), Z10, K1, Z4
	VMULPS.Z     0(SI), Z11, K1, Z5
	TAP2X16M(1)
	TAP2X16M(2)
	TAP2X16M(3)
	TAP2X16M(4)
	TAP2X16M(5)
	TAP2X16M(6)
	TAP2X16M(7)
	TAP2X16M(8)
	TAP2X16M(9)
	TAP2X16M(10)
	TAP2X16M(11)
	MAX512(Z4, Z0)
	MAX512(Z5, Z8)
	ADDQ         $64, SI
	SUBQ         $16, CX
	JMP          rest2x16

done2x:
	REDUCE512
	VZEROUPPER
	MOVSS X0, ret+24(FP)
	RET
