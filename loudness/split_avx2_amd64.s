//go:build !purego

#include "textflag.h"

// The fill and split kernels: one pass over the samples that writes each
// channel's true-peak input (float64), its float32 copy and, per block of
// 32 samples (skipRun), the largest bit pattern of |x| over the block and
// over its last 12 samples (tailLen), which peakRuns's skip test combines
// into run maxima. Every output is a copy, an exact conversion or an
// integer maximum: the Go twins' (TruePeak.fillGo, Meter.split6Go) bits.

// MAXBITS sets acc to the lane-wise larger of acc and v as signed 64-bit
// integers (the bit patterns of magnitudes, sign bit cleared), using tmp.
#define MAXBITS(v, acc, tmp) \
	VPCMPGTQ  acc, v, tmp \
	VPBLENDVB tmp, v, acc, acc

// BLOCKOUT stores at mem the largest lane of the block maxima B and then
// the largest lane of the tail maxima T (two uint64), using a, c as
// scratch (xa is a's X name); B is clobbered.
#define BLOCKOUT(B, T, a, xa, c, mem) \
	VPERM2I128 $0x20, T, B, a \
	VPERM2I128 $0x31, T, B, c \
	MAXBITS(c, a, B) \
	VPSHUFD    $0x4e, a, c \
	MAXBITS(c, a, B) \
	VPERMQ     $0x08, a, a \
	VMOVDQU    xa, mem

// TAILOF sets T to the lane-wise maxima of |x| over the 12 float64 values
// that end at end(base) (the block's last three registers, just stored),
// with mask M and scratch tmp, v.
#define TAILOF(base, M, T, v, tmp) \
	VPAND -96(base), M, T \
	VPAND -64(base), M, v \
	MAXBITS(v, T, tmp) \
	VPAND -32(base), M, v \
	MAXBITS(v, T, tmp)

// FILL4 stores the four samples in Y0 at o64(DI) and as float32 at
// o32(DX), and raises the block maxima Y8 by their magnitudes.
#define FILL4(o64, o32) \
	VMOVUPD    Y0, o64(DI) \
	VCVTPD2PSY Y0, X1 \
	VMOVUPS    X1, o32(DX) \
	VPAND      Y15, Y0, Y0 \
	MAXBITS(Y0, Y8, Y2)

// UNIT4 is FILL4 of four consecutive samples at o64(SI).
#define UNIT4(o64, o32) \
	VMOVUPD o64(SI), Y0 \
	FILL4(o64, o32)

// STRIDED4 is FILL4 of the samples at SI, SI+AX, SI+2·AX, SI+R11
// (R11 = 3·AX), and moves SI on by 4·AX.
#define STRIDED4(o64, o32) \
	VMOVSD      (SI), X0 \
	VMOVHPD     (SI)(AX*1), X0, X0 \
	VMOVSD      (SI)(AX*2), X1 \
	VMOVHPD     (SI)(R11*1), X1, X1 \
	VINSERTF128 $1, X1, Y0, Y0 \
	LEAQ        (SI)(AX*4), SI \
	FILL4(o64, o32)

// func fillAVX2(src *float64, stride, blocks int, dst *float64, dst32 *float32, out *[2]uint64)
//
// For blocks·32 samples src[0], src[stride bytes], …: dst[i] = x, dst32[i]
// = float32(x) (round to nearest even, as Go's conversion), and out[k] =
// {max bits of |x| over block k, over its last 12}. Registers: SI source,
// AX stride, R11 3·stride, DI dst, DX dst32, BX out, CX blocks left; Y15
// the mask of all but the sign bit; Y8 the block's maxima, Y3 its tail's.
#define FILLBODY \
	LEAQ         (AX)(AX*2), R11 \
	MOVQ         $0x7fffffffffffffff, R9 \
	MOVQ         R9, X15 \
	VPBROADCASTQ X15, Y15 \
	TESTQ        CX, CX \
	JZ           donefill \
	CMPQ         AX, $8 \
	JNE          strided \
