package layer3

// synthesis is one channel's polyphase synthesis filter bank
// (ISO/IEC 11172-3 §2.4.3.4.10.2, Figure A.2). The standard describes it
// for each 32 new subband samples S as
//
//  1. shift the 1024-value vector V by 64;
//  2. V[0..63] = matrixing of S;
//  3. U[64i + j] = V[128i + j], U[64i + 32 + j] = V[128i + 96 + j]
//     (i = 0..7, j = 0..31);
//  4. W = U · D (the 512-coefficient synthesis window);
//  5. output j = Σ_{i=0}^{15} W[j + 32i].
//
// Here V is a ring of 16 blocks of 64 values (no shifting: the newest
// block moves one place back each time), the matrixing is matrix (one
// 32-point DCT-II), and steps 3–5 are folded into one 16-term sum per
// output sample that reads V and D directly: 512 multiplications and 80
// for the DCT per 32 samples, against 2048 + 512 for the plain procedure.
type synthesis struct {
	v      [16][64]float64
	newest int // index in v of the block matrixed last
}

// run consumes 32 subband samples s and writes 32 output samples to out,
// with window d (ISO/IEC 11172-3 Table 3-B.3, D[i]).
func (f *synthesis) run(s *[32]float64, d *[512]float64, out []float64) {
	f.newest = (f.newest + 15) & 15 // one block back: the ring's "shift by 64"
	matrix(s, &f.v[f.newest])
	o := (*[32]float64)(out[:32])
	if !synthSumFast(&f.v, f.newest, d, o) {
		synthSum(&f.v, f.newest, d, o)
	}
}

// synthSum is steps 3–5: out[j] = Σ_{k=0}^{15} U_k[j] · D[32k + j], where
// U_2i[j] = V[128i + j] is value j of block 2i after the newest and
// U_2i+1[j] = V[128i + 96 + j] value 32 + j of block 2i + 1. The sum runs
// in the order k = 0..15 with every product rounded on its own (the
// conversions forbid fused multiply-adds), the order the AVX2 kernel
// (synth_avx2_amd64.s) keeps, so that the two give the same bits.
func synthSum(v *[16][64]float64, newest int, d *[512]float64, o *[32]float64) {
	var u [16]*[32]float64
	for i := range 8 {
		u[2*i] = (*[32]float64)(v[(newest+2*i)&15][:32])
		u[2*i+1] = (*[32]float64)(v[(newest+2*i+1)&15][32:])
	}
	for j := range 32 {
		o[j] = float64(u[0][j]*d[j]) + float64(u[1][j]*d[32+j]) + float64(u[2][j]*d[64+j]) + float64(u[3][j]*d[96+j]) +
			float64(u[4][j]*d[128+j]) + float64(u[5][j]*d[160+j]) + float64(u[6][j]*d[192+j]) + float64(u[7][j]*d[224+j]) +
			float64(u[8][j]*d[256+j]) + float64(u[9][j]*d[288+j]) + float64(u[10][j]*d[320+j]) + float64(u[11][j]*d[352+j]) +
			float64(u[12][j]*d[384+j]) + float64(u[13][j]*d[416+j]) + float64(u[14][j]*d[448+j]) + float64(u[15][j]*d[480+j])
	}
}
