//go:build !purego

#include "textflag.h"

// peak4Coeffs4 is peak4Coeffs (truepeak_amd64.s) with each coefficient in
// four lanes: for t = 0…5 the 32-byte slots P, R, Q, U at offset 128·t.
DATA peak4Coeffs4<>+0(SB)/8, $(-0.0032958984375)
DATA peak4Coeffs4<>+8(SB)/8, $(-0.0032958984375)
DATA peak4Coeffs4<>+16(SB)/8, $(-0.0032958984375)
DATA peak4Coeffs4<>+24(SB)/8, $(-0.0032958984375)
DATA peak4Coeffs4<>+32(SB)/8, $(-0.0240478515625)
DATA peak4Coeffs4<>+40(SB)/8, $(-0.0240478515625)
DATA peak4Coeffs4<>+48(SB)/8, $(-0.0240478515625)
DATA peak4Coeffs4<>+56(SB)/8, $(-0.0240478515625)
DATA peak4Coeffs4<>+64(SB)/8, $(0.0050048828125)
DATA peak4Coeffs4<>+72(SB)/8, $(0.0050048828125)
DATA peak4Coeffs4<>+80(SB)/8, $(0.0050048828125)
DATA peak4Coeffs4<>+88(SB)/8, $(0.0050048828125)
DATA peak4Coeffs4<>+96(SB)/8, $(-0.005126953125)
DATA peak4Coeffs4<>+104(SB)/8, $(-0.005126953125)
DATA peak4Coeffs4<>+112(SB)/8, $(-0.005126953125)
DATA peak4Coeffs4<>+120(SB)/8, $(-0.005126953125)
DATA peak4Coeffs4<>+128(SB)/8, $(0.012939453125)
DATA peak4Coeffs4<>+136(SB)/8, $(0.012939453125)
DATA peak4Coeffs4<>+144(SB)/8, $(0.012939453125)
DATA peak4Coeffs4<>+152(SB)/8, $(0.012939453125)
DATA peak4Coeffs4<>+160(SB)/8, $(0.03118896484375)
DATA peak4Coeffs4<>+168(SB)/8, $(0.03118896484375)
DATA peak4Coeffs4<>+176(SB)/8, $(0.03118896484375)
DATA peak4Coeffs4<>+184(SB)/8, $(0.03118896484375)
DATA peak4Coeffs4<>+192(SB)/8, $(-0.001953125)
DATA peak4Coeffs4<>+200(SB)/8, $(-0.001953125)
DATA peak4Coeffs4<>+208(SB)/8, $(-0.001953125)
DATA peak4Coeffs4<>+216(SB)/8, $(-0.001953125)
DATA peak4Coeffs4<>+224(SB)/8, $(-0.00189208984375)
DATA peak4Coeffs4<>+232(SB)/8, $(-0.00189208984375)
DATA peak4Coeffs4<>+240(SB)/8, $(-0.00189208984375)
DATA peak4Coeffs4<>+248(SB)/8, $(-0.00189208984375)
DATA peak4Coeffs4<>+256(SB)/8, $(-0.02313232421875)
DATA peak4Coeffs4<>+264(SB)/8, $(-0.02313232421875)
DATA peak4Coeffs4<>+272(SB)/8, $(-0.02313232421875)
DATA peak4Coeffs4<>+280(SB)/8, $(-0.02313232421875)
DATA peak4Coeffs4<>+288(SB)/8, $(-0.05499267578125)
DATA peak4Coeffs4<>+296(SB)/8, $(-0.05499267578125)
DATA peak4Coeffs4<>+304(SB)/8, $(-0.05499267578125)
DATA peak4Coeffs4<>+312(SB)/8, $(-0.05499267578125)
DATA peak4Coeffs4<>+320(SB)/8, $(0.00347900390625)
DATA peak4Coeffs4<>+328(SB)/8, $(0.00347900390625)
DATA peak4Coeffs4<>+336(SB)/8, $(0.00347900390625)
DATA peak4Coeffs4<>+344(SB)/8, $(0.00347900390625)
DATA peak4Coeffs4<>+352(SB)/8, $(0.00323486328125)
DATA peak4Coeffs4<>+360(SB)/8, $(0.00323486328125)
DATA peak4Coeffs4<>+368(SB)/8, $(0.00323486328125)
DATA peak4Coeffs4<>+376(SB)/8, $(0.00323486328125)
DATA peak4Coeffs4<>+384(SB)/8, $(0.0404052734375)
DATA peak4Coeffs4<>+392(SB)/8, $(0.0404052734375)
DATA peak4Coeffs4<>+400(SB)/8, $(0.0404052734375)
DATA peak4Coeffs4<>+408(SB)/8, $(0.0404052734375)
DATA peak4Coeffs4<>+416(SB)/8, $(0.0953369140625)
DATA peak4Coeffs4<>+424(SB)/8, $(0.0953369140625)
DATA peak4Coeffs4<>+432(SB)/8, $(0.0953369140625)
DATA peak4Coeffs4<>+440(SB)/8, $(0.0953369140625)
DATA peak4Coeffs4<>+448(SB)/8, $(-0.0072021484375)
DATA peak4Coeffs4<>+456(SB)/8, $(-0.0072021484375)
DATA peak4Coeffs4<>+464(SB)/8, $(-0.0072021484375)
DATA peak4Coeffs4<>+472(SB)/8, $(-0.0072021484375)
DATA peak4Coeffs4<>+480(SB)/8, $(-0.0062255859375)
DATA peak4Coeffs4<>+488(SB)/8, $(-0.0062255859375)
DATA peak4Coeffs4<>+496(SB)/8, $(-0.0062255859375)
DATA peak4Coeffs4<>+504(SB)/8, $(-0.0062255859375)
DATA peak4Coeffs4<>+512(SB)/8, $(-0.08087158203125)
DATA peak4Coeffs4<>+520(SB)/8, $(-0.08087158203125)
DATA peak4Coeffs4<>+528(SB)/8, $(-0.08087158203125)
DATA peak4Coeffs4<>+536(SB)/8, $(-0.08087158203125)
DATA peak4Coeffs4<>+544(SB)/8, $(-0.18341064453125)
DATA peak4Coeffs4<>+552(SB)/8, $(-0.18341064453125)
DATA peak4Coeffs4<>+560(SB)/8, $(-0.18341064453125)
DATA peak4Coeffs4<>+568(SB)/8, $(-0.18341064453125)
DATA peak4Coeffs4<>+576(SB)/8, $(0.02142333984375)
DATA peak4Coeffs4<>+584(SB)/8, $(0.02142333984375)
DATA peak4Coeffs4<>+592(SB)/8, $(0.02142333984375)
DATA peak4Coeffs4<>+600(SB)/8, $(0.02142333984375)
DATA peak4Coeffs4<>+608(SB)/8, $(0.01690673828125)
DATA peak4Coeffs4<>+616(SB)/8, $(0.01690673828125)
DATA peak4Coeffs4<>+624(SB)/8, $(0.01690673828125)
DATA peak4Coeffs4<>+632(SB)/8, $(0.01690673828125)
DATA peak4Coeffs4<>+640(SB)/8, $(0.55474853515625)
DATA peak4Coeffs4<>+648(SB)/8, $(0.55474853515625)
DATA peak4Coeffs4<>+656(SB)/8, $(0.55474853515625)
DATA peak4Coeffs4<>+664(SB)/8, $(0.55474853515625)
DATA peak4Coeffs4<>+672(SB)/8, $(0.6224365234375)
DATA peak4Coeffs4<>+680(SB)/8, $(0.6224365234375)
DATA peak4Coeffs4<>+688(SB)/8, $(0.6224365234375)
DATA peak4Coeffs4<>+696(SB)/8, $(0.6224365234375)
DATA peak4Coeffs4<>+704(SB)/8, $(-0.41741943359375)
DATA peak4Coeffs4<>+712(SB)/8, $(-0.41741943359375)
DATA peak4Coeffs4<>+720(SB)/8, $(-0.41741943359375)
DATA peak4Coeffs4<>+728(SB)/8, $(-0.41741943359375)
DATA peak4Coeffs4<>+736(SB)/8, $(-0.1573486328125)
DATA peak4Coeffs4<>+744(SB)/8, $(-0.1573486328125)
DATA peak4Coeffs4<>+752(SB)/8, $(-0.1573486328125)
DATA peak4Coeffs4<>+760(SB)/8, $(-0.1573486328125)
GLOBL peak4Coeffs4<>(SB), RODATA|NOPTR, $768