unit: \
	VPXOR Y8, Y8, Y8 \
	UNIT4(0, 0) \
	UNIT4(32, 16) \
	UNIT4(64, 32) \
	UNIT4(96, 48) \
	UNIT4(128, 64) \
	UNIT4(160, 80) \
	UNIT4(192, 96) \
	UNIT4(224, 112) \
	ADDQ  $256, SI \
	ADDQ  $256, DI \
	ADDQ  $128, DX \
	TAILOF(DI, Y15, Y3, Y4, Y2) \
	BLOCKOUT(Y8, Y3, Y4, X4, Y5, (BX)) \
	ADDQ  $16, BX \
	DECQ  CX \
	JNZ   unit \
	JMP   donefill \
strided: \
	VPXOR Y8, Y8, Y8 \
	STRIDED4(0, 0) \
	STRIDED4(32, 16) \
	STRIDED4(64, 32) \
	STRIDED4(96, 48) \
	STRIDED4(128, 64) \
	STRIDED4(160, 80) \
	STRIDED4(192, 96) \
	STRIDED4(224, 112) \
	ADDQ  $256, DI \
	ADDQ  $128, DX \
	TAILOF(DI, Y15, Y3, Y4, Y2) \
	BLOCKOUT(Y8, Y3, Y4, X4, Y5, (BX)) \
	ADDQ  $16, BX \
	DECQ  CX \
	JNZ   strided \
donefill: \
	VZEROUPPER \
	RET

TEXT ·fillAVX2(SB), NOSPLIT, $0-48
	MOVQ         src+0(FP), SI
	MOVQ         stride+8(FP), AX
	MOVQ         blocks+16(FP), CX
	MOVQ         dst+24(FP), DI
	MOVQ         dst32+32(FP), DX
	MOVQ         out+40(FP), BX
	FILLBODY

// STEREO4 de-interleaves four stereo frames at f(SI) (f2 = f+32) into
// o64(DI), o64(DX) and as float32 into o32(R8), o32(R9), and raises the
// block maxima Y8 (left) and Y9 (right).
#define STEREO4(f, f2, o64, o32) \
	VMOVUPD    f(SI), Y0 \
	VMOVUPD    f2(SI), Y1 \
	VUNPCKLPD  Y1, Y0, Y2 \
	VUNPCKHPD  Y1, Y0, Y3 \
	VPERMPD    $0xD8, Y2, Y2 \
	VPERMPD    $0xD8, Y3, Y3 \
	VMOVUPD    Y2, o64(DI) \
	VMOVUPD    Y3, o64(DX) \
	VCVTPD2PSY Y2, X4 \
	VCVTPD2PSY Y3, X5 \
	VMOVUPS    X4, o32(R8) \
	VMOVUPS    X5, o32(R9) \
	VPAND      Y15, Y2, Y2 \
	MAXBITS(Y2, Y8, Y6) \
	VPAND      Y15, Y3, Y3 \
	MAXBITS(Y3, Y9, Y7)

// func splitStereoAVX2(frames *float64, blocks int, l, r *float64, l32, r32 *float32, lb, rb *[2]uint64)
//
// De-interleaves blocks·32 stereo frames into l and r, their float32
// values into l32 and r32, and each channel's block and tail maxima into
// lb[k] and rb[k], as fillGo does channel by channel (L0 R0 L1 R1 … at
// frames: the left channel is stride 2 from frames[0], the right from
// frames[1]). Registers: SI frames, DI l, DX r, R8 l32, R9 r32, BX lb, R10
// rb, CX blocks left; Y15 the sign mask; Y8, Y9 the block maxima.
#define STEREOBODY \
	MOVQ         $0x7fffffffffffffff, AX \
	MOVQ         AX, X15 \
	VPBROADCASTQ X15, Y15 \
	TESTQ        CX, CX \
	JZ           donestereo \
stereo: \
	VPXOR   Y8, Y8, Y8 \
	VPXOR   Y9, Y9, Y9 \
	STEREO4(0, 32, 0, 0) \
	STEREO4(64, 96, 32, 16) \
	STEREO4(128, 160, 64, 32) \
	STEREO4(192, 224, 96, 48) \
	STEREO4(256, 288, 128, 64) \
	STEREO4(320, 352, 160, 80) \
	STEREO4(384, 416, 192, 96) \
	STEREO4(448, 480, 224, 112) \
	ADDQ    $512, SI \
	ADDQ    $256, DI \
	ADDQ    $256, DX \
	ADDQ    $128, R8 \
	ADDQ    $128, R9 \
	TAILOF(DI, Y15, Y3, Y4, Y2) \
	BLOCKOUT(Y8, Y3, Y4, X4, Y5, (BX)) \
	TAILOF(DX, Y15, Y3, Y4, Y2) \
	BLOCKOUT(Y9, Y3, Y4, X4, Y5, (R10)) \
	ADDQ    $16, BX \
	ADDQ    $16, R10 \
	DECQ    CX \
	JNZ     stereo \
