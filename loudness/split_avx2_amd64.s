//go:build !purego

#include "textflag.h"

// REDUCE leaves in AX the largest of the four 64-bit lanes of Y (as signed
// integers, which the cleared sign bit makes non-negative), using X13 and
// X14 as scratch.
#define REDUCE(Y, X) \
	VEXTRACTI128 $1, Y, X13 \
	VPCMPGTQ     X, X13, X14 \
	VPBLENDVB    X14, X13, X, X \
	VPSHUFD      $0x4e, X, X13 \
	VPCMPGTQ     X, X13, X14 \
	VPBLENDVB    X14, X13, X, X \
	MOVQ         X, AX

// func splitStereoAVX2(frames, l, r []float64) (pl, pr uint64)
//
// De-interleaves the first 4·⌊len(l)/4⌋ stereo frames of frames into l and
// r and returns the largest bit pattern of |x| of each channel over them
// (maxAbsBitsGo's order). Registers: SI frames, DI l, DX r, CX frames
// left; Y15 the mask of all but the sign bit; Y8, Y9 the running maxima.
TEXT ·splitStereoAVX2(SB), NOSPLIT, $0-88
	MOVQ         frames_base+0(FP), SI
	MOVQ         l_base+24(FP), DI
	MOVQ         l_len+32(FP), CX
	MOVQ         r_base+48(FP), DX
	MOVQ         $0x7fffffffffffffff, AX
	MOVQ         AX, X15
	VPBROADCASTQ X15, Y15
	VPXOR        Y8, Y8, Y8
	VPXOR        Y9, Y9, Y9
	CMPQ         CX, $4
	JLT          done

loop:
	VMOVUPD   (SI), Y0          // L0 R0 L1 R1
	VMOVUPD   32(SI), Y1        // L2 R2 L3 R3
	VUNPCKLPD Y1, Y0, Y2        // L0 L2 L1 L3
	VUNPCKHPD Y1, Y0, Y3        // R0 R2 R1 R3
	VPERMPD   $0xD8, Y2, Y2     // L0 L1 L2 L3
	VPERMPD   $0xD8, Y3, Y3     // R0 R1 R2 R3
	VMOVUPD   Y2, (DI)
	VMOVUPD   Y3, (DX)
	VPAND     Y15, Y2, Y4
	VPCMPGTQ  Y8, Y4, Y6
	VPBLENDVB Y6, Y4, Y8, Y8
	VPAND     Y15, Y3, Y5
	VPCMPGTQ  Y9, Y5, Y7
	VPBLENDVB Y7, Y5, Y9, Y9
	ADDQ      $64, SI
	ADDQ      $32, DI
	ADDQ      $32, DX
	SUBQ      $4, CX
	CMPQ      CX, $4
	JGE       loop

done:
	REDUCE(Y8, X8)
	MOVQ AX, pl+72(FP)
	REDUCE(Y9, X9)
	MOVQ AX, pr+80(FP)
	VZEROUPPER
	RET

// REDUCEQ stores at off(DX) the largest of the four 64-bit lanes of Y (as
// signed integers), using X0 and X1 as scratch.
#define REDUCEQ(Y, X, off) \
	VEXTRACTI128 $1, Y, X0 \
	VPCMPGTQ     X, X0, X1 \
	VPBLENDVB    X1, X0, X, X \
	VPSHUFD      $0x4e, X, X0 \
	VPCMPGTQ     X, X0, X1 \
	VPBLENDVB    X1, X0, X, X \
	MOVQ         X, off(DX)

// PAIR6 stores two de-interleaved channels (lo, hi: the four frames'
// values of each) at (d0) and (d1) and raises their maxima m0, m1.
#define PAIR6(lo, hi, d0, d1, m0, m1) \
	VUNPCKLPD hi, lo, Y8 \
	VUNPCKHPD hi, lo, lo \
	VMOVUPD   Y8, (d0)(BX*8) \
	VMOVUPD   lo, (d1)(BX*8) \
	VPAND     Y9, Y8, Y8 \
	VPCMPGTQ  m0, Y8, hi \
	VPBLENDVB hi, Y8, m0, m0 \
	VPAND     Y9, lo, lo \
	VPCMPGTQ  m1, lo, hi \
	VPBLENDVB hi, lo, m1, m1

