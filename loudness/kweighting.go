package loudness

import (
	"math"
	"math/cmplx"
)

// Biquad is a second-order IIR filter section
//
//	H(z) = (B0 + B1·z⁻¹ + B2·z⁻²) / (1 + A1·z⁻¹ + A2·z⁻²)
//
// with its float64 state (direct form I). The zero value passes nothing;
// build one with the coefficients and Reset it between streams.
type Biquad struct {
	B0, B1, B2, A1, A2 float64

	x1, x2, y1, y2 float64
}

// Reset clears the filter state.
func (f *Biquad) Reset() { f.x1, f.x2, f.y1, f.y2 = 0, 0, 0, 0 }

// Filter filters src into dst and returns dst. dst may be src; if dst is nil
// a new slice is allocated. Filter panics if dst is shorter than src.
func (f *Biquad) Filter(dst, src []float64) []float64 {
	if dst == nil {
		dst = make([]float64, len(src))
	}
	if len(dst) < len(src) {
		panic("loudness: Biquad.Filter: dst shorter than src")
	}
	x1, x2, y1, y2 := f.x1, f.x2, f.y1, f.y2
	for i, x := range src {
		y := f.B0*x + f.B1*x1 + f.B2*x2 - f.A1*y1 - f.A2*y2
		x2, x1 = x1, x
		y2, y1 = y1, y
		dst[i] = y
	}
	f.x1, f.x2, f.y1, f.y2 = x1, x2, y1, y2
	return dst[:len(src)]
}

// Response returns the complex frequency response H(e^{jω}) at freq Hz for
// sampleRate Hz.
func (f Biquad) Response(freq, sampleRate float64) complex128 {
	z1 := cmplx.Exp(complex(0, -2*math.Pi*freq/sampleRate)) // z⁻¹
	z2 := z1 * z1
	num := complex(f.B0, 0) + complex(f.B1, 0)*z1 + complex(f.B2, 0)*z2
	den := 1 + complex(f.A1, 0)*z1 + complex(f.A2, 0)*z2
	return num / den
}

// KWeighting is the BS.1770 K-weighting filter: a high-shelf "head" stage
// followed by the RLB high-pass, two biquads in series. Build it once per
// sample rate with NewKWeighting.
type KWeighting struct {
	Shelf, HighPass Biquad
}

// Parameters of the bilinear K-weighting design: with K = tan(π·fc/fs)
// they reproduce the published 48 kHz coefficients of ITU-R BS.1770-4/5
// Table 1 and 2 to about 1e-15 (the derivation is in the package doc).
const (
	shelfFreq    = 1681.974450955533  // Hz
	shelfQ       = 0.7071752369554196 // quality factor
	shelfGain    = 1.584864701130855  // Vh, +3.99984 dB
	shelfBandExp = 0.4996667741545416 // Vb = Vh^shelfBandExp
	highPassFreq = 38.13547087602444  // Hz
	highPassQ    = 0.5003270373238773 // quality factor

	// referenceRate is the one rate BS.1770 publishes coefficients for.
	referenceRate = 48000
)