donestereo: \
	VZEROUPPER \
	RET

TEXT ·splitStereoAVX2(SB), NOSPLIT, $0-64
	MOVQ         frames+0(FP), SI
	MOVQ         blocks+8(FP), CX
	MOVQ         l+16(FP), DI
	MOVQ         r+24(FP), DX
	MOVQ         l32+32(FP), R8
	MOVQ         r32+40(FP), R9
	MOVQ         lb+48(FP), BX
	MOVQ         rb+56(FP), R10
	STEREOBODY

// PAIR6 stores two de-interleaved channels (lo, hi: the four frames'
// values of each; xhi is hi's X name) at (d0) and (d1), their float32
// values at the pointers at o0(R13) and o1(R13), and raises their block
// maxima m0, m1. BX is the frame index; AX is scratch.
#define PAIR6(lo, hi, xhi, d0, d1, o0, o1, m0, m1) \
	VUNPCKLPD  hi, lo, Y8 \
	VUNPCKHPD  hi, lo, lo \
	VMOVUPD    Y8, (d0)(BX*8) \
	VMOVUPD    lo, (d1)(BX*8) \
	MOVQ       o0(R13), AX \
	VCVTPD2PSY Y8, xhi \
	VMOVUPS    xhi, (AX)(BX*4) \
	MOVQ       o1(R13), AX \
	VCVTPD2PSY lo, xhi \
	VMOVUPS    xhi, (AX)(BX*4) \
	VPAND      Y9, Y8, Y8 \
	MAXBITS(Y8, m0, hi) \
	VPAND      Y9, lo, lo \
	MAXBITS(lo, m1, hi)

// OUT6 stores channel c's block and tail maxima (block maxima in m, the
// channel's float64 output at d) at its out pointer o(R13) plus DX, the
// block's byte offset; Y0…Y3, AX scratch.
#define OUT6(m, d, o) \
	LEAQ (d)(BX*8), AX \
	TAILOF(AX, Y9, Y0, Y1, Y2) \
	MOVQ o(R13), AX \
	BLOCKOUT(m, Y0, Y1, X1, Y3, (AX)(DX*1))

// func split6AVX2(frames *float64, blocks int, dst *split6Dst)
//
// De-interleaves blocks·32 frames of six channels into dst.x[c], their
// float32 values into dst.x32[c] and each channel's block and tail maxima
// into dst.blocks[c][k], as fillGo does channel by channel. Four frames are
// six registers A…F:
//
//	A = f0c0 f0c1 f0c2 f0c3   B = f0c4 f0c5 f1c0 f1c1   C = f1c2 f1c3 f1c4 f1c5
//	D = f2c0 f2c1 f2c2 f2c3   E = f2c4 f2c5 f3c0 f3c1   F = f3c2 f3c3 f3c4 f3c5
//
// and [A.lo D.lo] with [B.hi E.hi] interleave into channels 0 and 1,
// [A.hi D.hi] with [C.lo F.lo] into 2 and 3, [B.lo E.lo] with [C.hi F.hi]
// into 4 and 5. Registers: SI frames, BX frame index, CX the index where
// the blocks end; DI, R8…R12 the six float64 outputs; R13 dst (the float32
// outputs at 48 + 8c, the block maxima at 96 + 8c); AX, DX scratch; Y9 the
// mask of all but the sign bit; Y10…Y15 the block maxima.
#define SPLIT6BODY \
	MOVQ         0(R13), DI \
	MOVQ         8(R13), R8 \
	MOVQ         16(R13), R9 \
	MOVQ         24(R13), R10 \
	MOVQ         32(R13), R11 \
	MOVQ         40(R13), R12 \
	SHLQ         $5, CX \
	MOVQ         $0x7fffffffffffffff, AX \
	MOVQ         AX, X9 \
	VPBROADCASTQ X9, Y9 \
	XORQ         BX, BX \
	CMPQ         BX, CX \
	JGE          done6 \