// peak2Coeffs4 holds the 2× interpolator of peak2SquaresGo in four lanes:
// for t = 0…11 the 32-byte slots h0[t] and h1[t] at offset 64·t (phase 2
// is phase 1 applied to the window reversed).
DATA peak2Coeffs4<>+0(SB)/8, $(0.0017089843750)
DATA peak2Coeffs4<>+8(SB)/8, $(0.0017089843750)
DATA peak2Coeffs4<>+16(SB)/8, $(0.0017089843750)
DATA peak2Coeffs4<>+24(SB)/8, $(0.0017089843750)
DATA peak2Coeffs4<>+32(SB)/8, $(-0.0291748046875)
DATA peak2Coeffs4<>+40(SB)/8, $(-0.0291748046875)
DATA peak2Coeffs4<>+48(SB)/8, $(-0.0291748046875)
DATA peak2Coeffs4<>+56(SB)/8, $(-0.0291748046875)
DATA peak2Coeffs4<>+64(SB)/8, $(0.0109863281250)
DATA peak2Coeffs4<>+72(SB)/8, $(0.0109863281250)
DATA peak2Coeffs4<>+80(SB)/8, $(0.0109863281250)
DATA peak2Coeffs4<>+88(SB)/8, $(0.0109863281250)
DATA peak2Coeffs4<>+96(SB)/8, $(0.0292968750000)
DATA peak2Coeffs4<>+104(SB)/8, $(0.0292968750000)
DATA peak2Coeffs4<>+112(SB)/8, $(0.0292968750000)
DATA peak2Coeffs4<>+120(SB)/8, $(0.0292968750000)
DATA peak2Coeffs4<>+128(SB)/8, $(-0.0196533203125)
DATA peak2Coeffs4<>+136(SB)/8, $(-0.0196533203125)
DATA peak2Coeffs4<>+144(SB)/8, $(-0.0196533203125)
DATA peak2Coeffs4<>+152(SB)/8, $(-0.0196533203125)
DATA peak2Coeffs4<>+160(SB)/8, $(-0.0517578125000)
DATA peak2Coeffs4<>+168(SB)/8, $(-0.0517578125000)
DATA peak2Coeffs4<>+176(SB)/8, $(-0.0517578125000)
DATA peak2Coeffs4<>+184(SB)/8, $(-0.0517578125000)
DATA peak2Coeffs4<>+192(SB)/8, $(0.0332031250000)
DATA peak2Coeffs4<>+200(SB)/8, $(0.0332031250000)
DATA peak2Coeffs4<>+208(SB)/8, $(0.0332031250000)
DATA peak2Coeffs4<>+216(SB)/8, $(0.0332031250000)
DATA peak2Coeffs4<>+224(SB)/8, $(0.0891113281250)
DATA peak2Coeffs4<>+232(SB)/8, $(0.0891113281250)
DATA peak2Coeffs4<>+240(SB)/8, $(0.0891113281250)
DATA peak2Coeffs4<>+248(SB)/8, $(0.0891113281250)
DATA peak2Coeffs4<>+256(SB)/8, $(-0.0594482421875)
DATA peak2Coeffs4<>+264(SB)/8, $(-0.0594482421875)
DATA peak2Coeffs4<>+272(SB)/8, $(-0.0594482421875)
DATA peak2Coeffs4<>+280(SB)/8, $(-0.0594482421875)
DATA peak2Coeffs4<>+288(SB)/8, $(-0.1665039062500)
DATA peak2Coeffs4<>+296(SB)/8, $(-0.1665039062500)
DATA peak2Coeffs4<>+304(SB)/8, $(-0.1665039062500)
DATA peak2Coeffs4<>+312(SB)/8, $(-0.1665039062500)
DATA peak2Coeffs4<>+320(SB)/8, $(0.1373291015625)
DATA peak2Coeffs4<>+328(SB)/8, $(0.1373291015625)
DATA peak2Coeffs4<>+336(SB)/8, $(0.1373291015625)
DATA peak2Coeffs4<>+344(SB)/8, $(0.1373291015625)
DATA peak2Coeffs4<>+352(SB)/8, $(0.4650878906250)
DATA peak2Coeffs4<>+360(SB)/8, $(0.4650878906250)
DATA peak2Coeffs4<>+368(SB)/8, $(0.4650878906250)
DATA peak2Coeffs4<>+376(SB)/8, $(0.4650878906250)
DATA peak2Coeffs4<>+384(SB)/8, $(0.9721679687500)
DATA peak2Coeffs4<>+392(SB)/8, $(0.9721679687500)
DATA peak2Coeffs4<>+400(SB)/8, $(0.9721679687500)
DATA peak2Coeffs4<>+408(SB)/8, $(0.9721679687500)
DATA peak2Coeffs4<>+416(SB)/8, $(0.7797851562500)
DATA peak2Coeffs4<>+424(SB)/8, $(0.7797851562500)
DATA peak2Coeffs4<>+432(SB)/8, $(0.7797851562500)
DATA peak2Coeffs4<>+440(SB)/8, $(0.7797851562500)
DATA peak2Coeffs4<>+448(SB)/8, $(-0.1022949218750)
DATA peak2Coeffs4<>+456(SB)/8, $(-0.1022949218750)
DATA peak2Coeffs4<>+464(SB)/8, $(-0.1022949218750)
DATA peak2Coeffs4<>+472(SB)/8, $(-0.1022949218750)
DATA peak2Coeffs4<>+480(SB)/8, $(-0.2003173828125)
DATA peak2Coeffs4<>+488(SB)/8, $(-0.2003173828125)
DATA peak2Coeffs4<>+496(SB)/8, $(-0.2003173828125)
DATA peak2Coeffs4<>+504(SB)/8, $(-0.2003173828125)
DATA peak2Coeffs4<>+512(SB)/8, $(0.0476074218750)
DATA peak2Coeffs4<>+520(SB)/8, $(0.0476074218750)
DATA peak2Coeffs4<>+528(SB)/8, $(0.0476074218750)
DATA peak2Coeffs4<>+536(SB)/8, $(0.0476074218750)
DATA peak2Coeffs4<>+544(SB)/8, $(0.1015625000000)
DATA peak2Coeffs4<>+552(SB)/8, $(0.1015625000000)
DATA peak2Coeffs4<>+560(SB)/8, $(0.1015625000000)
DATA peak2Coeffs4<>+568(SB)/8, $(0.1015625000000)
DATA peak2Coeffs4<>+576(SB)/8, $(-0.0266113281250)
DATA peak2Coeffs4<>+584(SB)/8, $(-0.0266113281250)
DATA peak2Coeffs4<>+592(SB)/8, $(-0.0266113281250)
DATA peak2Coeffs4<>+600(SB)/8, $(-0.0266113281250)
DATA peak2Coeffs4<>+608(SB)/8, $(-0.0582275390625)
DATA peak2Coeffs4<>+616(SB)/8, $(-0.0582275390625)
DATA peak2Coeffs4<>+624(SB)/8, $(-0.0582275390625)
DATA peak2Coeffs4<>+632(SB)/8, $(-0.0582275390625)
DATA peak2Coeffs4<>+640(SB)/8, $(0.0148925781250)
DATA peak2Coeffs4<>+648(SB)/8, $(0.0148925781250)
DATA peak2Coeffs4<>+656(SB)/8, $(0.0148925781250)
DATA peak2Coeffs4<>+664(SB)/8, $(0.0148925781250)
DATA peak2Coeffs4<>+672(SB)/8, $(0.0330810546875)
DATA peak2Coeffs4<>+680(SB)/8, $(0.0330810546875)
DATA peak2Coeffs4<>+688(SB)/8, $(0.0330810546875)
DATA peak2Coeffs4<>+696(SB)/8, $(0.0330810546875)
DATA peak2Coeffs4<>+704(SB)/8, $(-0.0083007812500)
DATA peak2Coeffs4<>+712(SB)/8, $(-0.0083007812500)
DATA peak2Coeffs4<>+720(SB)/8, $(-0.0083007812500)
DATA peak2Coeffs4<>+728(SB)/8, $(-0.0083007812500)
DATA peak2Coeffs4<>+736(SB)/8, $(-0.0189208984375)
DATA peak2Coeffs4<>+744(SB)/8, $(-0.0189208984375)
DATA peak2Coeffs4<>+752(SB)/8, $(-0.0189208984375)
DATA peak2Coeffs4<>+760(SB)/8, $(-0.0189208984375)
GLOBL peak2Coeffs4<>(SB), RODATA|NOPTR, $768

