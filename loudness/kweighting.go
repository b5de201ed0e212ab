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

// Filter K-weights src into dst stage by stage and returns dst; dst may
// be src, nil allocates. It is the plain reference for Energy, written as
// the textbook difference equation (Biquad.Filter) and sharing no
// arrangement with it: Energy fuses its multiply-adds and Filter does not,
// so the two agree within rounding (TestEnergyCrossCheck), not bit for bit.
func (k *KWeighting) Filter(dst, src []float64) []float64 {
	dst = k.Shelf.Filter(dst, src)
	return k.HighPass.Filter(dst, dst)
}

// Energy K-weights src and returns Σy² of the filtered samples without
// storing them. It runs both stages in one pass (the meter's hot loop) and
// leaves the state as Filter would.
//
// Every multiply-add is fused (math.FMA: one rounding, the same bits on
// every platform). The recursion is what sets the pace: each output waits
// on the one before, and with the feedback terms last and fused the
// loop-carried chain is one fused multiply-add per stage (about 4 cycles)
// where a rounded product and a subtraction took two operations (about
// 8). Only the go set runs this loop itself: arm64 and GOAMD64=v3 builds
// fuse inline, an amd64 build below v3 checks for FMA at every call
// (slower than the unfused loop was), and a CPU without FMA computes it
// in software (far slower). The feedforward terms come
// first, innermost the oldest input (b2·x2, then b1·x1, then b0·x), so the
// newest sample enters as late as the feedback allows:
//
//	u = fma(−a1, u1, fma(−a2, u2, fma(b0, x, fma(b1, x1, b2·x2))))
//	v = fma(−c1, v1, fma(−c2, v2, u + fma(−2, u1, u2)))
//	e = fma(v, v, e)
//
// The high-pass is the same form with the numerator [1, −2, 1]: 1·u2 = u2,
// fma(1, u, s) = u + s, so the SIMD kernels that run both stages as one
// biquad form (energyStagedAVX2) compute exactly these values. Every
// kernel of the go, avx2 and avx512 sets performs these operations in this
// order (kernels_test.go proves the bits); the sse2 set, which has no
// fused multiply-add, keeps energyUnfused, within the bound stated below.
func (k *KWeighting) Energy(src []float64) float64 {
	s, h := &k.Shelf, &k.HighPass
	b0, b1, b2, a1, a2 := s.B0, s.B1, s.B2, s.A1, s.A2
	c1, c2 := h.A1, h.A2
	x1, x2, u1, u2 := s.x1, s.x2, s.y1, s.y2
	v1, v2 := h.y1, h.y2
	var e float64
	for _, x := range src {
		u := math.FMA(-a1, u1, math.FMA(-a2, u2, math.FMA(b0, x, math.FMA(b1, x1, float64(b2*x2)))))
		v := math.FMA(-c1, v1, math.FMA(-c2, v2, u+math.FMA(-2, u1, u2)))
		x2, x1 = x1, x
		u2, u1 = u1, u
		v2, v1 = v1, v
		e = math.FMA(v, v, e)
	}
	s.x1, s.x2, s.y1, s.y2 = x1, x2, u1, u2
	// The high-pass input history is the shelf output history.
	h.x1, h.x2, h.y1, h.y2 = u1, u2, v1, v2
	return e
}

