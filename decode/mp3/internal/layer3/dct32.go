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
// cos(πm(2k + 1)/64). Each level of Lee's recursion has its own function
// on fixed-size arrays, so that the compiler drops the bounds checks.
func dct32(x *[32]float64) {
	var a, b [16]float64
	sc := &dctScale[0]
	for k := range 16 {
		u, v := x[k], x[31-k]
		a[k] = u + v
		b[k] = (u - v) * sc[k]
	}
	dct16(&a, 1)
	dct16(&b, 1)
	for m := range 15 {
		x[2*m] = a[m]
		x[2*m+1] = b[m] + b[m+1]
	}
	x[30], x[31] = a[15], b[15]
}

func dct16(x *[16]float64, level int) {
	var a, b [8]float64
	sc := &dctScale[level]
	for k := range 8 {
		u, v := x[k], x[15-k]
		a[k] = u + v
		b[k] = (u - v) * sc[k]
	}
	dct8(&a, level+1)
	dct8(&b, level+1)
	for m := range 7 {
		x[2*m] = a[m]
		x[2*m+1] = b[m] + b[m+1]
	}
	x[14], x[15] = a[7], b[7]
}

func dct8(x *[8]float64, level int) {
	var a, b [4]float64
	sc := &dctScale[level]
	for k := range 4 {
		u, v := x[k], x[7-k]
		a[k] = u + v
		b[k] = (u - v) * sc[k]
	}
	dct4(&a, level+1)
	dct4(&b, level+1)
	for m := range 3 {
		x[2*m] = a[m]
		x[2*m+1] = b[m] + b[m+1]
	}
	x[6], x[7] = a[3], b[3]
}

func dct4(x *[4]float64, level int) {
	sc := &dctScale[level]
	a0, a1 := x[0]+x[3], x[1]+x[2]
	b0, b1 := (x[0]-x[3])*sc[0], (x[1]-x[2])*sc[1]
	s2 := dctScale[level+1][0]
	// the two 2-point DCTs
	a0, a1 = a0+a1, (a0-a1)*s2
	b0, b1 = b0+b1, (b0-b1)*s2
	x[0] = a0
	x[1] = b0 + b1
	x[2] = a1
	x[3] = b1
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
