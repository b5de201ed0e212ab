//go:build !purego

#include "textflag.h"

// peak4Coeffs holds the folded coefficients of peak4SquaresGo, each
// duplicated into both lanes: for t = 0…5 the 16-byte slots P, R, Q, U at
// offset 64·t are ½(h0[t]+h0[11−t]), ½(h1[t]+h1[11−t]), ½(h0[t]−h0[11−t])
// and ½(h1[t]−h1[11−t]). All are exact multiples of 2⁻¹⁴.
DATA peak4Coeffs<>+0(SB)/8, $(-0.0032958984375)
DATA peak4Coeffs<>+8(SB)/8, $(-0.0032958984375)
DATA peak4Coeffs<>+16(SB)/8, $(-0.0240478515625)
DATA peak4Coeffs<>+24(SB)/8, $(-0.0240478515625)
DATA peak4Coeffs<>+32(SB)/8, $(0.0050048828125)
DATA peak4Coeffs<>+40(SB)/8, $(0.0050048828125)
DATA peak4Coeffs<>+48(SB)/8, $(-0.005126953125)
DATA peak4Coeffs<>+56(SB)/8, $(-0.005126953125)
DATA peak4Coeffs<>+64(SB)/8, $(0.012939453125)
DATA peak4Coeffs<>+72(SB)/8, $(0.012939453125)
DATA peak4Coeffs<>+80(SB)/8, $(0.03118896484375)
DATA peak4Coeffs<>+88(SB)/8, $(0.03118896484375)
DATA peak4Coeffs<>+96(SB)/8, $(-0.001953125)
DATA peak4Coeffs<>+104(SB)/8, $(-0.001953125)
DATA peak4Coeffs<>+112(SB)/8, $(-0.00189208984375)
DATA peak4Coeffs<>+120(SB)/8, $(-0.00189208984375)
DATA peak4Coeffs<>+128(SB)/8, $(-0.02313232421875)
DATA peak4Coeffs<>+136(SB)/8, $(-0.02313232421875)
DATA peak4Coeffs<>+144(SB)/8, $(-0.05499267578125)
DATA peak4Coeffs<>+152(SB)/8, $(-0.05499267578125)
DATA peak4Coeffs<>+160(SB)/8, $(0.00347900390625)
DATA peak4Coeffs<>+168(SB)/8, $(0.00347900390625)
DATA peak4Coeffs<>+176(SB)/8, $(0.00323486328125)
DATA peak4Coeffs<>+184(SB)/8, $(0.00323486328125)
DATA peak4Coeffs<>+192(SB)/8, $(0.0404052734375)
DATA peak4Coeffs<>+200(SB)/8, $(0.0404052734375)
DATA peak4Coeffs<>+208(SB)/8, $(0.0953369140625)
DATA peak4Coeffs<>+216(SB)/8, $(0.0953369140625)
DATA peak4Coeffs<>+224(SB)/8, $(-0.0072021484375)
DATA peak4Coeffs<>+232(SB)/8, $(-0.0072021484375)
DATA peak4Coeffs<>+240(SB)/8, $(-0.0062255859375)
DATA peak4Coeffs<>+248(SB)/8, $(-0.0062255859375)
DATA peak4Coeffs<>+256(SB)/8, $(-0.08087158203125)
DATA peak4Coeffs<>+264(SB)/8, $(-0.08087158203125)
DATA peak4Coeffs<>+272(SB)/8, $(-0.18341064453125)
DATA peak4Coeffs<>+280(SB)/8, $(-0.18341064453125)
DATA peak4Coeffs<>+288(SB)/8, $(0.02142333984375)
DATA peak4Coeffs<>+296(SB)/8, $(0.02142333984375)
DATA peak4Coeffs<>+304(SB)/8, $(0.01690673828125)
DATA peak4Coeffs<>+312(SB)/8, $(0.01690673828125)
DATA peak4Coeffs<>+320(SB)/8, $(0.55474853515625)
DATA peak4Coeffs<>+328(SB)/8, $(0.55474853515625)
DATA peak4Coeffs<>+336(SB)/8, $(0.6224365234375)
DATA peak4Coeffs<>+344(SB)/8, $(0.6224365234375)
DATA peak4Coeffs<>+352(SB)/8, $(-0.41741943359375)
DATA peak4Coeffs<>+360(SB)/8, $(-0.41741943359375)
DATA peak4Coeffs<>+368(SB)/8, $(-0.1573486328125)
DATA peak4Coeffs<>+376(SB)/8, $(-0.1573486328125)
GLOBL peak4Coeffs<>(SB), RODATA|NOPTR, $384

