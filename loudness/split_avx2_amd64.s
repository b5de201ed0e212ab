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
