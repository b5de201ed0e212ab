//go:build !purego

#include "textflag.h"

// peak4Coeffs32 holds the folded 4× coefficients of peak4Max32Go as
// float32 (each a multiple of 2⁻¹⁴ below 1, so exact): for t = 0…5 the
// four values P, R, Q, U at offset 16·t, broadcast to eight lanes on use.
DATA peak4Coeffs32<>+0(SB)/4, $0xbb580000
DATA peak4Coeffs32<>+4(SB)/4, $0xbcc50000
DATA peak4Coeffs32<>+8(SB)/4, $0x3ba40000
DATA peak4Coeffs32<>+12(SB)/4, $0xbba80000
DATA peak4Coeffs32<>+16(SB)/4, $0x3c540000
DATA peak4Coeffs32<>+20(SB)/4, $0x3cff8000
DATA peak4Coeffs32<>+24(SB)/4, $0xbb000000
DATA peak4Coeffs32<>+28(SB)/4, $0xbaf80000
DATA peak4Coeffs32<>+32(SB)/4, $0xbcbd8000
DATA peak4Coeffs32<>+36(SB)/4, $0xbd614000
DATA peak4Coeffs32<>+40(SB)/4, $0x3b640000
DATA peak4Coeffs32<>+44(SB)/4, $0x3b540000
DATA peak4Coeffs32<>+48(SB)/4, $0x3d258000
DATA peak4Coeffs32<>+52(SB)/4, $0x3dc34000
DATA peak4Coeffs32<>+56(SB)/4, $0xbbec0000
DATA peak4Coeffs32<>+60(SB)/4, $0xbbcc0000
DATA peak4Coeffs32<>+64(SB)/4, $0xbda5a000
DATA peak4Coeffs32<>+68(SB)/4, $0xbe3bd000
DATA peak4Coeffs32<>+72(SB)/4, $0x3caf8000
DATA peak4Coeffs32<>+76(SB)/4, $0x3c8a8000
DATA peak4Coeffs32<>+80(SB)/4, $0x3f0e0400
DATA peak4Coeffs32<>+84(SB)/4, $0x3f1f5800
DATA peak4Coeffs32<>+88(SB)/4, $0xbed5b800
DATA peak4Coeffs32<>+92(SB)/4, $0xbe212000
GLOBL peak4Coeffs32<>(SB), RODATA|NOPTR, $96

// absMask32 clears the sign bit of a float32.
DATA absMask32<>+0(SB)/4, $0x7fffffff
GLOBL absMask32<>(SB), RODATA|NOPTR, $4

// TAP32X16 is TAP4X8 (truepeak_avx2_amd64.s) in float32: two groups of
// eight windows (P, R, Q, U in Y4–Y7 for windows 0–7 and in Y10–Y13 for
// windows 8–15), S = x[11−t]+x[t], D = x[11−t]−x[t], each coefficient
// broadcast once (Y15) for both groups; Y1–Y3, Y9 and Y14 are scratch.
#define TAP32X16(hi, lo, c) \
	VMOVUPS      hi(SI), Y1 \
	VMOVUPS      lo(SI), Y2 \
	VADDPS       Y2, Y1, Y3 \
	VSUBPS       Y2, Y1, Y1 \
	VMOVUPS      (hi+32)(SI), Y2 \
	VMOVUPS      (lo+32)(SI), Y9 \
	VADDPS       Y9, Y2, Y14 \
	VSUBPS       Y9, Y2, Y2 \
	VBROADCASTSS peak4Coeffs32<>+(c+0)(SB), Y15 \
	VMULPS       Y15, Y3, Y9 \
	VADDPS       Y9, Y4, Y4 \
	VMULPS       Y15, Y14, Y9 \
	VADDPS       Y9, Y10, Y10 \
	VBROADCASTSS peak4Coeffs32<>+(c+4)(SB), Y15 \
	VMULPS       Y15, Y3, Y9 \
	VADDPS       Y9, Y5, Y5 \
	VMULPS       Y15, Y14, Y9 \
	VADDPS       Y9, Y11, Y11 \
	VBROADCASTSS peak4Coeffs32<>+(c+8)(SB), Y15 \
	VMULPS       Y15, Y1, Y9 \
	VADDPS       Y9, Y6, Y6 \
	VMULPS       Y15, Y2, Y9 \
	VADDPS       Y9, Y12, Y12 \
	VBROADCASTSS peak4Coeffs32<>+(c+12)(SB), Y15 \
	VMULPS       Y15, Y1, Y9 \
	VADDPS       Y9, Y7, Y7 \
	VMULPS       Y15, Y2, Y9 \
	VADDPS       Y9, Y13, Y13