// func split6AVX2(frames []float64, dst *[6]*float64, n int, peaks *[6]uint64)
//
// De-interleaves the first 4·⌊n/4⌋ frames of six channels into the six
// arrays of dst and stores in peaks the largest bit pattern of |x| of each
// channel over them. Four frames are six registers A…F:
//
//	A = f0c0 f0c1 f0c2 f0c3   B = f0c4 f0c5 f1c0 f1c1   C = f1c2 f1c3 f1c4 f1c5
//	D = f2c0 f2c1 f2c2 f2c3   E = f2c4 f2c5 f3c0 f3c1   F = f3c2 f3c3 f3c4 f3c5
//
// and [A.lo D.lo] with [B.hi E.hi] interleave into channels 0 and 1,
// [A.hi D.hi] with [C.lo F.lo] into 2 and 3, [B.lo E.lo] with [C.hi F.hi]
// into 4 and 5. Registers: SI frames, BX frame index, CX n rounded down to
// four; DI, R8…R12 the six outputs; Y9 the mask of all but the sign bit;
// Y10…Y15 the running maxima.
TEXT ·split6AVX2(SB), NOSPLIT, $0-48
	MOVQ         frames_base+0(FP), SI
	MOVQ         dst+24(FP), DX
	MOVQ         0(DX), DI
	MOVQ         8(DX), R8
	MOVQ         16(DX), R9
	MOVQ         24(DX), R10
	MOVQ         32(DX), R11
	MOVQ         40(DX), R12
	MOVQ         n+32(FP), CX
	ANDQ         $-4, CX
	MOVQ         $0x7fffffffffffffff, AX
	MOVQ         AX, X9
	VPBROADCASTQ X9, Y9
	VPXOR        Y10, Y10, Y10
	VPXOR        Y11, Y11, Y11
	VPXOR        Y12, Y12, Y12
	VPXOR        Y13, Y13, Y13
	VPXOR        Y14, Y14, Y14
	VPXOR        Y15, Y15, Y15
	XORQ         BX, BX
	CMPQ         BX, CX
	JGE          done6

loop6:
	VMOVUPD    (SI), Y0
	VMOVUPD    32(SI), Y1
	VMOVUPD    64(SI), Y2
	VMOVUPD    96(SI), Y3
	VMOVUPD    128(SI), Y4
	VMOVUPD    160(SI), Y5
	VPERM2F128 $0x20, Y3, Y0, Y6 // A.lo D.lo
	VPERM2F128 $0x31, Y4, Y1, Y7 // B.hi E.hi
	PAIR6(Y6, Y7, DI, R8, Y10, Y11)
	VPERM2F128 $0x31, Y3, Y0, Y6 // A.hi D.hi
	VPERM2F128 $0x20, Y5, Y2, Y7 // C.lo F.lo
	PAIR6(Y6, Y7, R9, R10, Y12, Y13)
	VPERM2F128 $0x20, Y4, Y1, Y6 // B.lo E.lo
	VPERM2F128 $0x31, Y5, Y2, Y7 // C.hi F.hi
	PAIR6(Y6, Y7, R11, R12, Y14, Y15)
	ADDQ       $192, SI
	ADDQ       $4, BX
	CMPQ       BX, CX
	JLT        loop6

done6:
	MOVQ peaks+40(FP), DX
	REDUCEQ(Y10, X10, 0)
	REDUCEQ(Y11, X11, 8)
	REDUCEQ(Y12, X12, 16)
	REDUCEQ(Y13, X13, 24)
	REDUCEQ(Y14, X14, 32)
	REDUCEQ(Y15, X15, 40)
	VZEROUPPER
	RET
