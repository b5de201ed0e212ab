//go:build !purego

#include "textflag.h"

// func riceRunBMI2(dst []int32, data []byte, acc uint64, n uint, pos int, k uint) (int, uint64, uint, int)
//
// Registers: DI dst, R8 len(dst), SI data, R9 len(data)-8 (the last pos
// an eight-byte load may start at), AX acc, BX n, CX pos, DX k, R11 63-k,
// R10 i; R12, R13, R14 scratch. See riceRunGo for the algorithm.
TEXT ·riceRunBMI2(SB), NOSPLIT, $0-112
	MOVQ dst_base+0(FP), DI
	MOVQ dst_len+8(FP), R8
	MOVQ data_base+24(FP), SI
	MOVQ data_len+32(FP), R9
	SUBQ $8, R9
	MOVQ acc+48(FP), AX
	MOVQ n+56(FP), BX
	MOVQ pos+64(FP), CX
	MOVQ k+72(FP), DX
	MOVQ $63, R11
	SUBQ DX, R11
	XORQ R10, R10

loop:
	CMPQ R10, R8
	JGE  done
	CMPQ BX, $32
	JAE  code
	CMPQ CX, R9
	JGT  done

	// acc |= bigEndian64(data[pos:]) >> n; pos += (63-n)/8; n |= 56
	MOVQ   (SI)(CX*1), R12
	BSWAPQ R12
	SHRXQ  BX, R12, R12
	ORQ    R12, AX
	MOVQ   $63, R12
	SUBQ   BX, R12
	SHRQ   $3, R12
	ADDQ   R12, CX
	ORQ    $56, BX

code:
	LZCNTQ AX, R12          // lz, 64 when acc is 0
	LEAQ   1(R12)(DX*1), R13 // total = lz + 1 + k
	CMPQ   R13, BX
	JA     done

	SHLXQ R12, AX, R14 // acc << lz: the one bit on top
	SHRXQ R11, R14, R14 // >> (63-k): 2^k + the low bits
	DECQ  R12
	SHLXQ DX, R12, R12 // (lz-1) << k
	ADDQ  R14, R12      // v
	SHLXQ R13, AX, AX  // acc <<= total
	SUBQ  R13, BX

	// dst[i] = int32(v>>1) ^ -int32(v&1)
	MOVL R12, R13
	SHRL $1, R13
	ANDL $1, R12
	NEGL R12
	XORL R13, R12
	MOVL R12, (DI)(R10*4)
	INCQ R10
	JMP  loop

done:
	MOVQ R10, ret+80(FP)
	MOVQ AX, ret1+88(FP)
	MOVQ BX, ret2+96(FP)
	MOVQ CX, ret3+104(FP)
	RET