// NewKWeighting designs the K-weighting filter for sampleRate Hz so that
// its magnitude response is that of the published 48 kHz filter, which is
// what BS.1770 asks of other rates:
//
//   - From 48 kHz up, both stages come from the bilinear transform of the
//     analog design behind the published table (at 48 kHz the table
//     itself, to about 1e-15).
//   - Below 48 kHz the bilinear transform squeezes the shelf towards
//     Nyquist (0.29 dB too much at 2.4 kHz at 8 kHz), so the shelf is
//     instead the biquad whose magnitude best fits the published shelf's
//     over the whole band of the rate (fitShelf).
//   - The published high-pass numerator [1, −2, 1] is not normalised: its
//     passband gain is a0(48 kHz) = 1 + K/Q + K² ≈ 1.004995 (+0.043 dB),
//     and with the same numerator at another rate that gain would follow
//     a0(fs) (+0.25 dB at 8 kHz). The numerator is scaled by
//     a0(48 kHz)/a0(fs) so the passband gain is the published one at
//     every rate. The factor is carried in the shelf's numerator (the two
//     stages are in series, so the response is the same) and the high-pass
//     keeps the exact [1, −2, 1], which Energy and the SIMD kernel use
//     without multiplying.
func NewKWeighting(sampleRate int) KWeighting {
	fs := float64(sampleRate)
	var k KWeighting

	if sampleRate < referenceRate && sampleRate >= MinSampleRate {
		k.Shelf = fitShelf(fs)
	} else {
		K := math.Tan(math.Pi * shelfFreq / fs)
		vb := math.Pow(shelfGain, shelfBandExp)
		a0 := 1 + K/shelfQ + K*K
		k.Shelf = Biquad{
			B0: (shelfGain + vb*K/shelfQ + K*K) / a0,
			B1: 2 * (K*K - shelfGain) / a0,
			B2: (shelfGain - vb*K/shelfQ + K*K) / a0,
			A1: 2 * (K*K - 1) / a0,
			A2: (1 - K/shelfQ + K*K) / a0,
		}
	}

	highPassA0 := func(fs float64) float64 {
		K := math.Tan(math.Pi * highPassFreq / fs)
		return 1 + K/highPassQ + K*K
	}
	K := math.Tan(math.Pi * highPassFreq / fs)
	a0 := highPassA0(fs)
	k.HighPass = Biquad{
		B0: 1, B1: -2, B2: 1,
		A1: 2 * (K*K - 1) / a0,
		A2: (1 - K/highPassQ + K*K) / a0,
	}
	if sampleRate != referenceRate {
		g := highPassA0(referenceRate) / a0
		k.Shelf.B0 *= g
		k.Shelf.B1 *= g
		k.Shelf.B2 *= g
	}
	return k
}

// Reset clears the state of both stages.
func (k *KWeighting) Reset() {
	k.Shelf.Reset()
	k.HighPass.Reset()
}

// Response returns the complex response of both stages at freq Hz.
func (k KWeighting) Response(freq, sampleRate float64) complex128 {
	return k.Shelf.Response(freq, sampleRate) * k.HighPass.Response(freq, sampleRate)
}

// Filter K-weights src into dst stage by stage (the plain reference for
// Energy) and returns dst; dst may be src, nil allocates.
func (k *KWeighting) Filter(dst, src []float64) []float64 {
	dst = k.Shelf.Filter(dst, src)
	return k.HighPass.Filter(dst, dst)
}

// Energy K-weights src and returns Σy² of the filtered samples without
// storing them. It runs both stages in one pass (the meter's hot loop) and
// leaves the state as Filter would.
func (k *KWeighting) Energy(src []float64) float64 {
	s, h := &k.Shelf, &k.HighPass
	b0, b1, b2, a1, a2 := s.B0, s.B1, s.B2, s.A1, s.A2
	c1, c2 := h.A1, h.A2
	x1, x2, u1, u2 := s.x1, s.x2, s.y1, s.y2
	v1, v2 := h.y1, h.y2
	var e float64
	for _, x := range src {
		// Terms that do not depend on the previous output first, so the
		// loop-carried chain is one multiply and one subtract per stage.
		// Each product is rounded before it is added (float64), which
		// forbids fused multiply-adds: the same bits on every platform,
		// and the same as energyPair's.
		u := (float64(b0*x) + float64(b1*x1) + float64(b2*x2) - float64(a2*u2)) - float64(a1*u1)
		v := (u - 2*u1 + u2 - float64(c2*v2)) - float64(c1*v1)
		x2, x1 = x1, x
		u2, u1 = u1, u
		v2, v1 = v1, v
		e += float64(v * v)
	}
	s.x1, s.x2, s.y1, s.y2 = x1, x2, u1, u2
	// The high-pass input history is the shelf output history.
	h.x1, h.x2, h.y1, h.y2 = u1, u2, v1, v2
	return e
}
