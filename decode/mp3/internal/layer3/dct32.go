package layer3

import "math"

// The polyphase synthesis (ISO/IEC 11172-3 §2.4.3.4.10.2, Figure
// A.2) starts, for every 32 new subband samples S[k], with the matrixing
//
//	V[i] = Σ_{k=0}^{31} cos((16 + i)(2k + 1)π/64) · S[k],   i = 0..63,
//
// a 64×32 matrix product. Its rows are those of a 32-point DCT-II,
// C[m] = Σ S[k] cos(πm(2k + 1)/64), read at m = 16 + i, and cosine
// symmetry maps every m to 0..31:
//
//	V[i] = C[16+i]   (i = 0..15)     V[16] = 0
//	V[i] = −C[48−i]  (i = 17..47)    V[i] = −C[i−48]  (i = 48..63)
//
// so matrixing is one DCT-II of 32 points: 1024 multiplications, done
// by an AVX2 kernel four at a time and only over the subbands up to the
// last non-zero one (the bands above an encoder's low-pass are all zero),
// which is faster than the scalar even/odd recursive factorisation with 80
// multiplications (Lee, 1984: B. G. Lee, "A new algorithm to compute the
// discrete cosine transform", IEEE Trans. ASSP 32(6)); that stays in the
// tests as a second form the product is checked against.

// dctMatrix[k][m] = cos(πm(2k + 1)/64), k = 0..15: what subband samples k
// and 31 − k add to DCT output m. Since cos(πm(63 − 2k)/64) =
// (−1)^m cos(πm(2k + 1)/64), sample 31 − k shares row k, added for even m
// and subtracted for odd m.
var dctMatrix [16][32]float64

func init() {
	for k := range 16 {
		for m := range 32 {
			dctMatrix[k][m] = math.Cos(math.Pi * float64(m*(2*k+1)) / 64)
		}
	}
}

// dct32 sets c to the unnormalised DCT-II of the first n values of s (the
// rest are zero): c[m] = Σ_{k<32} s[k] cos(πm(2k + 1)/64), 1 ≤ n ≤ 32, as
// c[m] = Σ_{k<min(n,16)} (s[k] ± s[31−k]) · dctMatrix[k][m] (+ for even m,
// − for odd): 512 multiplications. The sum runs in the order k = 0, 1, …
// with every product rounded on its own (no fused multiply-add), the order
// the AVX2 kernel (dct32_avx2_amd64.s, matrixFast) keeps, so that the two
// give the same bits.
func dct32(s *[32]float64, n int, c *[32]float64) {
	a, b := s[0]+s[31], s[0]-s[31]
	row := &dctMatrix[0]
	for m := 0; m < 32; m += 2 {
		c[m] = float64(a * row[m])
		c[m+1] = float64(b * row[m+1])
	}
	for k := 1; k < min(n, 16); k++ {
		a, b, row := s[k]+s[31-k], s[k]-s[31-k], &dctMatrix[k]
		for m := 0; m < 32; m += 2 {
			c[m] += float64(a * row[m])
			c[m+1] += float64(b * row[m+1])
		}
	}
}

// matrix computes the 64 values V of the synthesis matrixing from the 32
// subband samples s.
func matrix(s *[32]float64, v *[64]float64) {
	n := 32
	for n > 0 && s[n-1] == 0 {
		n--
	}
	if n > 0 && matrixFast(s, n, v) {
		return
	}
	matrixGo(s, n, v)
}

// matrixGo is matrix for samples that are zero from n on (0 ≤ n ≤ 32):
// the DCT (dct32), then V from it by the symmetries above. The AVX2 kernel
// (matrixFast) gives the same bits.
func matrixGo(s *[32]float64, n int, v *[64]float64) {
	var c [32]float64
	if n > 0 {
		dct32(s, n, &c)
	}
	hi, lo := (*[16]float64)(c[16:]), (*[16]float64)(c[:16])
	for i := range 16 {
		v[i] = hi[i]
		v[48+i] = -lo[i]
	}
	v[16] = 0
	mid := (*[31]float64)(v[17:48])
	for k := range 31 {
		mid[k] = -c[31-k] // V[17+k] = −C[31−k]
	}
}