// TAP folds tap pair t (input offsets 8·(11−t) and 8·t bytes into the
// window) into the accumulators: S = x[11−t]+x[t], D = x[11−t]−x[t],
// P += cP·S, R += cR·S, Q += cQ·D, U += cU·D.
#define TAP(hi, lo, c) \
	MOVUPD hi(SI), X1 \
	MOVUPD lo(SI), X2 \
	MOVAPD X1, X3 \
	ADDPD  X2, X1 \
	SUBPD  X2, X3 \
	MOVAPD X1, X2 \
	MULPD  peak4Coeffs<>+(c+0)(SB), X2 \
	ADDPD  X2, X4 \
	MULPD  peak4Coeffs<>+(c+16)(SB), X1 \
	ADDPD  X1, X5 \
	MOVAPD X3, X2 \
	MULPD  peak4Coeffs<>+(c+32)(SB), X2 \
	ADDPD  X2, X6 \
	MULPD  peak4Coeffs<>+(c+48)(SB), X3 \
	ADDPD  X3, X7

// func peak4PairsSSE2(w []float64, sq float64) float64
//
// Registers: SI window start, CX windows left; X4 P, X5 R, X6 Q, X7 U;
// X0 and X8 two running maxima (y0², y3² and y1², y2²) so that the
// loop-carried MAXPD chain is two long, not four.
TEXT ·peak4PairsSSE2(SB), NOSPLIT, $0-40
	MOVQ     w_base+0(FP), SI
	MOVQ     w_len+8(FP), CX
	MOVSD    sq+24(FP), X0
	UNPCKLPD X0, X0
	MOVAPD   X0, X8
	SUBQ     $11, CX
	CMPQ     CX, $2
	JLT      done

loop:
	// Tap pair 0 starts the accumulators.
	MOVUPD 88(SI), X1
	MOVUPD 0(SI), X2
	MOVAPD X1, X3
	ADDPD  X2, X1
	SUBPD  X2, X3
	MOVAPD X1, X4
	MULPD  peak4Coeffs<>+0(SB), X4
	MOVAPD X1, X5
	MULPD  peak4Coeffs<>+16(SB), X5
	MOVAPD X3, X6
	MULPD  peak4Coeffs<>+32(SB), X6
	MOVAPD X3, X7
	MULPD  peak4Coeffs<>+48(SB), X7

	TAP(80, 8, 64)
	TAP(72, 16, 128)
	TAP(64, 24, 192)
	TAP(56, 32, 256)
	TAP(48, 40, 320)

	// y0 = P+Q, y3 = P−Q, y1 = R+U, y2 = R−U, squared.
	MOVAPD X4, X1
	ADDPD  X6, X1
	SUBPD  X6, X4
	MOVAPD X5, X2
	ADDPD  X7, X2
	SUBPD  X7, X5
	MULPD  X1, X1
	MULPD  X4, X4
	MULPD  X2, X2
	MULPD  X5, X5

	// max = v > max ? v : max, as the Go loop's "if v > sq": MAXPD
	// returns its source operand (the running max) when v is NaN.
	MAXPD  X0, X1
	MAXPD  X1, X4
	MOVAPD X4, X0
	MAXPD  X8, X2
	MAXPD  X2, X5
	MOVAPD X5, X8

	ADDQ $16, SI
	SUBQ $2, CX
	CMPQ CX, $2
	JGE  loop

done:
	// Neither running max is NaN unless sq was, so the order of the last
	// comparisons does not matter.
	MAXPD    X8, X0
	MOVAPD   X0, X1
	UNPCKHPD X1, X1
	MAXSD    X1, X0
	MOVSD    X0, ret+32(FP)
	RET

