package loudness

import (
	"math"
	"math/cmplx"
)

// The shelf below 48 kHz is fitted, not transformed. A biquad's squared
// magnitude is a ratio of two quadratics in φ = sin²(ω/2),
//
//	|H(e^jω)|² = (p0 + p1·φ + p2·φ²) / (1 + q1·φ + q2·φ²),
//
// so matching the published 48 kHz shelf's squared magnitude T(f) at many
// frequencies of the new rate is a linear least-squares problem in the five
// unknowns once each equation P(φ) − T·Q(φ) = 0 is weighted by 1/(T·Q):
// that weight makes the residual the relative error of |H|², i.e. an error
// in dB, and Q comes from the previous pass (Sanathanan–Koerner iteration;
// it settles in three or four passes). The biquad is then recovered from
// the two quadratics by spectral factorisation, keeping the zeros and poles
// inside the unit circle (the published shelf is minimum-phase too).

// fitPoints is the number of frequencies fitted, spaced logarithmically from
// fitLow to just below Nyquist; fitPasses the number of reweighted passes.
const (
	fitPoints = 400
	fitLow    = 10.0 // Hz
	fitPasses = 8
)

// publishedShelf is the high shelf of BS.1770-4/5 Table 1 at 48 kHz: the
// target response of every fitted shelf.
var publishedShelf = Biquad{B0: 1.53512485958697, B1: -2.69169618940638, B2: 1.19839281085285,
	A1: -1.69065929318241, A2: 0.73248077421585}

// fitShelf returns the biquad at fs Hz (fs < 48 kHz) whose magnitude
// response best matches the published 48 kHz shelf from fitLow to Nyquist.
func fitShelf(fs float64) Biquad {
	top := 0.999 * fs / 2
	phi := make([]float64, fitPoints)
	target := make([]float64, fitPoints)
	q := make([]float64, fitPoints)
	for i := range phi {
		f := fitLow * math.Pow(top/fitLow, float64(i)/(fitPoints-1))
		s := math.Sin(math.Pi * f / fs)
		phi[i] = s * s
		m := cmplx.Abs(publishedShelf.Response(f, referenceRate))
		target[i] = m * m
		q[i] = 1
	}
	var x [5]float64 // p0, p1, p2, q1, q2
	for range fitPasses {
		var m [5][5]float64
		var v [5]float64
		for i, p := range phi {
			t := target[i]
			w := 1 / (t * q[i])
			w *= w
			row := [5]float64{1, p, p * p, -t * p, -t * p * p}
			for a := range row {
				for b := range row {
					m[a][b] += w * row[a] * row[b]
				}
				v[a] += w * row[a] * t
			}
		}
		x = solve5(m, v)
		for i, p := range phi {
			q[i] = 1 + x[3]*p + x[4]*p*p
		}
	}
	a1, a2 := minimumPhase(1, x[3], x[4])
	n1, n2 := minimumPhase(x[0], x[1], x[2])
	// A monic A(z) has |A(e^j0)|² = (1 + a1 + a2)², which Q(0) = 1 must
	// match; scale B(z) = g·(1 + n1·z⁻¹ + n2·z⁻²) so that |B|²/|A|² = P/Q
	// at ω = 0, where P(0) = p0.
	dc := 1 + a1 + a2
	g := math.Sqrt(x[0]) * math.Abs(dc) / math.Abs(1+n1+n2)
	return Biquad{B0: g, B1: g * n1, B2: g * n2, A1: a1, A2: a2}
}

// solve5 solves m·x = v by Gaussian elimination with partial pivoting.
func solve5(m [5][5]float64, v [5]float64) [5]float64 {
	const n = 5
	for c := range n {
		p := c
		for r := c + 1; r < n; r++ {
			if math.Abs(m[r][c]) > math.Abs(m[p][c]) {
				p = r
			}
		}
		m[c], m[p] = m[p], m[c]
		v[c], v[p] = v[p], v[c]
		for r := c + 1; r < n; r++ {
			f := m[r][c] / m[c][c]
			for k := c; k < n; k++ {
				m[r][k] -= f * m[c][k]
			}
			v[r] -= f * v[c]
		}
	}
	var x [5]float64
	for r := n - 1; r >= 0; r-- {
		s := v[r]
		for k := r + 1; k < n; k++ {
			s -= m[r][k] * x[k]
		}
		x[r] = s / m[r][r]
	}
	return x
}

// minimumPhase returns c1, c2 of the monic polynomial 1 + c1·z⁻¹ + c2·z⁻²
// with both roots inside the unit circle whose squared magnitude on the
// unit circle is proportional to r0 + r1·φ + r2·φ². Each root φᵣ of the
// quadratic in φ gives a pair z, 1/z with z + 1/z = 2 − 4φᵣ (from
// φ = (2 − z − 1/z)/4 on the circle); the one inside is kept.
func minimumPhase(r0, r1, r2 float64) (c1, c2 float64) {
	d := cmplx.Sqrt(complex(r1*r1-4*r2*r0, 0))
	var z [2]complex128
	for i, root := range [2]complex128{(complex(-r1, 0) + d) / complex(2*r2, 0), (complex(-r1, 0) - d) / complex(2*r2, 0)} {
		c := 2 - 4*root
		s := cmplx.Sqrt(c*c - 4)
		z[i] = (c + s) / 2
		if w := (c - s) / 2; cmplx.Abs(w) < cmplx.Abs(z[i]) {
			z[i] = w
		}
	}
	return -real(z[0] + z[1]), real(z[0] * z[1])
}
