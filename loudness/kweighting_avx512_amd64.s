//go:build !purego

#include "textflag.h"
#include "go_asm.h"

// kweightOctMinusTwo is the middle coefficient of the high-pass numerator.
DATA kweightOctMinusTwo<>+0(SB)/8, $-2.0
GLOBL kweightOctMinusTwo<>(SB), RODATA|NOPTR, $8

// KSTEP is one sample of all eight lanes, Energy's operations in its
// order: x the sample, x1 and x2 the two before it; u1, u2 and v1, v2 the
// stages' histories; the new u and v go into u and v, and u2's register
// is left holding fma(−2, u1, u2) (its last use), so the caller rotates
// the histories by naming the registers; e (Z11) gains v². Coefficients
// as in energyOctAVX512's register list.
#define KSTEP(x2, x1, x, u2, u1, u, v2, v1, v) \
	VMULPD       Z4, x2, u \
	VFMADD231PD  Z3, x1, u \
	VFMADD231PD  Z2, x, u \
	VFNMADD231PD Z12, u2, u \
	VFNMADD231PD Z0, u1, u \
	VFMADD231PD  Z14, u1, u2 \
	VADDPD       u2, u, v \
	VFNMADD231PD Z13, v2, v \
	VFNMADD231PD Z1, v1, v \
	VFMADD231PD  v, v, Z11

// func energyOctAVX512(s *kweightOct, in *[8]*float64, n int)
//
// Eight channels in the eight lanes of AVX-512 registers, lane i from
// in[i][0…n−1], each computed exactly as Energy computes it (the fused
// form; VFNMADD231PD computes −(p·q) + r, fma(−p, q, r) bit for bit):
//
//	u = fma(−a1, u1, fma(−a2, u2, fma(b0, x, fma(b1, x1, b2·x2))))
//	v = fma(−c1, v1, fma(−c2, v2, u + fma(−2, u1, u2)))
//	e = fma(v, v, e)
//
// Twenty-four samples per iteration while 24 are left (loop24): three
// times eight samples of each channel loaded as eight rows and transposed
// (unpacks, then two rounds of 128-bit shuffles: three shuffles a
// sample) into eight registers of one sample each, which the sample's
// operations read as x directly. The u and v histories rotate through
// three registers each (u through Z7, Z8, Z18; v through Z9, Z10, Z19;
// the new value written into the register of the value two samples back,
// which fma(−2, u1, u2) and the feedback have just used for the last
// time), so no register is moved, and after 24 samples (a multiple of
// three) every value is back where it started; x1 and x2 are copied to Z5
// and Z6 after each eight. Then three samples per iteration while three
// are left (loop3) and the rest one at a time, where one gather loads
// sample j of all eight channels (the addresses are the eight base
// pointers plus the byte offset in R10; x rotates through Z5, Z6, Z17).
// The loop-carried chains are one fused multiply-add a sample per stage
// and the energy's.
//
// Registers: Z0 a1, Z1 c1, Z2 b0, Z3 b1, Z4 b2, Z12 a2, Z13 c2, Z14 −2;
// Z11 e; Z16 the eight base pointers (SI, DI, R8, R9, R11, R12, R13, BX
// the same for the row loads); Z20–Z31 the rows and their transposition;
// the histories as above. R10 the byte offset of the sample, CX the
// samples left, DX s.
TEXT ·energyOctAVX512(SB), NOSPLIT, $0-24
	MOVQ s+0(FP), DX
	MOVQ in+8(FP), AX
	MOVQ n+16(FP), CX

	VMOVUPD      kweightOct_a1(DX), Z0
	VMOVUPD      kweightOct_c1(DX), Z1
	VMOVUPD      kweightOct_b0(DX), Z2
	VMOVUPD      kweightOct_b1(DX), Z3
	VMOVUPD      kweightOct_b2(DX), Z4
	VMOVUPD      kweightOct_a2(DX), Z12
	VMOVUPD      kweightOct_c2(DX), Z13
	VBROADCASTSD kweightOctMinusTwo<>(SB), Z14
	VMOVUPD      kweightOct_x1(DX), Z5
	VMOVUPD      kweightOct_x2(DX), Z6
	VMOVUPD      kweightOct_u1(DX), Z7
	VMOVUPD      kweightOct_u2(DX), Z8
	VMOVUPD      kweightOct_v1(DX), Z9
	VMOVUPD      kweightOct_v2(DX), Z10
	VMOVDQU64    (AX), Z16
	VPXORQ       Z11, Z11, Z11
	XORQ         R10, R10
	MOVQ         0(AX), SI
	MOVQ         8(AX), DI
	MOVQ         16(AX), R8
	MOVQ         24(AX), R9
	MOVQ         32(AX), R11
	MOVQ         40(AX), R12
	MOVQ         48(AX), R13
	MOVQ         56(AX), BX