// peak2Coeffs holds the 2× interpolator of peak2SquaresGo in both lanes:
// for t = 0…11 the 16-byte slots h0[t] and h1[t] at offset 32·t.
DATA peak2Coeffs<>+0(SB)/8, $(0.0017089843750)
DATA peak2Coeffs<>+8(SB)/8, $(0.0017089843750)
DATA peak2Coeffs<>+16(SB)/8, $(-0.0291748046875)
DATA peak2Coeffs<>+24(SB)/8, $(-0.0291748046875)
DATA peak2Coeffs<>+32(SB)/8, $(0.0109863281250)
DATA peak2Coeffs<>+40(SB)/8, $(0.0109863281250)
DATA peak2Coeffs<>+48(SB)/8, $(0.0292968750000)
DATA peak2Coeffs<>+56(SB)/8, $(0.0292968750000)
DATA peak2Coeffs<>+64(SB)/8, $(-0.0196533203125)
DATA peak2Coeffs<>+72(SB)/8, $(-0.0196533203125)
DATA peak2Coeffs<>+80(SB)/8, $(-0.0517578125000)
DATA peak2Coeffs<>+88(SB)/8, $(-0.0517578125000)
DATA peak2Coeffs<>+96(SB)/8, $(0.0332031250000)
DATA peak2Coeffs<>+104(SB)/8, $(0.0332031250000)
DATA peak2Coeffs<>+112(SB)/8, $(0.0891113281250)
DATA peak2Coeffs<>+120(SB)/8, $(0.0891113281250)
DATA peak2Coeffs<>+128(SB)/8, $(-0.0594482421875)
DATA peak2Coeffs<>+136(SB)/8, $(-0.0594482421875)
DATA peak2Coeffs<>+144(SB)/8, $(-0.1665039062500)
DATA peak2Coeffs<>+152(SB)/8, $(-0.1665039062500)
DATA peak2Coeffs<>+160(SB)/8, $(0.1373291015625)
DATA peak2Coeffs<>+168(SB)/8, $(0.1373291015625)
DATA peak2Coeffs<>+176(SB)/8, $(0.4650878906250)
DATA peak2Coeffs<>+184(SB)/8, $(0.4650878906250)
DATA peak2Coeffs<>+192(SB)/8, $(0.9721679687500)
DATA peak2Coeffs<>+200(SB)/8, $(0.9721679687500)
DATA peak2Coeffs<>+208(SB)/8, $(0.7797851562500)
DATA peak2Coeffs<>+216(SB)/8, $(0.7797851562500)
DATA peak2Coeffs<>+224(SB)/8, $(-0.1022949218750)
DATA peak2Coeffs<>+232(SB)/8, $(-0.1022949218750)
DATA peak2Coeffs<>+240(SB)/8, $(-0.2003173828125)
DATA peak2Coeffs<>+248(SB)/8, $(-0.2003173828125)
DATA peak2Coeffs<>+256(SB)/8, $(0.0476074218750)
DATA peak2Coeffs<>+264(SB)/8, $(0.0476074218750)
DATA peak2Coeffs<>+272(SB)/8, $(0.1015625000000)
DATA peak2Coeffs<>+280(SB)/8, $(0.1015625000000)
DATA peak2Coeffs<>+288(SB)/8, $(-0.0266113281250)
DATA peak2Coeffs<>+296(SB)/8, $(-0.0266113281250)
DATA peak2Coeffs<>+304(SB)/8, $(-0.0582275390625)
DATA peak2Coeffs<>+312(SB)/8, $(-0.0582275390625)
DATA peak2Coeffs<>+320(SB)/8, $(0.0148925781250)
DATA peak2Coeffs<>+328(SB)/8, $(0.0148925781250)
DATA peak2Coeffs<>+336(SB)/8, $(0.0330810546875)
DATA peak2Coeffs<>+344(SB)/8, $(0.0330810546875)
DATA peak2Coeffs<>+352(SB)/8, $(-0.0083007812500)
DATA peak2Coeffs<>+360(SB)/8, $(-0.0083007812500)
DATA peak2Coeffs<>+368(SB)/8, $(-0.0189208984375)
DATA peak2Coeffs<>+376(SB)/8, $(-0.0189208984375)
GLOBL peak2Coeffs<>(SB), RODATA|NOPTR, $384

// TAP2X2 adds tap t of both 2× phases for two windows:
// y0 += h0[t]·x[11−t], y2 += h1[t]·x[t].
#define TAP2X2(t) \
	MOVUPD (88-8*t)(SI), X1 \
	MULPD  peak2Coeffs<>+(32*t)(SB), X1 \
	ADDPD  X1, X4 \
	MOVUPD (8*t)(SI), X2 \
	MULPD  peak2Coeffs<>+(32*t+16)(SB), X2 \
	ADDPD  X2, X5

// func peak2PairsSSE2(w []float64, sq float64) float64
//
// peak2SquaresGo over the first 2·⌊(len(w)−11)/2⌋ windows of w, two
// windows in the two lanes. Registers: SI window start, CX windows left;
// X4 y0, X5 y2; X0 and X8 running maxima.
TEXT ·peak2PairsSSE2(SB), NOSPLIT, $0-40
	MOVQ     w_base+0(FP), SI
	MOVQ     w_len+8(FP), CX
	MOVSD    sq+24(FP), X0
	UNPCKLPD X0, X0
	MOVAPD   X0, X8
	SUBQ     $11, CX
	CMPQ     CX, $2
	JLT      done2

loop2:
	// Tap 0 starts the sums (0 + p is p up to the sign of a zero, which
	// squaring removes).
	MOVUPD 88(SI), X4
	MULPD  peak2Coeffs<>+0(SB), X4
	MOVUPD 0(SI), X5
	MULPD  peak2Coeffs<>+16(SB), X5
	TAP2X2(1)
	TAP2X2(2)
	TAP2X2(3)
	TAP2X2(4)
	TAP2X2(5)
	TAP2X2(6)
	TAP2X2(7)
	TAP2X2(8)
	TAP2X2(9)
	TAP2X2(10)
	TAP2X2(11)
	MULPD  X4, X4
	MULPD  X5, X5
	MAXPD  X0, X4
	MOVAPD X4, X0
	MAXPD  X8, X5
	MOVAPD X5, X8

	ADDQ $16, SI
	SUBQ $2, CX
	CMPQ CX, $2
	JGE  loop2

done2:
	MAXPD    X8, X0
	MOVAPD   X0, X1
	UNPCKHPD X1, X1
	MAXSD    X1, X0
	MOVSD    X0, ret+32(FP)
	RET