// TAP32X8 is TAP32X16 for one group of eight windows (Y4–Y7).
#define TAP32X8(hi, lo, c) \
	VMOVUPS      hi(SI), Y1 \
	VMOVUPS      lo(SI), Y2 \
	VADDPS       Y2, Y1, Y3 \
	VSUBPS       Y2, Y1, Y1 \
	VBROADCASTSS peak4Coeffs32<>+(c+0)(SB), Y15 \
	VMULPS       Y15, Y3, Y9 \
	VADDPS       Y9, Y4, Y4 \
	VBROADCASTSS peak4Coeffs32<>+(c+4)(SB), Y15 \
	VMULPS       Y15, Y3, Y9 \
	VADDPS       Y9, Y5, Y5 \
	VBROADCASTSS peak4Coeffs32<>+(c+8)(SB), Y15 \
	VMULPS       Y15, Y1, Y9 \
	VADDPS       Y9, Y6, Y6 \
	VBROADCASTSS peak4Coeffs32<>+(c+12)(SB), Y15 \
	VMULPS       Y15, Y1, Y9 \
	VADDPS       Y9, Y7, Y7

// PEAK32MAX takes the four outputs y0 = P+Q, y3 = P−Q, y1 = R+U,
// y2 = R−U of one group (P, R, Q, U), clears their signs (mask in Y15)
// and keeps the lane-wise maxima in Y0 and Y8, using Y1 and Y2 (VMAXPS
// returns its second source, the running maximum, when v is NaN).
#define PEAK32MAX(P, R, Q, U) \
	VADDPS Q, P, Y1 \
	VSUBPS Q, P, P \
	VADDPS U, R, Y2 \
	VSUBPS U, R, R \
	VANDPS Y15, Y1, Y1 \
	VANDPS Y15, P, P \
	VANDPS Y15, Y2, Y2 \
	VANDPS Y15, R, R \
	VMAXPS Y0, Y1, Y1 \
	VMAXPS Y1, P, Y0 \
	VMAXPS Y8, Y2, Y2 \
	VMAXPS Y2, R, Y8

// func peak4Max32AVX2(w []float32) float32
//
// peak4Max32Go over the first 8·⌊(len(w)−11)/8⌋ windows of w: eight
// windows in the eight lanes, two such groups per iteration (loop16, each
// coefficient broadcast once for both), a last group of eight alone
// (rest16). Each lane performs the very operations of peak4Max32Go; no
// fused multiply-adds. Registers: SI window start, CX windows left; Y0,
// Y8 running maxima (from +0).
TEXT ·peak4Max32AVX2(SB), NOSPLIT, $0-28
	MOVQ   w_base+0(FP), SI
	MOVQ   w_len+8(FP), CX
	VXORPS Y0, Y0, Y0
	VXORPS Y8, Y8, Y8
	SUBQ   $11, CX
	CMPQ   CX, $16
	JLT    rest16

loop16:
	VMOVUPS      44(SI), Y1
	VMOVUPS      0(SI), Y2
	VADDPS       Y2, Y1, Y3
	VSUBPS       Y2, Y1, Y1
	VMOVUPS      76(SI), Y2
	VMOVUPS      32(SI), Y9
	VADDPS       Y9, Y2, Y14
	VSUBPS       Y9, Y2, Y2
	VBROADCASTSS peak4Coeffs32<>+0(SB), Y15
	VMULPS       Y15, Y3, Y4
	VMULPS       Y15, Y14, Y10
	VBROADCASTSS peak4Coeffs32<>+4(SB), Y15
	VMULPS       Y15, Y3, Y5
	VMULPS       Y15, Y14, Y11
	VBROADCASTSS peak4Coeffs32<>+8(SB), Y15
	VMULPS       Y15, Y1, Y6
	VMULPS       Y15, Y2, Y12
	VBROADCASTSS peak4Coeffs32<>+12(SB), Y15
	VMULPS       Y15, Y1, Y7
	VMULPS       Y15, Y2, Y13

	TAP32X16(40, 4, 16)
	TAP32X16(36, 8, 32)
	TAP32X16(32, 12, 48)
	TAP32X16(28, 16, 64)
	TAP32X16(24, 20, 80)

	VBROADCASTSS absMask32<>(SB), Y15
	PEAK32MAX(Y4, Y5, Y6, Y7)
	PEAK32MAX(Y10, Y11, Y12, Y13)

	ADDQ $64, SI
	SUBQ $16, CX
	CMPQ CX, $16
	JGE  loop16

