package loudness

import "math"

// The true-peak interpolators in float32.
//
// The interpolator is most of a measurement's arithmetic, and float32
// lanes do twice the work per SIMD instruction of float64 ones. Nothing the
// detector reports needs more: the samples of 16- and 24-bit PCM are exact
// in float32, every coefficient (and every folded coefficient of
// peak4SquaresGo) is a multiple of 2⁻¹⁴ below 1 and so exact too, and the
// error of the float32 sums is bounded and far below what a dBTP figure
// shows (peak32Error: about 1e-5 dB). The running maximum and the returned
// peak stay float64; the float32 maximum converts exactly.
//
// Where the sets use them: the go set (peak4Max32Go, peak2Max32Go, the
// references), the avx2 set (peak4Max32AVX2, peak2Max32AVX2, bit for bit
// the same) and the avx512 set (peak4Max32AVX512, peak2Max32AVX512, the
// same again), so the go, avx2 and avx512 sets give the same bits on every
// platform;
// the sse2 set keeps the float64 kernels, whose peaks differ from the
// float32 ones by no more than peak32Error allows. A chunk whose largest
// |x| lies outside [2⁻⁶⁰, 2⁶⁰] (or is not finite) goes to the float64
// kernels on every set, so that float32's range never matters.

// u32 is the unit roundoff of float32 (round to nearest).
const u32 = 0x1p-24

// roundings32 returns the longest chain of float32 roundings behind one
// interpolated value at factor: at 4× (peak4Max32Go) the sample's
// conversion, the sum or difference of the pair, the product, five
// additions of the six products and the final P ± Q; at 2× (peak2Max32Go)
// the conversion, the product and eleven additions.
func roundings32(factor int) int {
	if factor == 2 {
		return 13
	}
	return 9
}

// foldedGain returns maxₖ Σₜ₌₀…₅ 2·max(|hₖ[t]|, |hₖ[11−t]|) over the 4×
// phases: with the pair coefficients c₊ = (hₖ[t]+hₖ[11−t])/2 and
// c₋ = (hₖ[t]−hₖ[11−t])/2 of the folded form, |c₊|·|a+b| + |c₋|·|a−b| is
// at most max(|hₖ[t]|, |hₖ[11−t]|)·(|a|+|b|), so this times max|x| bounds
// the sum of the magnitudes of all the terms one output adds.
func foldedGain() float64 {
	g := 0.0
	for _, h := range annex2Phases() {
		s := 0.0
		for t := range interpolatorTaps / 2 {
			s += 2 * max(math.Abs(h[t]), math.Abs(h[interpolatorTaps-1-t]))
		}
		g = max(g, s)
	}
	return g
}

// termGain32 returns the factor that, times max|x|, bounds the sum of the
// magnitudes of the terms of one float32 output at factor: foldedGain at
// 4×, peakGain(2) at 2× (plain sums).
func termGain32(factor int) float64 {
	if factor == 2 {
		return peakGain(2)
	}
	return foldedGain()
}

// peak32Error returns the bound on |y₃₂ − y₆₄| for every interpolated value
// at factor (4 or 2) of a stretch whose inputs have max|x| = m (m within
// [2⁻⁶⁰, 2⁶⁰]), where y₃₂ is the float32 kernel's value and y₆₄ the
// float64 one's (peak4SquaresGo, peak2SquaresGo): each term of the float32
// sum carries at most n = roundings32 relative errors of u32, so the sum is
// off by at most γₙ·Σ|terms| ≤ γₙ·termGain32·m (γₙ = n·u/(1−n·u), the
// standard bound of a chain of n roundings); the float64 value is off from
// the exact one by γ₁₃ of 2⁻⁵³ at most, added generously as 1e-15. Values
// below 2⁻¹²⁶ underflow in float32 with an absolute error of at most 2⁻¹⁴⁹
// per operation: 2⁻¹⁴⁰ covers them. The largest of such values is off by
// no more than the largest error, so the same bound holds for the peak.
func peak32Error(factor int, m float64) float64 {
	n := float64(roundings32(factor))
	gamma := n * u32 / (1 - n*u32)
	return (gamma+1e-15)*termGain32(factor)*m + 0x1p-140
}

// skipSlack widens the skip test of peakRuns for the float32 kernels: a
// float32 value can exceed gain·max|x| by at most γₙ·termGain32·max|x|,
// under 1.3·10⁻⁶ of it at 4× and 7.8·10⁻⁷ at 2× (TestPeak32Bound checks
// the margin).
const skipSlack = 1 + 1e-5

// narrowable reports whether a chunk whose largest |x| is m goes to the
// float32 kernel: m within [2⁻⁶⁰, 2⁶⁰], far from float32's overflow and
// underflow (NaN is not).
func narrowable(m float64) bool { return m >= 0x1p-60 && m <= 0x1p60 }

// narrowGo sets dst[i] = float32(src[i]) (round to nearest even, as every
// conversion the fill and split kernels make).
func narrowGo(dst []float32, src []float64) {
	dst = dst[:len(src)]
	for i, v := range src {
		dst[i] = float32(v)
	}
}

// abs32 is |v| by clearing the sign bit (NaN stays NaN).
func abs32(v float32) float32 { return math.Float32frombits(math.Float32bits(v) &^ (1 << 31)) }

