//go:build !purego

#include "textflag.h"

// The hygiene probes' AVX-512 kernels (see hygiene_kernel.go). The probe
// sums are running sums in frame order, one addition per frame each, so
// their cost is the latency of that addition, and on the project's machine
// a 512-bit addition's is about 3.4 cycles against 2 for a 256-bit one
// (with a Z-register stereo kernel the probes ran at 0.83× their speed
// with the AVX2 one): the sums stay in Y and X registers, and what AVX-512
// buys for them is fewer shuffles (a frame's (l, r, l², r²) from one
// broadcast load and one merge-masked multiply, AVX-512 VL). Z registers
// carry only work that is no chain from frame to frame: the 5.1 fold-down
// of four frames at once and the full-scale test. As in the AVX2 kernels,
// every running sum lives in its own lane and takes one addition per
// frame, in frame order, exactly as the Go loop adds it; products are
// rounded before they are added (no FMA).

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

// Offsets in frameState (TestFrameStateLayout checks them).
#define ST_SUMS 0
#define ST_PAIR 64
#define ST_FULL 264
#define ST_GAINS2 336

// fold51Index holds, for channel c = 0…5 at offset 64·c, the VPERMI2PD
// indices that gather channel c of four 5.1 frames f, g, h, i (24 samples
// in Z10–Z12) as (f f g g h h i i): lanes 0–3 index the table Z10:Z11
// (f at c, g at 6+c), lanes 4–7 the table Z11:Z12 (h at 4+c, i at 10+c).
DATA fold51Index<>+0(SB)/8, $0
DATA fold51Index<>+8(SB)/8, $0
DATA fold51Index<>+16(SB)/8, $6
DATA fold51Index<>+24(SB)/8, $6
DATA fold51Index<>+32(SB)/8, $4
DATA fold51Index<>+40(SB)/8, $4
DATA fold51Index<>+48(SB)/8, $10
DATA fold51Index<>+56(SB)/8, $10
DATA fold51Index<>+64(SB)/8, $1
DATA fold51Index<>+72(SB)/8, $1
DATA fold51Index<>+80(SB)/8, $7
DATA fold51Index<>+88(SB)/8, $7
DATA fold51Index<>+96(SB)/8, $5
DATA fold51Index<>+104(SB)/8, $5
DATA fold51Index<>+112(SB)/8, $11
DATA fold51Index<>+120(SB)/8, $11
DATA fold51Index<>+128(SB)/8, $2
DATA fold51Index<>+136(SB)/8, $2
DATA fold51Index<>+144(SB)/8, $8
DATA fold51Index<>+152(SB)/8, $8
DATA fold51Index<>+160(SB)/8, $6
DATA fold51Index<>+168(SB)/8, $6
DATA fold51Index<>+176(SB)/8, $12
DATA fold51Index<>+184(SB)/8, $12
DATA fold51Index<>+192(SB)/8, $3
DATA fold51Index<>+200(SB)/8, $3
DATA fold51Index<>+208(SB)/8, $9
DATA fold51Index<>+216(SB)/8, $9
DATA fold51Index<>+224(SB)/8, $7
DATA fold51Index<>+232(SB)/8, $7
DATA fold51Index<>+240(SB)/8, $13
DATA fold51Index<>+248(SB)/8, $13
DATA fold51Index<>+256(SB)/8, $4
DATA fold51Index<>+264(SB)/8, $4
DATA fold51Index<>+272(SB)/8, $10
DATA fold51Index<>+280(SB)/8, $10
DATA fold51Index<>+288(SB)/8, $8
DATA fold51Index<>+296(SB)/8, $8
DATA fold51Index<>+304(SB)/8, $14
DATA fold51Index<>+312(SB)/8, $14
DATA fold51Index<>+320(SB)/8, $5
DATA fold51Index<>+328(SB)/8, $5
DATA fold51Index<>+336(SB)/8, $11
DATA fold51Index<>+344(SB)/8, $11
DATA fold51Index<>+352(SB)/8, $9
DATA fold51Index<>+360(SB)/8, $9
DATA fold51Index<>+368(SB)/8, $15
DATA fold51Index<>+376(SB)/8, $15
GLOBL fold51Index<>(SB), RODATA|NOPTR, $384

// FRAME51 adds the 5.1 frame at off(SI) to its running sums: channels 0–3
// into Y0 and 4–5 into X1; the L/R pair (channels 0 and 1) as FRAMEVL
// into Y2 = (sl, sr, sll, srr) and X3 = slr.
#define FRAME51(off) \
	VADDPD         off(SI), Y0, Y0 \
	VADDPD         (off+32)(SI), X1, X1 \
	VBROADCASTF128 off(SI), Y7 \
	VMULPD         Y7, Y7, K3, Y7 \
	VADDPD         Y7, Y2, Y2 \
	VMULSD         (off+8)(SI), X7, X8 \
	VADDSD         X8, X3, X3

// FOLD51 adds channel c's products, gain times sample, to the four
// frames' (Lo, Ro) in Z13: the channel's samples gathered into D by two
// permutes (fold51Index), its gains (Lo, Ro four times) in G.
#define FOLD51(c, G, D) \
	VMOVDQU64 fold51Index<>+(64*c)(SB), D \
	VPERMI2PD Z11, Z10, K1, D \
	VPERMI2PD Z12, Z11, K2, D \
	VMULPD    D, G, Z9 \
	VADDPD    Z9, Z13, Z13

