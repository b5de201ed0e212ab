package layer3

import (
	"math"
	"math/cmplx"
)

// The inverse MDCT of ISO/IEC 11172-3 §2.4.3.4.10.1,
//
//	x[i] = Σ_{k=0}^{n/2−1} X[k] cos(π/(2n) · (2i + 1 + n/2)(2k + 1)),  i = 0..n−1,
//
// with n = 36 (long blocks) or 12 (each short window).
//
// The long blocks' IMDCT is one product with a matrix that has the block
// type's window folded in (longIMDCT, imdctLong below): 648
// multiplications per subband, which the AVX2 kernel does four at a time,
// faster than a scalar factorisation with a quarter of the arithmetic
// (that factorisation stays in the tests as a second form the matrix is
// checked against).
//
// The short windows' IMDCT is a DCT-IV of N = n/2 points, u[j] = Σ X[k]
// cos(π/N (j + ½)(k + ½)), read at j = i + N/2 and folded by the DCT-IV's
// symmetries (u[−1−j] = u[j], u[2N−1−j] = −u[j]):
//
//	x[i] = u[i+N/2] (i < N/2),  −u[3N/2−1−i] (i < 3N/2),  −u[i−3N/2] (otherwise).
//
// The DCT-IV is computed through a complex DFT of N/2 points with a
// twiddle before and after (the textbook reduction: pack X[2m] + i·X[N−1−2m],
// rotate by e^(−iπ(m+¼)/N), transform, rotate by e^(−iπk/N), unpack).

// imdctTwiddles holds the pre- and post-rotations for N = 18 and 6.
type imdctTwiddles struct {
	pre, post []complex128
}

var (
	tw6 imdctTwiddles
	// w3[k] = e^(−2πik/3).
	w3 [3]complex128
)

func newTwiddles(n int) imdctTwiddles {
	t := imdctTwiddles{pre: make([]complex128, n/2), post: make([]complex128, n/2)}
	for m := range n / 2 {
		t.pre[m] = cmplx.Exp(complex(0, -math.Pi*(float64(m)+0.25)/float64(n)))
		t.post[m] = cmplx.Exp(complex(0, -math.Pi*float64(m)/float64(n)))
	}
	return t
}

func init() {
	tw6 = newTwiddles(6)
	for k := range 3 {
		w3[k] = cmplx.Exp(complex(0, -2*math.Pi*float64(k)/3))
	}
}

// dft3 is the 3-point DFT of (a, b, c).
func dft3(a, b, c complex128) (complex128, complex128, complex128) {
	return a + b + c, a + b*w3[1] + c*w3[2], a + b*w3[2] + c*w3[1]
}

// dct4of6 sets u to the DCT-IV of the 6 values x.
func dct4of6(x *[6]float64, u *[6]float64) {
	var t [3]complex128
	for m := range 3 {
		t[m] = complex(x[2*m], x[5-2*m]) * tw6.pre[m]
	}
	t[0], t[1], t[2] = dft3(t[0], t[1], t[2])
	for k := range 3 {
		y := t[k] * tw6.post[k]
		u[2*k], u[5-2*k] = real(y), -imag(y)
	}
}

// imdct12 sets out to the 12-point IMDCT of the 6 lines in.
func imdct12(in *[6]float64, out *[12]float64) {
	var u [6]float64
	dct4of6(in, &u)
	for i := range 3 {
		out[i] = u[i+3]
	}
	for i := 3; i < 9; i++ {
		out[i] = -u[8-i]
	}
	for i := 9; i < 12; i++ {
		out[i] = -u[i-9]
	}
}

// windows[blockType] are the long-block windows of §2.4.3.4.10.3 (block
// types 0 normal, 1 start, 3 stop; 2 is unused here) and shortWindow the
// short one, computed from their defining sines.
var (
	windows     [4][36]float64
	shortWindow [12]float64
)

func init() {
	for i := range 36 {
		windows[0][i] = math.Sin(math.Pi / 36 * (float64(i) + 0.5))
	}
	for i := range 36 {
		switch {
		case i < 18:
			windows[1][i] = windows[0][i]
		case i < 24:
			windows[1][i] = 1
		case i < 30:
			windows[1][i] = math.Sin(math.Pi / 12 * (float64(i-18) + 0.5))
		}
	}
	for i := range 36 {
		switch {
		case i < 6:
		case i < 12:
			windows[3][i] = math.Sin(math.Pi / 12 * (float64(i-6) + 0.5))
		case i < 18:
			windows[3][i] = 1
		default:
			windows[3][i] = windows[0][i]
		}
	}
	for i := range 12 {
		shortWindow[i] = math.Sin(math.Pi / 12 * (float64(i) + 0.5))
	}
}

// hybridBlock turns the 18 lines of one subband into 36 windowed time
// samples: one long IMDCT for block types 0, 1 and 3, or, for type 2, the
// three windowed 12-point IMDCTs of the interleaved short lines (in[3i+w]
// is line i of window w, the order after reordering) overlapped at
// offsets 6, 12 and 18 (§2.4.3.4.10.3).
func hybridBlock(in *[18]float64, blockType int, out *[36]float64) {
	if blockType != 2 {
		m := &longIMDCT[blockType]
		if !imdctLongFast(in, m, out) {
			imdctLong(in, m, out)
		}
		return
	}
	*out = [36]float64{}
	for w := range 3 {
		var x [6]float64
		for i := range 6 {
			x[i] = in[3*i+w]
		}
		var y [12]float64
		imdct12(&x, &y)
		for i := range 12 {
			out[6+6*w+i] += y[i] * shortWindow[i]
		}
	}
}

// longIMDCT[blockType][k][i] = window_blockType[i] · cos(π/72 · (2i + 19)
// · (2k + 1)): the 36-point IMDCT of §2.4.3.4.10.1 with the block type's
// window of §2.4.3.4.10.3 folded in (block types 0, 1 and 3; 2 is unused).
var longIMDCT [4][18][36]float64

func init() {
	for _, bt := range []int{0, 1, 3} {
		for k := range 18 {
			for i := range 36 {
				longIMDCT[bt][k][i] = windows[bt][i] * math.Cos(math.Pi/72*float64(2*i+19)*float64(2*k+1))
			}
		}
	}
}

// imdctLong sets out to the windowed IMDCT of the 18 lines in with the
// matrix m (a longIMDCT entry): out[i] = Σ_k in[k] · m[k][i], summed in the
// order k = 0..17 with every product rounded on its own (no fused
// multiply-add), the order the AVX2 kernel (imdct_avx2_amd64.s) keeps, so
// that the two give the same bits.
func imdctLong(in *[18]float64, m *[18][36]float64, out *[36]float64) {
	x := in[0]
	for i := range 36 {
		out[i] = float64(x * m[0][i])
	}
	for k := 1; k < 18; k++ {
		x, row := in[k], &m[k]
		for i := range 36 {
			out[i] += float64(x * row[i])
		}
	}
}