// TAP4 is TAP (truepeak_amd64.s) on four windows: S = x[11−t]+x[t],
// D = x[11−t]−x[t], P += cP·S, R += cR·S, Q += cQ·D, U += cU·D.
#define TAP4(hi, lo, c) \
	VMOVUPD hi(SI), Y1 \
	VMOVUPD lo(SI), Y2 \
	VADDPD  Y2, Y1, Y3 \
	VSUBPD  Y2, Y1, Y9 \
	VMULPD  peak4Coeffs4<>+(c+0)(SB), Y3, Y1 \
	VADDPD  Y1, Y4, Y4 \
	VMULPD  peak4Coeffs4<>+(c+32)(SB), Y3, Y2 \
	VADDPD  Y2, Y5, Y5 \
	VMULPD  peak4Coeffs4<>+(c+64)(SB), Y9, Y1 \
	VADDPD  Y1, Y6, Y6 \
	VMULPD  peak4Coeffs4<>+(c+96)(SB), Y9, Y2 \
	VADDPD  Y2, Y7, Y7

// TAP4X8 is TAP4 for two groups of four windows (P, R, Q, U in Y4–Y7 for
// windows 0–3 and in Y10–Y13 for windows 4–7), each coefficient loaded
// once (Y15) for both groups; Y1–Y3, Y9 and Y14 are scratch.
#define TAP4X8(hi, lo, c) \
	VMOVUPD hi(SI), Y1 \
	VMOVUPD lo(SI), Y2 \
	VADDPD  Y2, Y1, Y3 \
	VSUBPD  Y2, Y1, Y1 \
	VMOVUPD (hi+32)(SI), Y2 \
	VMOVUPD (lo+32)(SI), Y9 \
	VADDPD  Y9, Y2, Y14 \
	VSUBPD  Y9, Y2, Y2 \
	VMOVUPD peak4Coeffs4<>+(c+0)(SB), Y15 \
	VMULPD  Y15, Y3, Y9 \
	VADDPD  Y9, Y4, Y4 \
	VMULPD  Y15, Y14, Y9 \
	VADDPD  Y9, Y10, Y10 \
	VMOVUPD peak4Coeffs4<>+(c+32)(SB), Y15 \
	VMULPD  Y15, Y3, Y9 \
	VADDPD  Y9, Y5, Y5 \
	VMULPD  Y15, Y14, Y9 \
	VADDPD  Y9, Y11, Y11 \
	VMOVUPD peak4Coeffs4<>+(c+64)(SB), Y15 \
	VMULPD  Y15, Y1, Y9 \
	VADDPD  Y9, Y6, Y6 \
	VMULPD  Y15, Y2, Y9 \
	VADDPD  Y9, Y12, Y12 \
	VMOVUPD peak4Coeffs4<>+(c+96)(SB), Y15 \
	VMULPD  Y15, Y1, Y9 \
	VADDPD  Y9, Y7, Y7 \
	VMULPD  Y15, Y2, Y9 \
	VADDPD  Y9, Y13, Y13

