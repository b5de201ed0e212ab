//go:build !purego

#include "textflag.h"

// Byte reversal for PSHUFB: lane i takes byte 15-i.
DATA reverse<>+0(SB)/8, $0x08090a0b0c0d0e0f
DATA reverse<>+8(SB)/8, $0x0001020304050607
GLOBL reverse<>(SB), RODATA|NOPTR, $16

// func fold16(p []byte, crc uint16, keys *[2]uint64, out *[16]byte)
TEXT ·fold16(SB), NOSPLIT, $0-48
	MOVQ   p_base+0(FP), SI
	MOVQ   p_len+8(FP), CX
	MOVWQZX crc+24(FP), AX
	MOVQ   keys+32(FP), DX
	MOVQ   out+40(FP), DI
	MOVOU  reverse<>(SB), X7
	MOVOU  (DX), X6 // low: x^128 mod P, high: x^192 mod P

	// X0 = the first 16 bytes as a 128-bit number, crc on its top 16 bits.
	MOVOU  (SI), X0
	PSHUFB X7, X0
	SHLQ   $48, AX
	MOVQ   AX, X1
	PSLLDQ $8, X1
	PXOR   X1, X0
	ADDQ   $16, SI
	SUBQ   $16, CX

loop:
	MOVOU     (SI), X2
	PSHUFB    X7, X2
	MOVO      X0, X1
	PCLMULQDQ $0x11, X6, X0 // H · x^192 mod P
	PCLMULQDQ $0x00, X6, X1 // L · x^128 mod P
	PXOR      X1, X0
	PXOR      X2, X0
	ADDQ      $16, SI
	SUBQ      $16, CX
	JNZ       loop

	PSHUFB X7, X0
	MOVOU  X0, (DI)
	RET