block6: \
	VPXOR Y10, Y10, Y10 \
	VPXOR Y11, Y11, Y11 \
	VPXOR Y12, Y12, Y12 \
	VPXOR Y13, Y13, Y13 \
	VPXOR Y14, Y14, Y14 \
	VPXOR Y15, Y15, Y15 \
loop6: \
	VMOVUPD    (SI), Y0 \
	VMOVUPD    32(SI), Y1 \
	VMOVUPD    64(SI), Y2 \
	VMOVUPD    96(SI), Y3 \
	VMOVUPD    128(SI), Y4 \
	VMOVUPD    160(SI), Y5 \
	VPERM2F128 $0x20, Y3, Y0, Y6 \
	VPERM2F128 $0x31, Y4, Y1, Y7 \
	PAIR6(Y6, Y7, X7, DI, R8, 48, 56, Y10, Y11) \
	VPERM2F128 $0x31, Y3, Y0, Y6 \
	VPERM2F128 $0x20, Y5, Y2, Y7 \
	PAIR6(Y6, Y7, X7, R9, R10, 64, 72, Y12, Y13) \
	VPERM2F128 $0x20, Y4, Y1, Y6 \
	VPERM2F128 $0x31, Y5, Y2, Y7 \
	PAIR6(Y6, Y7, X7, R11, R12, 80, 88, Y14, Y15) \
	ADDQ       $192, SI \
	ADDQ       $4, BX \
	TESTQ      $31, BX \
	JNZ        loop6 \
	MOVQ BX, DX \
	SHRQ $1, DX \
	SUBQ $16, DX \
	OUT6(Y10, DI, 96) \
	OUT6(Y11, R8, 104) \
	OUT6(Y12, R9, 112) \
	OUT6(Y13, R10, 120) \
	OUT6(Y14, R11, 128) \
	OUT6(Y15, R12, 136) \
	CMPQ BX, CX \
	JLT  block6 \
done6: \
	VZEROUPPER \
	RET

TEXT ·split6AVX2(SB), NOSPLIT, $0-24
	MOVQ         frames+0(FP), SI
	MOVQ         blocks+8(FP), CX
	MOVQ         dst+16(FP), R13
	SPLIT6BODY

// The same kernels for the avx512 set: the lane-wise maxima by VPMAXUQ
// (AVX-512 F and VL, on Y registers), one instruction where AVX2 needs a
// comparison and a blend. The bit patterns have their sign bit cleared, so
// unsigned and signed order agree: the same maxima, bit for bit.
#undef MAXBITS
#define MAXBITS(v, acc, tmp) VPMAXUQ v, acc, acc

// func fillAVX512(src *float64, stride, blocks int, dst *float64, dst32 *float32, out *[2]uint64)
TEXT ·fillAVX512(SB), NOSPLIT, $0-48
	MOVQ         src+0(FP), SI
	MOVQ         stride+8(FP), AX
	MOVQ         blocks+16(FP), CX
	MOVQ         dst+24(FP), DI
	MOVQ         dst32+32(FP), DX
	MOVQ         out+40(FP), BX
	FILLBODY

// func splitStereoAVX512(frames *float64, blocks int, l, r *float64, l32, r32 *float32, lb, rb *[2]uint64)
TEXT ·splitStereoAVX512(SB), NOSPLIT, $0-64
	MOVQ         frames+0(FP), SI
	MOVQ         blocks+8(FP), CX
	MOVQ         l+16(FP), DI
	MOVQ         r+24(FP), DX
	MOVQ         l32+32(FP), R8
	MOVQ         r32+40(FP), R9
	MOVQ         lb+48(FP), BX
	MOVQ         rb+56(FP), R10
	STEREOBODY

// func split6AVX512(frames *float64, blocks int, dst *split6Dst)
TEXT ·split6AVX512(SB), NOSPLIT, $0-24
	MOVQ         frames+0(FP), SI
	MOVQ         blocks+8(FP), CX
	MOVQ         dst+16(FP), R13
	SPLIT6BODY