// PEAK4MAX squares the four outputs y0 = P+Q, y3 = P−Q, y1 = R+U,
// y2 = R−U of one group (P, R, Q, U) into the running maxima Y0 and Y8,
// using Y1 and Y2 (VMAXPD returns its second source, the running max, when
// v is NaN).
#define PEAK4MAX(P, R, Q, U) \
	VADDPD Q, P, Y1 \
	VSUBPD Q, P, P \
	VADDPD U, R, Y2 \
	VSUBPD U, R, R \
	VMULPD Y1, Y1, Y1 \
	VMULPD P, P, P \
	VMULPD Y2, Y2, Y2 \
	VMULPD R, R, R \
	VMAXPD Y0, Y1, Y1 \
	VMAXPD Y1, P, Y0 \
	VMAXPD Y8, Y2, Y2 \
	VMAXPD Y2, R, Y8

// func peak4QuadsAVX2(w []float64, sq float64) float64
//
// peak4PairsSSE2 with four windows in the four lanes of AVX2 registers,
// and two such groups per iteration (loop8), which halves the coefficient
// loads: the loop is bound by its loads more than by its arithmetic. A
// last group of four runs alone (rest8). Each lane performs the very
// operations of peak4SquaresGo. Registers: SI window start, CX windows
// left; Y0, Y8 running maxima.
TEXT ·peak4QuadsAVX2(SB), NOSPLIT, $0-40
	MOVQ         w_base+0(FP), SI
	MOVQ         w_len+8(FP), CX
	VBROADCASTSD sq+24(FP), Y0
	VMOVAPD      Y0, Y8
	SUBQ         $11, CX
	CMPQ         CX, $8
	JLT          rest8

