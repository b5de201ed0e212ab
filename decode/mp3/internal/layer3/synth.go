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
	// U[64i + j] is V[128i + j]: block 2i after the newest, value j;
	// U[64i + 32 + j] is V[128i + 96 + j]: block 2i + 1, value 32 + j.
	var u [16]*[32]float64
	for i := range 8 {
		u[2*i] = (*[32]float64)(f.v[(f.newest+2*i)&15][:32])
		u[2*i+1] = (*[32]float64)(f.v[(f.newest+2*i+1)&15][32:])
	}
	for j := range 32 {
		o[j] = u[0][j]*d[j] + u[1][j]*d[32+j] + u[2][j]*d[64+j] + u[3][j]*d[96+j] +
			u[4][j]*d[128+j] + u[5][j]*d[160+j] + u[6][j]*d[192+j] + u[7][j]*d[224+j] +
			u[8][j]*d[256+j] + u[9][j]*d[288+j] + u[10][j]*d[320+j] + u[11][j]*d[352+j] +
			u[12][j]*d[384+j] + u[13][j]*d[416+j] + u[14][j]*d[448+j] + u[15][j]*d[480+j]
	}
}