// func anyStretch51AVX512(buf, out []float64, frames int, st *frameState) bool
//
// anyStretchGo for 5.1 with L, R as channels 0, 1 and the Lo/Ro fold-down
// (st.channels = 6, st.left = 0, st.right = 1, out 2·frames long), for
// frames a positive multiple of 4: four frames per step, each running sum
// still adding frame f before frame f+1. The fold-down of the four frames
// is made in Z registers (lanes Lo, Ro of frames f, g, h, i), each
// channel's products added from 0 in channel order (FOLD51); the
// full-scale test takes the four frames' 24 samples in three Z registers
// (Z5 the largest bit pattern of |x|, compared with full at the end);
// |l−r| of the four frames from the fold-down's gathered L and R (Z22,
// Z23: each frame's value twice), into the running maxima Z4 (every
// lane; the maximum is exact in any order, and NaN is never taken, as in
// Go). Registers: SI buf, DI out, CX frames left, BX st; Z16–Z21 the
// gains; Z14 the mask of all but the sign bit; K1 lanes 0–3, K2 lanes
// 4–7, K3 lanes 2–3.
TEXT ·anyStretch51AVX512(SB), NOSPLIT, $0-65
	MOVQ            buf_base+0(FP), SI
	MOVQ            out_base+24(FP), DI
	MOVQ            frames+48(FP), CX
	MOVQ            st+56(FP), BX
	MOVL            $0x0f, AX
	KMOVB           AX, K1
	MOVL            $0xf0, AX
	KMOVB           AX, K2
	MOVL            $0x0c, AX
	KMOVB           AX, K3
	MOVQ            $0x7fffffffffffffff, AX
	VPBROADCASTQ    AX, Z14
	VBROADCASTF64X4 (ST_GAINS2+0)(BX), Z16
	VBROADCASTF64X4 (ST_GAINS2+32)(BX), Z17
	VBROADCASTF64X4 (ST_GAINS2+64)(BX), Z18
	VBROADCASTF64X4 (ST_GAINS2+96)(BX), Z19
	VBROADCASTF64X4 (ST_GAINS2+128)(BX), Z20
	VBROADCASTF64X4 (ST_GAINS2+160)(BX), Z21
	VMOVUPD         ST_SUMS(BX), Y0
	VMOVUPD         (ST_SUMS+32)(BX), X1
	VMOVUPD         ST_PAIR(BX), Y2
	VMOVSD          (ST_PAIR+32)(BX), X3
	VBROADCASTSD    (ST_PAIR+40)(BX), Z4
	VPXORQ          Z5, Z5, Z5

four51:
	VMOVUPD (SI), Z10         // f0…f5 g0 g1
	VMOVUPD 64(SI), Z11       // g2…g5 h0…h3
	VMOVUPD 128(SI), Z12      // h4 h5 i0…i5
	VPANDQ  Z14, Z10, Z9      // bits of |x|, all 24 samples
	VPMAXUQ Z9, Z5, Z5
	VPANDQ  Z14, Z11, Z9
	VPMAXUQ Z9, Z5, Z5
	VPANDQ  Z14, Z12, Z9
	VPMAXUQ Z9, Z5, Z5
	FRAME51(0)
	FRAME51(48)
	FRAME51(96)
	FRAME51(144)
	VPXORQ  Z13, Z13, Z13
	FOLD51(0, Z16, Z22)       // Z22 = L of the four frames, each twice
	FOLD51(1, Z17, Z23)       // Z23 = R
	FOLD51(2, Z18, Z15)
	FOLD51(3, Z19, Z15)
	FOLD51(4, Z20, Z15)
	FOLD51(5, Z21, Z15)
	VSUBPD  Z23, Z22, Z24     // l−r
	VANDPD  Z14, Z24, Z24
	VMAXPD  Z4, Z24, Z4       // |l−r| > md ? |l−r| : md
	VMOVUPD Z13, (DI)
	ADDQ    $64, DI
	ADDQ    $192, SI
	SUBQ    $4, CX
	JGT     four51

	VEXTRACTF64X4 $1, Z4, Y6
	VMAXPD        Y6, Y4, Y4
	VEXTRACTF128  $1, Y4, X6
	VMAXPD        X6, X4, X4
	VPERMILPD     $1, X4, X6
	VMAXPD        X6, X4, X4
	VMOVUPD      Y0, ST_SUMS(BX)
	VMOVUPD      X1, (ST_SUMS+32)(BX)
	VMOVUPD      Y2, ST_PAIR(BX)
	VMOVSD       X3, (ST_PAIR+32)(BX)
	VMOVSD       X4, (ST_PAIR+40)(BX)
	MOVQ         ST_FULL(BX), AX
	VPBROADCASTQ AX, Z15
	VPCMPUQ      $5, Z15, Z5, K4 // |x| bits ≥ full
	KORTESTB     K4, K4
	SETNE        ret+64(FP)
	VZEROUPPER
	RET