loop8:
	VMOVUPD 88(SI), Y1
	VMOVUPD 0(SI), Y2
	VADDPD  Y2, Y1, Y3
	VSUBPD  Y2, Y1, Y1
	VMOVUPD 120(SI), Y2
	VMOVUPD 32(SI), Y9
	VADDPD  Y9, Y2, Y14
	VSUBPD  Y9, Y2, Y2
	VMOVUPD peak4Coeffs4<>+0(SB), Y15
	VMULPD  Y15, Y3, Y4
	VMULPD  Y15, Y14, Y10
	VMOVUPD peak4Coeffs4<>+32(SB), Y15
	VMULPD  Y15, Y3, Y5
	VMULPD  Y15, Y14, Y11
	VMOVUPD peak4Coeffs4<>+64(SB), Y15
	VMULPD  Y15, Y1, Y6
	VMULPD  Y15, Y2, Y12
	VMOVUPD peak4Coeffs4<>+96(SB), Y15
	VMULPD  Y15, Y1, Y7
	VMULPD  Y15, Y2, Y13

	TAP4X8(80, 8, 128)
	TAP4X8(72, 16, 256)
	TAP4X8(64, 24, 384)
	TAP4X8(56, 32, 512)
	TAP4X8(48, 40, 640)

	PEAK4MAX(Y4, Y5, Y6, Y7)
	PEAK4MAX(Y10, Y11, Y12, Y13)

	ADDQ $64, SI
	SUBQ $8, CX
	CMPQ CX, $8
	JGE  loop8