rest16:
	CMPQ         CX, $8
	JLT          done16
	VMOVUPS      44(SI), Y1
	VMOVUPS      0(SI), Y2
	VADDPS       Y2, Y1, Y3
	VSUBPS       Y2, Y1, Y1
	VBROADCASTSS peak4Coeffs32<>+0(SB), Y15
	VMULPS       Y15, Y3, Y4
	VBROADCASTSS peak4Coeffs32<>+4(SB), Y15
	VMULPS       Y15, Y3, Y5
	VBROADCASTSS peak4Coeffs32<>+8(SB), Y15
	VMULPS       Y15, Y1, Y6
	VBROADCASTSS peak4Coeffs32<>+12(SB), Y15
	VMULPS       Y15, Y1, Y7
	TAP32X8(40, 4, 16)
	TAP32X8(36, 8, 32)
	TAP32X8(32, 12, 48)
	TAP32X8(28, 16, 64)
	TAP32X8(24, 20, 80)
	VBROADCASTSS absMask32<>(SB), Y15
	PEAK32MAX(Y4, Y5, Y6, Y7)

done16:
	VMAXPS       Y8, Y0, Y0
	VEXTRACTF128 $1, Y0, X1
	VMAXPS       X1, X0, X0
	VPERMILPS    $0x4e, X0, X1
	VMAXPS       X1, X0, X0
	VPERMILPS    $0xb1, X0, X1
	VMAXPS       X1, X0, X0
	VZEROUPPER
	MOVSS        X0, ret+24(FP)
	RET

// peak2Coeffs32 holds the 2× interpolator of peak2Max32Go as float32
// (multiples of 2⁻¹³ below 1, exact): for t = 0…11 h0[t] and h1[t] at
// offset 8·t, broadcast to eight lanes on use.
DATA peak2Coeffs32<>+0(SB)/4, $0x3ae00000
DATA peak2Coeffs32<>+4(SB)/4, $0xbcef0000
DATA peak2Coeffs32<>+8(SB)/4, $0x3c340000
DATA peak2Coeffs32<>+12(SB)/4, $0x3cf00000
DATA peak2Coeffs32<>+16(SB)/4, $0xbca10000
DATA peak2Coeffs32<>+20(SB)/4, $0xbd540000
DATA peak2Coeffs32<>+24(SB)/4, $0x3d080000
DATA peak2Coeffs32<>+28(SB)/4, $0x3db68000
DATA peak2Coeffs32<>+32(SB)/4, $0xbd738000
DATA peak2Coeffs32<>+36(SB)/4, $0xbe2a8000
DATA peak2Coeffs32<>+40(SB)/4, $0x3e0ca000
DATA peak2Coeffs32<>+44(SB)/4, $0x3eee2000
DATA peak2Coeffs32<>+48(SB)/4, $0x3f78e000
DATA peak2Coeffs32<>+52(SB)/4, $0x3f47a000
DATA peak2Coeffs32<>+56(SB)/4, $0xbdd18000
DATA peak2Coeffs32<>+60(SB)/4, $0xbe4d2000
DATA peak2Coeffs32<>+64(SB)/4, $0x3d430000
DATA peak2Coeffs32<>+68(SB)/4, $0x3dd00000
DATA peak2Coeffs32<>+72(SB)/4, $0xbcda0000
DATA peak2Coeffs32<>+76(SB)/4, $0xbd6e8000
DATA peak2Coeffs32<>+80(SB)/4, $0x3c740000
DATA peak2Coeffs32<>+84(SB)/4, $0x3d078000
DATA peak2Coeffs32<>+88(SB)/4, $0xbc080000
DATA peak2Coeffs32<>+92(SB)/4, $0xbc9b0000
GLOBL peak2Coeffs32<>(SB), RODATA|NOPTR, $96