loop24:
	CMPQ CX, $24
	JLT  loop3
	// Samples 0…7: one row of eight samples from each channel, transposed.
	VMOVUPD      0(SI)(R10*1), Z20
	VMOVUPD      0(DI)(R10*1), Z21
	VMOVUPD      0(R8)(R10*1), Z22
	VMOVUPD      0(R9)(R10*1), Z23
	VMOVUPD      0(R11)(R10*1), Z24
	VMOVUPD      0(R12)(R10*1), Z25
	VMOVUPD      0(R13)(R10*1), Z26
	VMOVUPD      0(BX)(R10*1), Z27
	VUNPCKLPD    Z21, Z20, Z28
	VUNPCKHPD    Z21, Z20, Z29
	VUNPCKLPD    Z23, Z22, Z30
	VUNPCKHPD    Z23, Z22, Z31
	VUNPCKLPD    Z25, Z24, Z20
	VUNPCKHPD    Z25, Z24, Z21
	VUNPCKLPD    Z27, Z26, Z22
	VUNPCKHPD    Z27, Z26, Z23
	VSHUFF64X2   $0x88, Z30, Z28, Z24
	VSHUFF64X2   $0xDD, Z30, Z28, Z25
	VSHUFF64X2   $0x88, Z22, Z20, Z26
	VSHUFF64X2   $0xDD, Z22, Z20, Z27
	VSHUFF64X2   $0x88, Z31, Z29, Z28
	VSHUFF64X2   $0xDD, Z31, Z29, Z30
	VSHUFF64X2   $0x88, Z23, Z21, Z20
	VSHUFF64X2   $0xDD, Z23, Z21, Z22
	VSHUFF64X2   $0x88, Z26, Z24, Z29
	VSHUFF64X2   $0xDD, Z26, Z24, Z31
	VSHUFF64X2   $0x88, Z27, Z25, Z21
	VSHUFF64X2   $0xDD, Z27, Z25, Z23
	VSHUFF64X2   $0x88, Z20, Z28, Z24
	VSHUFF64X2   $0xDD, Z20, Z28, Z25
	VSHUFF64X2   $0x88, Z22, Z30, Z26
	VSHUFF64X2   $0xDD, Z22, Z30, Z27
	KSTEP(Z6, Z5, Z29, Z8, Z7, Z18, Z10, Z9, Z19)
	KSTEP(Z5, Z29, Z24, Z7, Z18, Z8, Z9, Z19, Z10)
	KSTEP(Z29, Z24, Z21, Z18, Z8, Z7, Z19, Z10, Z9)
	KSTEP(Z24, Z21, Z26, Z8, Z7, Z18, Z10, Z9, Z19)
	KSTEP(Z21, Z26, Z31, Z7, Z18, Z8, Z9, Z19, Z10)
	KSTEP(Z26, Z31, Z25, Z18, Z8, Z7, Z19, Z10, Z9)
	KSTEP(Z31, Z25, Z23, Z8, Z7, Z18, Z10, Z9, Z19)
	KSTEP(Z25, Z23, Z27, Z7, Z18, Z8, Z9, Z19, Z10)
	VMOVAPD      Z27, Z5 // x1
	VMOVAPD      Z23, Z6 // x2
	// Samples 8…15: one row of eight samples from each channel, transposed.
	VMOVUPD      64(SI)(R10*1), Z20
	VMOVUPD      64(DI)(R10*1), Z21
	VMOVUPD      64(R8)(R10*1), Z22
	VMOVUPD      64(R9)(R10*1), Z23
	VMOVUPD      64(R11)(R10*1), Z24
	VMOVUPD      64(R12)(R10*1), Z25
	VMOVUPD      64(R13)(R10*1), Z26
	VMOVUPD      64(BX)(R10*1), Z27
	VUNPCKLPD    Z21, Z20, Z28
	VUNPCKHPD    Z21, Z20, Z29
	VUNPCKLPD    Z23, Z22, Z30
	VUNPCKHPD    Z23, Z22, Z31
	VUNPCKLPD    Z25, Z24, Z20
	VUNPCKHPD    Z25, Z24, Z21
	VUNPCKLPD    Z27, Z26, Z22
	VUNPCKHPD    Z27, Z26, Z23
	VSHUFF64X2   $0x88, Z30, Z28, Z24
	VSHUFF64X2   $0xDD, Z30, Z28, Z25
	VSHUFF64X2   $0x88, Z22, Z20, Z26
	VSHUFF64X2   $0xDD, Z22, Z20, Z27
	VSHUFF64X2   $0x88, Z31, Z29, Z28
	VSHUFF64X2   $0xDD, Z31, Z29, Z30
	VSHUFF64X2   $0x88, Z23, Z21, Z20
	VSHUFF64X2   $0xDD, Z23, Z21, Z22
	VSHUFF64X2   $0x88, Z26, Z24, Z29
	VSHUFF64X2   $0xDD, Z26, Z24, Z31
	VSHUFF64X2   $0x88, Z27, Z25, Z21
	VSHUFF64X2   $0xDD, Z27, Z25, Z23
	VSHUFF64X2   $0x88, Z20, Z28, Z24
	VSHUFF64X2   $0xDD, Z20, Z28, Z25
	VSHUFF64X2   $0x88, Z22, Z30, Z26
	VSHUFF64X2   $0xDD, Z22, Z30, Z27
	KSTEP(Z6, Z5, Z29, Z18, Z8, Z7, Z19, Z10, Z9)
	KSTEP(Z5, Z29, Z24, Z8, Z7, Z18, Z10, Z9, Z19)
	KSTEP(Z29, Z24, Z21, Z7, Z18, Z8, Z9, Z19, Z10)
	KSTEP(Z24, Z21, Z26, Z18, Z8, Z7, Z19, Z10, Z9)
	KSTEP(Z21, Z26, Z31, Z8, Z7, Z18, Z10, Z9, Z19)
	KSTEP(Z26, Z31, Z25, Z7, Z18, Z8, Z9, Z19, Z10)
	KSTEP(Z31, Z25, Z23, Z18, Z8, Z7, Z19, Z10, Z9)
	KSTEP(Z25, Z23, Z27, Z8, Z7, Z18, Z10, Z9, Z19)
	VMOVAPD      Z27, Z5 // x1
	VMOVAPD      Z23, Z6 // x2
	// Samples 16…23: one row of eight samples from each channel, transposed.
	VMOVUPD      128(SI)(R10*1), Z20
	VMOVUPD      128(DI)(R10*1), Z21
	VMOVUPD      128(R8)(R10*1), Z22
	VMOVUPD      128(R9)(R10*1), Z23
	VMOVUPD      128(R11)(R10*1), Z24
	VMOVUPD      128(R12)(R10*1), Z25
	VMOVUPD      128(R13)(R10*1), Z26
	VMOVUPD      128(BX)(R10*1), Z27
	VUNPCKLPD    Z21, Z20, Z28
	VUNPCKHPD    Z21, Z20, Z29
	VUNPCKLPD    Z23, Z22, Z30
	VUNPCKHPD    Z23, Z22, Z31
	VUNPCKLPD    Z25, Z24, Z20
	VUNPCKHPD    Z25, Z24, Z21
	VUNPCKLPD    Z27, Z26, Z22
	VUNPCKHPD    Z27, Z26, Z23
	VSHUFF64X2   $0x88, Z30, Z28, Z24
	VSHUFF64X2   $0xDD, Z30, Z28, Z25
	VSHUFF64X2   $0x88, Z22, Z20, Z26
	VSHUFF64X2   $0xDD, Z22, Z20, Z27
	VSHUFF64X2   $0x88, Z31, Z29, Z28
	VSHUFF64X2   $0xDD, Z31, Z29, Z30
	VSHUFF64X2   $0x88, Z23, Z21, Z20
	VSHUFF64X2   $0xDD, Z23, Z21, Z22
	VSHUFF64X2   $0x88, Z26, Z24, Z29
	VSHUFF64X2   $0xDD, Z26, Z24, Z31
	VSHUFF64X2   $0x88, Z27, Z25, Z21
	VSHUFF64X2   $0xDD, Z27, Z25, Z23
	VSHUFF64X2   $0x88, Z20, Z28, Z24
	VSHUFF64X2   $0xDD, Z20, Z28, Z25
	VSHUFF64X2   $0x88, Z22, Z30, Z26
	VSHUFF64X2   $0xDD, Z22, Z30, Z27
	KSTEP(Z6, Z5, Z29, Z7, Z18, Z8, Z9, Z19, Z10)
	KSTEP(Z5, Z29, Z24, Z18, Z8, Z7, Z19, Z10, Z9)
	KSTEP(Z29, Z24, Z21, Z8, Z7, Z18, Z10, Z9, Z19)
	KSTEP(Z24, Z21, Z26, Z7, Z18, Z8, Z9, Z19, Z10)
	KSTEP(Z21, Z26, Z31, Z18, Z8, Z7, Z19, Z10, Z9)
	KSTEP(Z26, Z31, Z25, Z8, Z7, Z18, Z10, Z9, Z19)
	KSTEP(Z31, Z25, Z23, Z7, Z18, Z8, Z9, Z19, Z10)
	KSTEP(Z25, Z23, Z27, Z18, Z8, Z7, Z19, Z10, Z9)
	VMOVAPD      Z27, Z5 // x1
	VMOVAPD      Z23, Z6 // x2
	ADDQ $192, R10
	SUBQ $24, CX
	JMP  loop24