rest8:
	CMPQ CX, $4
	JLT  done8
	VMOVUPD 88(SI), Y1
	VMOVUPD 0(SI), Y2
	VADDPD  Y2, Y1, Y3
	VSUBPD  Y2, Y1, Y9
	VMULPD  peak4Coeffs4<>+0(SB), Y3, Y4
	VMULPD  peak4Coeffs4<>+32(SB), Y3, Y5
	VMULPD  peak4Coeffs4<>+64(SB), Y9, Y6
	VMULPD  peak4Coeffs4<>+96(SB), Y9, Y7
	TAP4(80, 8, 128)
	TAP4(72, 16, 256)
	TAP4(64, 24, 384)
	TAP4(56, 32, 512)
	TAP4(48, 40, 640)
	PEAK4MAX(Y4, Y5, Y6, Y7)

done8:
	VMAXPD       Y8, Y0, Y0
	VEXTRACTF128 $1, Y0, X1
	VMAXPD       X1, X0, X0
	VUNPCKHPD    X0, X0, X1
	VMAXSD       X1, X0, X0
	VZEROUPPER
	MOVSD        X0, ret+32(FP)
	RET

// TAP2X4 adds tap t of both 2× phases for four windows:
// y0 += h0[t]·x[11−t], y2 += h1[t]·x[t].
#define TAP2X4(t) \
	VMOVUPD (88-8*t)(SI), Y1 \
	VMULPD  peak2Coeffs4<>+(64*t)(SB), Y1, Y1 \
	VADDPD  Y1, Y4, Y4 \
	VMOVUPD (8*t)(SI), Y2 \
	VMULPD  peak2Coeffs4<>+(64*t+32)(SB), Y2, Y2 \
	VADDPD  Y2, Y5, Y5

