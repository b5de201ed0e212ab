//go:build !purego

#include "textflag.h"
#include "go_asm.h"

// kweightOctMinusTwo is the middle coefficient of the high-pass numerator.
DATA kweightOctMinusTwo<>+0(SB)/8, $-2.0
GLOBL kweightOctMinusTwo<>(SB), RODATA|NOPTR, $8

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
// One gather loads sample j of all eight channels (the addresses are the
// eight base pointers plus the byte offset in R10). Three samples per
// iteration while three are left (loop3), the histories rotating through
// three registers each (x through Z5, Z6, Z17; u through Z7, Z8, Z18; v
// through Z9, Z10, Z19; the new value written into the register of the
// value two samples back, which fma(−2, u1, u2) and the feedback have
// just used for the last time), so no register is moved; after three
// samples every value is back where it started. The rest one at a time.
// The loop-carried chains are one fused multiply-add a sample per stage
// and the energy's.
//
// Registers: Z0 a1, Z1 c1, Z2 b0, Z3 b1, Z4 b2, Z12 a2, Z13 c2, Z14 −2;
// Z11 e; Z16 the eight base pointers; the histories as above. R10 the byte
// offset of the sample, CX the samples left, DX s.
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

loop3:
	CMPQ CX, $3
	JLT  tail
	VPXORQ       Z17, Z17, Z17
	KXNORB       K1, K1, K1
	VGATHERQPD   0(R10)(Z16*1), K1, Z17 // x
	VMULPD       Z4, Z6, Z18
	VFMADD231PD  Z3, Z5, Z18
	VFMADD231PD  Z2, Z17, Z18
	VFNMADD231PD Z12, Z8, Z18
	VFNMADD231PD Z0, Z7, Z18 // u
	VFMADD231PD  Z14, Z7, Z8 // fma(−2, u1, u2)
	VADDPD       Z8, Z18, Z19
	VFNMADD231PD Z13, Z10, Z19
	VFNMADD231PD Z1, Z9, Z19 // v
	VFMADD231PD  Z19, Z19, Z11 // e = fma(v, v, e)
	VPXORQ       Z6, Z6, Z6
	KXNORB       K1, K1, K1
	VGATHERQPD   8(R10)(Z16*1), K1, Z6 // x
	VMULPD       Z4, Z5, Z8
	VFMADD231PD  Z3, Z17, Z8
	VFMADD231PD  Z2, Z6, Z8
	VFNMADD231PD Z12, Z7, Z8
	VFNMADD231PD Z0, Z18, Z8 // u
	VFMADD231PD  Z14, Z18, Z7 // fma(−2, u1, u2)
	VADDPD       Z7, Z8, Z10
	VFNMADD231PD Z13, Z9, Z10
	VFNMADD231PD Z1, Z19, Z10 // v
	VFMADD231PD  Z10, Z10, Z11 // e = fma(v, v, e)
	VPXORQ       Z5, Z5, Z5
	KXNORB       K1, K1, K1
	VGATHERQPD   16(R10)(Z16*1), K1, Z5 // x
	VMULPD       Z4, Z17, Z7
	VFMADD231PD  Z3, Z6, Z7
	VFMADD231PD  Z2, Z5, Z7
	VFNMADD231PD Z12, Z18, Z7
	VFNMADD231PD Z0, Z8, Z7 // u
	VFMADD231PD  Z14, Z8, Z18 // fma(−2, u1, u2)
	VADDPD       Z18, Z7, Z9
	VFNMADD231PD Z13, Z19, Z9
	VFNMADD231PD Z1, Z10, Z9 // v
	VFMADD231PD  Z9, Z9, Z11 // e = fma(v, v, e)
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
	VMULPD       Z4, Z6, Z18
	VFMADD231PD  Z3, Z5, Z18
	VFMADD231PD  Z2, Z17, Z18
	VFNMADD231PD Z12, Z8, Z18
	VFNMADD231PD Z0, Z7, Z18 // u
	VFMADD231PD  Z14, Z7, Z8 // fma(−2, u1, u2)
	VADDPD       Z8, Z18, Z19
	VFNMADD231PD Z13, Z10, Z19
	VFNMADD231PD Z1, Z9, Z19 // v
	VFMADD231PD  Z19, Z19, Z11 // e = fma(v, v, e)
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