loop3:
	CMPQ CX, $3
	JLT  tail
	VPXORQ       Z17, Z17, Z17
	KXNORB       K1, K1, K1
	VGATHERQPD   0(R10)(Z16*1), K1, Z17 // x
	KSTEP(Z6, Z5, Z17, Z8, Z7, Z18, Z10, Z9, Z19)
	VPXORQ       Z6, Z6, Z6
	KXNORB       K1, K1, K1
	VGATHERQPD   8(R10)(Z16*1), K1, Z6 // x
	KSTEP(Z5, Z17, Z6, Z7, Z18, Z8, Z9, Z19, Z10)
	VPXORQ       Z5, Z5, Z5
	KXNORB       K1, K1, K1
	VGATHERQPD   16(R10)(Z16*1), K1, Z5 // x
	KSTEP(Z17, Z6, Z5, Z18, Z8, Z7, Z19, Z10, Z9)
	ADDQ $24, R10
	SUBQ $3, CX
	JMP  loop3

tail:
	TESTQ CX, CX
	JZ    done

loop:
	VPXORQ       Z17, Z17, Z17
	KXNORB       K1, K1, K1
	VGATHERQPD   0(R10)(Z16*1), K1, Z17 // x
	KSTEP(Z6, Z5, Z17, Z8, Z7, Z18, Z10, Z9, Z19)
	VMOVAPD      Z5, Z6  // x2 = x1
	VMOVAPD      Z17, Z5 // x1 = x
	VMOVAPD      Z7, Z8  // u2 = u1
	VMOVAPD      Z18, Z7 // u1 = u
	VMOVAPD      Z9, Z10 // v2 = v1
	VMOVAPD      Z19, Z9 // v1 = v
	ADDQ $8, R10
	DECQ CX
	JNZ  loop

done:
	VMOVUPD Z5, kweightOct_x1(DX)
	VMOVUPD Z6, kweightOct_x2(DX)
	VMOVUPD Z7, kweightOct_u1(DX)
	VMOVUPD Z8, kweightOct_u2(DX)
	VMOVUPD Z9, kweightOct_v1(DX)
	VMOVUPD Z10, kweightOct_v2(DX)
	VMOVUPD Z11, kweightOct_e(DX)
	VZEROUPPER
	RET
