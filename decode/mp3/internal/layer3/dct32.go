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
// so matrixing is one DCT-II of 32 points, computed here by the even/odd
// recursive factorisation (Lee, 1984: B. G. Lee, "A new algorithm to
// compute the discrete cosine transform", IEEE Trans. ASSP 32(6)): 80
// multiplications instead of 2048.

// dctScale[level][k] = 1 / (2 cos(π(2k + 1)/(2n))) for n = 32 >> level.
var dctScale [5][16]float64

func init() {
	for level := range 5 {
		n := 32 >> level
		for k := range n / 2 {
			dctScale[level][k] = 1 / (2 * math.Cos(math.Pi*float64(2*k+1)/float64(2*n)))
		}
	}
}

// dct32 replaces x with its unnormalised DCT-II: x[m] = Σ x[k]
// cos(πm(2k + 1)/64).
func dct32(x *[32]float64) {
	var scratch [32]float64
	dctLee(x[:], scratch[:], 0)
}

// dctLee is one level of Lee's recursion on x (len n, a power of two),
// with scratch of the same length.
func dctLee(x, scratch []float64, level int) {
	n := len(x)
	if n == 1 {
		return
	}
	if n == 2 {
		a, b := x[0], x[1]
		x[0] = a + b
		x[1] = (a - b) * dctScale[level][0]
		return
	}
	half := n / 2
	a, b := scratch[:half], scratch[half:n]
	sc := &dctScale[level]
	for k := range half {
		u, v := x[k], x[n-1-k]
		a[k] = u + v
		b[k] = (u - v) * sc[k]
	}
	dctLee(a, x[:half], level+1)
	dctLee(b, x[half:], level+1)
	for m := range half - 1 {
		x[2*m] = a[m]
		x[2*m+1] = b[m] + b[m+1]
	}
	x[n-2] = a[half-1]
	x[n-1] = b[half-1]
}

// matrix computes the 64 values V of the synthesis matrixing from the 32
// subband samples s.
func matrix(s *[32]float64, v *[64]float64) {
	c := *s
	dct32(&c)
	for i := range 16 {
		v[i] = c[16+i]
	}
	v[16] = 0
	for i := 17; i < 48; i++ {
		v[i] = -c[48-i]
	}
	for i := 48; i < 64; i++ {
		v[i] = -c[i-48]
	}
}