// TAP2X8 is TAP2X4 for two groups of four windows (windows 0–3 in Y4, Y5,
// windows 4–7 in Y6, Y7), each coefficient loaded once for both.
#define TAP2X8(t) \
	VMOVUPD peak2Coeffs4<>+(64*t)(SB), Y10 \
	VMOVUPD peak2Coeffs4<>+(64*t+32)(SB), Y11 \
	VMULPD  (88-8*t)(SI), Y10, Y1 \
	VADDPD  Y1, Y4, Y4 \
	VMULPD  (120-8*t)(SI), Y10, Y2 \
	VADDPD  Y2, Y6, Y6 \
	VMULPD  (8*t)(SI), Y11, Y3 \
	VADDPD  Y3, Y5, Y5 \
	VMULPD  (32+8*t)(SI), Y11, Y9 \
	VADDPD  Y9, Y7, Y7

// func peak2QuadsAVX2(w []float64, sq float64) float64
//
// peak2SquaresGo over the first 4·⌊(len(w)−11)/4⌋ windows of w, four
// windows in the four lanes. Each output is a chain of twelve dependent
// additions, so the main loop runs two groups of four windows side by side
// (loop8) to give the processor independent work; a last group of four
// goes through loop2. Registers: SI window start, CX windows left; Y4 y0,
// Y5 y2 (and Y6, Y7 for the second group); Y0 and Y8 running maxima.
TEXT ·peak2QuadsAVX2(SB), NOSPLIT, $0-40
	MOVQ         w_base+0(FP), SI
	MOVQ         w_len+8(FP), CX
	VBROADCASTSD sq+24(FP), Y0
	VMOVAPD      Y0, Y8
	SUBQ         $11, CX
	CMPQ         CX, $8
	JLT          quad2