// peak4Max32Go returns the largest |y| over the 4× interpolated values y of
// the float32 inputs w[11:], w[:11] being their history, computed in
// float32 (0 if there are none; a NaN y is ignored): peak4SquaresGo's
// folded sums, term for term in the same order, and the reference for the
// SIMD kernels. The float32 conversions round every product before it is
// added, so that the compiler cannot fuse them into FMAs (GOAMD64=v3,
// arm64): the SIMD kernels do not fuse either.
func peak4Max32Go(w []float32) float32 {
	var m float32
	for i := 0; i+interpolatorTaps <= len(w); i++ {
		x := (*[interpolatorTaps]float32)(w[i : i+interpolatorTaps])
		s, d := x[11]+x[0], x[11]-x[0]
		p := float32((h0t0 + h0t11) / 2 * s)
		r := float32((h1t0 + h1t11) / 2 * s)
		q := float32((h0t0 - h0t11) / 2 * d)
		u := float32((h1t0 - h1t11) / 2 * d)
		s, d = x[10]+x[1], x[10]-x[1]
		p += float32((h0t1 + h0t10) / 2 * s)
		r += float32((h1t1 + h1t10) / 2 * s)
		q += float32((h0t1 - h0t10) / 2 * d)
		u += float32((h1t1 - h1t10) / 2 * d)
		s, d = x[9]+x[2], x[9]-x[2]
		p += float32((h0t2 + h0t9) / 2 * s)
		r += float32((h1t2 + h1t9) / 2 * s)
		q += float32((h0t2 - h0t9) / 2 * d)
		u += float32((h1t2 - h1t9) / 2 * d)
		s, d = x[8]+x[3], x[8]-x[3]
		p += float32((h0t3 + h0t8) / 2 * s)
		r += float32((h1t3 + h1t8) / 2 * s)
		q += float32((h0t3 - h0t8) / 2 * d)
		u += float32((h1t3 - h1t8) / 2 * d)
		s, d = x[7]+x[4], x[7]-x[4]
		p += float32((h0t4 + h0t7) / 2 * s)
		r += float32((h1t4 + h1t7) / 2 * s)
		q += float32((h0t4 - h0t7) / 2 * d)
		u += float32((h1t4 - h1t7) / 2 * d)
		s, d = x[6]+x[5], x[6]-x[5]
		p += float32((h0t5 + h0t6) / 2 * s)
		r += float32((h1t5 + h1t6) / 2 * s)
		q += float32((h0t5 - h0t6) / 2 * d)
		u += float32((h1t5 - h1t6) / 2 * d)
		// v > m || -v > m is |v| > m without moving v to an integer
		// register (rarely true, so well predicted); NaN fails both.
		if v := p + q; v > m || -v > m {
			m = abs32(v)
		}
		if v := p - q; v > m || -v > m {
			m = abs32(v)
		}
		if v := r + u; v > m || -v > m {
			m = abs32(v)
		}
		if v := r - u; v > m || -v > m {
			m = abs32(v)
		}
	}
	return m
}

// annex2Phase0f32 and annex2Phase1f32 are annex2Phase0 and annex2Phase1
// in float32 (multiples of 2⁻¹³ below 1: exact).
var (
	annex2Phase0f32 = [interpolatorTaps]float32{
		h0t0, h0t1, h0t2, h0t3, h0t4, h0t5, h0t6, h0t7, h0t8, h0t9, h0t10, h0t11,
	}
	annex2Phase1f32 = [interpolatorTaps]float32{
		h1t0, h1t1, h1t2, h1t3, h1t4, h1t5, h1t6, h1t7, h1t8, h1t9, h1t10, h1t11,
	}
)

// peak2Max32Go is peak4Max32Go for 2× oversampling: phases 0 and 2, each
// output the plain 12-tap sum, tap 0 first, as peak2SquaresGo; the
// reference for the SIMD kernels.
func peak2Max32Go(w []float32) float32 {
	h0, h2 := &annex2Phase0f32, &annex2Phase1f32
	var m float32
	for i := 0; i+interpolatorTaps <= len(w); i++ {
		x := (*[interpolatorTaps]float32)(w[i : i+interpolatorTaps])
		var y0, y2 float32
		for t := range interpolatorTaps {
			y0 += float32(h0[t] * x[interpolatorTaps-1-t])
			y2 += float32(h2[t] * x[t]) // phase 2 = phase 1 reversed
		}
		if y0 > m || -y0 > m {
			m = abs32(y0)
		}
		if y2 > m || -y2 > m {
			m = abs32(y2)
		}
	}
	return m
}

// peak2Narrow is peak4Narrow at 2×.
func peak2Narrow(w []float32, floor float64) float64 {
	return max(floor, float64(peak2Max32(w)))
}

// peak4Narrow is peak4 on the float32 copy w of the window: max(floor,
// the largest float32 |y|) in float64.
func peak4Narrow(w []float32, floor float64) float64 {
	return max(floor, float64(peak4Max32(w)))
}

// narrow32 reports whether the detector's interpolator (4× or 2×) runs in
// float32: on the go, avx2 and avx512 sets, unless a test asked for the float64
// one (wide).
func (t *TruePeak) narrow32() bool { return !t.wide && kernels != sse2Kernels }