// The bound between the two forms (fused, Energy; unfused, energyUnfused).
//
// Per sample. Each stage, in either form, computes its output as the exact
// difference equation of the computed histories plus a local error δ[n]
// with |δ[n]| ≤ γ₅·T[n] (γₖ = k·2⁻⁵³/(1 − k·2⁻⁵³), the standard bound of a
// chain of at most five roundings, which both forms are: the unfused one
// rounds each product and each of the four additions, the fused one the
// first product and the four fused steps), T[n] the sum of the magnitudes
// of the terms. A stage's recursion carries δ on through 1/A(z), whose
// impulse response g is absolutely summable because the filter is stable:
// the output error is at most ‖g‖₁·max|δ|, and does not grow with the
// length of the stream. The shelf's error passes through the whole
// high-pass (‖h_hp‖₁ ≈ 2.27 at every rate). With M the largest |x| so far,
// |u| ≤ ‖h_shelf‖₁·M and |v| ≤ ‖h_shelf‖₁·‖h_hp‖₁·M, so T is a multiple of
// M, and the difference of the two forms, each within its error of exact
// arithmetic, is
//
//	|v_fused − v_unfused| ≤ β·M,
//	β = 2·γ₅·(‖h_hp‖₁·‖g_shelf‖₁·T_shelf + ‖g_hp‖₁·T_hp)
//
// with T_shelf = Σ|b| + Σ|a|·‖h_shelf‖₁ and T_hp = 4·‖h_shelf‖₁ +
// Σ|c|·‖h_shelf‖₁·‖h_hp‖₁ (fmaSampleBound in kweighting_fma_test.go
// computes it). The high-pass's ‖g‖₁ dominates: its two poles near z = 1
// (38 Hz) give about 1/(1 − r)², 4.0e4 at 48 kHz and 2.6e6 at 384 kHz, so
// β is 1.1e-9 at 48 kHz, 4.3e-9 at 96 kHz and 7.0e-8 at 384 kHz.
// TestFMASampleBound checks every output against β·M at every rate on
// programme, full-scale noise, spikes, a full-scale 20 Hz sine, a square
// wave, a DC offset and a signal that stops dead; the largest difference
// seen is 0.4 % of β·M (the roundings do not all lean one way).
//
// Per block and per figure. A block's energy E = Σv² then differs by at
// most 2·β·M·√(N·W·E) + N·W·(β·M)² + 2·γ₁₀₂₅·E (Cauchy–Schwarz over the N
// samples of each channel, W the sum of the channel weights; the last term
// the two forms' sums of at most 1024 squares a call), a relative
// difference of about 2·β·(M/rms): the ratio of the largest sample to the
// block's weighted RMS, which a derivation cannot cap (a block of decaying
// tail after a loud one), so the figures' bound is a measured one with a
// wide margin. fmaFigureTolerance, 1e-9 LU (the bound the file sections
// state), holds integrated loudness, loudness range and the maximum
// momentary and short-term loudness on stereo programme and full-scale
// noise at every rate from 8 to 384 kHz, 5.1 programme and the EBU Tech
// 3341/3342 signals; the largest difference seen is about 1e-13 LU
// (TestFMAFigures, which also checks every block energy against the
// bound above). It cannot grow with the length of a programme: the
// per-sample difference is bounded as shown and does not accumulate, the
// figures are means of gated blocks (above −70 LUFS and within 10 or 20 LU
// of the programme's level) or maxima (the loudest windows), so M/rms
// stays that of loud passages, and the roundings' signs vary, which is why
// the measured difference sits four orders of magnitude below the
// tolerance.

// energyUnfused is Energy as it was before the fused multiply-adds, every
// product rounded before it is added: the Go twin of energyPairSSE2 (SSE2
// has no fused multiply-add), which the sse2 set runs for a lone channel
// too, and the reference the fused form's bound is tested against
// (kweighting_fma_test.go). The float64(…) conversions forbid the compiler to
// fuse anything, so these are the same bits on every platform.
func (k *KWeighting) energyUnfused(src []float64) float64 {
	s, h := &k.Shelf, &k.HighPass
	b0, b1, b2, a1, a2 := s.B0, s.B1, s.B2, s.A1, s.A2
	c1, c2 := h.A1, h.A2
	x1, x2, u1, u2 := s.x1, s.x2, s.y1, s.y2
	v1, v2 := h.y1, h.y2
	var e float64
	for _, x := range src {
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

// energyGroups returns f[i].Energy(x[i]) (or what the kernel set's
// energyQuad, energyPair and energyOne return) into e[:len(f)] for 1 to 8
// filters, four at a time while four are left, then two, then one: what
// energyOct does where there is no eight-lane kernel. Every x[i] must be
// as long as x[0].
func energyGroups(f []*KWeighting, x [][]float64) (e [8]float64) {
	n := len(x[0])
	i := 0
	for ; i+4 <= len(f); i += 4 {
		q := energyQuad([4]*KWeighting{f[i], f[i+1], f[i+2], f[i+3]}, [4][]float64{x[i], x[i+1], x[i+2], x[i+3]})
		copy(e[i:], q[:])
	}
	for ; i+2 <= len(f); i += 2 {
		e[i], e[i+1] = energyPair(f[i], f[i+1], x[i], x[i+1][:n])
	}
	if i < len(f) {
		e[i] = energyOne(f[i], x[i][:n])
	}
	return e
}

// energyUpTo8 returns f[i].Energy(x[i]) (or what the kernel set's
// kernels return) into e[:len(f)] for 1 to 8 filters: five or more in one
// eight-lane call where the kernel set has one (energyOct), else four,
// two and one at a time (energyGroups). Every x[i] must be as long as
// x[0]. It is the choice Meter.addChannelEnergy and addEnergyBeside share.
func energyUpTo8(f []*KWeighting, x [][]float64) [8]float64 {
	if len(f) >= 5 && octEnergy() {
		return energyOct(f, x)
	}
	return energyGroups(f, x)
}

// addChannelEnergy adds to m.energy the weighted K-filtered energy of the n
// samples waiting in the inputs of channels ch (1 to 8, in channel order),
// in that order, through energyUpTo8. It is Meter.addEnergy's step, kept
// here beside the kernels it chooses.
func (m *Meter) addChannelEnergy(ch []int, n int) {
	var f [8]*KWeighting
	var x [8][]float64
	for i, c := range ch {
		f[i], x[i] = &m.filters[c], m.peaks[c].input(n)
	}
	e := energyUpTo8(f[:len(ch)], x[:len(ch)])
	for i, c := range ch {
		m.energy += m.weights[c] * e[i]
	}
}