// TAP2X16 adds tap t of both 2× phases for two groups of eight windows:
// y0 += h0[t]·x[11−t], y2 += h1[t]·x[t] (windows 0–7 in Y4, Y5, windows
// 8–15 in Y6, Y7), each coefficient broadcast once for both groups.
#define TAP2X16(t) \
	VBROADCASTSS peak2Coeffs32<>+(8*t)(SB), Y10 \
	VBROADCASTSS peak2Coeffs32<>+(8*t+4)(SB), Y11 \
	VMULPS       (44-4*t)(SI), Y10, Y1 \
	VADDPS       Y1, Y4, Y4 \
	VMULPS       (76-4*t)(SI), Y10, Y2 \
	VADDPS       Y2, Y6, Y6 \
	VMULPS       (4*t)(SI), Y11, Y3 \
	VADDPS       Y3, Y5, Y5 \
	VMULPS       (32+4*t)(SI), Y11, Y9 \
	VADDPS       Y9, Y7, Y7

// TAP2X8 is TAP2X16 for one group of eight windows (Y4, Y5).
#define TAP2X8(t) \
	VBROADCASTSS peak2Coeffs32<>+(8*t)(SB), Y10 \
	VBROADCASTSS peak2Coeffs32<>+(8*t+4)(SB), Y11 \
	VMULPS       (44-4*t)(SI), Y10, Y1 \
	VADDPS       Y1, Y4, Y4 \
	VMULPS       (4*t)(SI), Y11, Y3 \
	VADDPS       Y3, Y5, Y5

// MAX32 clears the sign of v (mask in Y15) and keeps the lane-wise maximum
// in acc (VMAXPS returns its second source, acc, when v is NaN).
#define MAX32(v, acc) \
	VANDPS Y15, v, v \
	VMAXPS acc, v, acc

// func peak2Max32AVX2(w []float32) float32
//
// peak2Max32Go over the first 8·⌊(len(w)−11)/8⌋ windows of w: eight
// windows in the eight lanes, two groups per iteration (loop16: each output
// is a chain of twelve additions, two chains side by side keep the units
// busy), a last group of eight alone. Each lane performs the very
// operations of peak2Max32Go; no fused multiply-adds. Registers: SI window
// start, CX windows left; Y0, Y8 running maxima (from +0), Y15 the mask.
TEXT ·peak2Max32AVX2(SB), NOSPLIT, $0-28
	MOVQ         w_base+0(FP), SI
	MOVQ         w_len+8(FP), CX
	VXORPS       Y0, Y0, Y0
	VXORPS       Y8, Y8, Y8
	VBROADCASTSS absMask32<>(SB), Y15
	SUBQ         $11, CX
	CMPQ         CX, $16
	JLT          rest2

loop2x16:
	VBROADCASTSS peak2Coeffs32<>+0(SB), Y10
	VBROADCASTSS peak2Coeffs32<>+4(SB), Y11
	VMULPS       44(SI), Y10, Y4
	VMULPS       76(SI), Y10, Y6
	VMULPS       0(SI), Y11, Y5
	VMULPS       32(SI), Y11, Y7
	TAP2X16(1)
	TAP2X16(2)
	TAP2X16(3)
	TAP2X16(4)
	TAP2X16(5)
	TAP2X16(6)
	TAP2X16(7)
	TAP2X16(8)
	TAP2X16(9)
	TAP2X16(10)
	TAP2X16(11)
	MAX32(Y4, Y0)
	MAX32(Y5, Y8)
	MAX32(Y6, Y0)
	MAX32(Y7, Y8)

	ADDQ $64, SI
	SUBQ $16, CX
	CMPQ CX, $16
	JGE  loop2x16

rest2:
	CMPQ         CX, $8
	JLT          done2x
	VBROADCASTSS peak2Coeffs32<>+0(SB), Y10
	VBROADCASTSS peak2Coeffs32<>+4(SB), Y11
	VMULPS       44(SI), Y10, Y4
	VMULPS       0(SI), Y11, Y5
	TAP2X8(1)
	TAP2X8(2)
	TAP2X8(3)
	TAP2X8(4)
	TAP2X8(5)
	TAP2X8(6)
	TAP2X8(7)
	TAP2X8(8)
	TAP2X8(9)
	TAP2X8(10)
	TAP2X8(11)
	MAX32(Y4, Y0)
	MAX32(Y5, Y8)

done2x:
	VMAXPS       Y8, Y0, Y0
	VEXTRACTF128 $1, Y0, X1
	VMAXPS       X1, X0, X0
	VPERMILPS    $0x4e, X0, X1
	VMAXPS       X1, X0, X0
	VPERMILPS    $0xb1, X0, X1
	VMAXPS       X1, X0, X0
	VZEROUPPER
	MOVSS        X0, ret+24(FP)
	RET