loop8:
	VMOVUPD peak2Coeffs4<>+0(SB), Y10
	VMOVUPD peak2Coeffs4<>+32(SB), Y11
	VMULPD  88(SI), Y10, Y4
	VMULPD  120(SI), Y10, Y6
	VMULPD  0(SI), Y11, Y5
	VMULPD  32(SI), Y11, Y7
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
	VMULPD Y4, Y4, Y4
	VMULPD Y5, Y5, Y5
	VMULPD Y6, Y6, Y6
	VMULPD Y7, Y7, Y7
	VMAXPD Y0, Y4, Y0
	VMAXPD Y8, Y5, Y8
	VMAXPD Y0, Y6, Y0
	VMAXPD Y8, Y7, Y8

	ADDQ $64, SI
	SUBQ $8, CX
	CMPQ CX, $8
	JGE  loop8

quad2:
	CMPQ CX, $4
	JLT  done2

loop2:
	// Tap 0 starts the sums (0 + p is p up to the sign of a zero, which
	// squaring removes).
	VMOVUPD 88(SI), Y1
	VMULPD  peak2Coeffs4<>+0(SB), Y1, Y4
	VMOVUPD 0(SI), Y2
	VMULPD  peak2Coeffs4<>+32(SB), Y2, Y5
	TAP2X4(1)
	TAP2X4(2)
	TAP2X4(3)
	TAP2X4(4)
	TAP2X4(5)
	TAP2X4(6)
	TAP2X4(7)
	TAP2X4(8)
	TAP2X4(9)
	TAP2X4(10)
	TAP2X4(11)
	VMULPD Y4, Y4, Y4
	VMULPD Y5, Y5, Y5
	VMAXPD Y0, Y4, Y0
	VMAXPD Y8, Y5, Y8

	ADDQ $32, SI
	SUBQ $4, CX
	CMPQ CX, $4
	JGE  loop2

done2:
	VMAXPD       Y8, Y0, Y0
	VEXTRACTF128 $1, Y0, X1
	VMAXPD       X1, X0, X0
	VUNPCKHPD    X0, X0, X1
	VMAXSD       X1, X0, X0
	VZEROUPPER
	MOVSD        X0, ret+32(FP)
	RET

// func maxAbsBitsAVX2(x []float64) uint64
//
// The largest of the bit patterns of |x[i]| over the first 8·⌊len(x)/8⌋
// elements, compared as integers like maxAbs (non-negative after the sign
// bit is cleared, so a signed 64-bit compare orders them). Y6 holds the
// mask of everything but the sign bit; Y0 and Y1 two running maxima.
TEXT ·maxAbsBitsAVX2(SB), NOSPLIT, $0-32
	MOVQ         x_base+0(FP), SI
	MOVQ         x_len+8(FP), CX
	MOVQ         $0x7fffffffffffffff, AX
	MOVQ         AX, X6
	VPBROADCASTQ X6, Y6
	VPXOR        Y0, Y0, Y0
	VPXOR        Y1, Y1, Y1
	CMPQ         CX, $8
	JLT          doneabs

loopabs:
	VPAND     (SI), Y6, Y2
	VPAND     32(SI), Y6, Y3
	VPCMPGTQ  Y0, Y2, Y4
	VPBLENDVB Y4, Y2, Y0, Y0
	VPCMPGTQ  Y1, Y3, Y5
	VPBLENDVB Y5, Y3, Y1, Y1
	ADDQ      $64, SI
	SUBQ      $8, CX
	CMPQ      CX, $8
	JGE       loopabs

doneabs:
	VPCMPGTQ     Y0, Y1, Y4
	VPBLENDVB    Y4, Y1, Y0, Y0
	VEXTRACTI128 $1, Y0, X1
	VPCMPGTQ     X0, X1, X4
	VPBLENDVB    X4, X1, X0, X0
	VPSHUFD      $0x4e, X0, X1
	VPCMPGTQ     X0, X1, X4
	VPBLENDVB    X4, X1, X0, X0
	VZEROUPPER
	MOVQ         X0, ret+24(FP)
	RET
