// Package loudness is kweigh's measurement engine: ITU-R BS.1770-4/5
// K-weighting, gated integrated loudness, momentary and short-term loudness
// (EBU Tech 3341), loudness range (EBU Tech 3342) and oversampled true peak
// (BS.1770 Annex 2). It works on interleaved float64 samples and knows
// nothing of files.
//
// # K-weighting
//
// Each channel passes two biquads in series, a high shelf of about +4 dB
// above 2 kHz (the acoustic effect of the head) and a high-pass near 38 Hz
// (the "revised low-frequency B" curve):
//
//	H(z) = (b0 + b1·z⁻¹ + b2·z⁻²) / (1 + a1·z⁻¹ + a2·z⁻²)
//
// BS.1770 publishes the coefficients for 48 kHz only and asks other rates
// for the same response. From 48 kHz up NewKWeighting designs them by the
// bilinear transform with K = tan(π·fc/fs):
//
//	shelf:     a0 = 1 + K/Q + K²
//	           b0 = (Vh + Vb·K/Q + K²)/a0   b1 = 2(K² − Vh)/a0
//	           b2 = (Vh − Vb·K/Q + K²)/a0   a1 = 2(K² − 1)/a0   a2 = (1 − K/Q + K²)/a0
//	high-pass: b = [1, −2, 1]·a0(48 kHz)/a0(fs), a1, a2 as above with its own fc, Q
//
// with fc = 1681.97 Hz, Q = 0.70718, Vh = +4.0 dB, Vb = Vh^0.49967 for the
// shelf and fc = 38.135 Hz, Q = 0.50033 for the high-pass. At 48 kHz this
// reproduces the published table to about 1e-15. The published high-pass
// numerator is not divided by its a0, so the published filter's passband
// gain is a0(48 kHz) = 1.004995 (+0.043 dB); the scale factor keeps that
// gain at every rate instead of letting it follow a0(fs).
//
// Below 48 kHz the bilinear transform squeezes the shelf towards Nyquist
// (by up to 0.29 dB near 2.4 kHz at 8 kHz), so there the shelf is the
// biquad whose magnitude best fits the published shelf's from 10 Hz to
// Nyquist: a reweighted linear least-squares fit of |H|² as a ratio of
// quadratics in sin²(ω/2), then spectral factorisation (kweighting_fit.go).
// From 20 Hz to 0.4·fs the whole filter stays within 0.01 dB of the
// published 48 kHz response at every rate from 8 to 384 kHz.
//
// # Loudness of an interval
//
// With zᵢ the mean square of K-weighted channel i over the interval and Gᵢ
// its weight (1.0 front, 1.41 surround, LFE left out; see Weights):
//
//	L = −0.691 + 10·log10(Σᵢ Gᵢ·zᵢ)  LKFS (= LUFS)
//
// The constant makes a 997 Hz sine at 0 dBFS in one front channel read
// −3.01 LKFS.
//
// # Integrated loudness (gating)
//
// The stream is cut into 400 ms blocks every 100 ms (75 % overlap) from its
// start; a last, incomplete block is dropped. Blocks at or below −70 LKFS
// (absolute gate) are discarded; of the rest, those at or below the
// loudness of their power mean less 10 LU (relative gate) are discarded;
// the integrated loudness is the loudness of the power mean of what is
// left. With no block left there is no value: Reading.Defined is false.
//
// # Momentary, short-term and loudness range
//
// Momentary loudness is L over the last 400 ms, short-term over the last
// 3 s, both ungated and updated every 100 ms (Series). The loudness range
// (EBU Tech 3342) takes the short-term values, drops those at or below
// −70 LUFS, then those at or below their power mean less 20 LU, and is the
// difference between the 95th and 10th percentiles of the rest, taken by
// nearest rank (index round((n−1)·p) in the sorted values).
//
// The meter keeps the weighted sums of squares of the last 30 blocks of
// 100 ms and builds every window from those; at rates where 100 ms is not a
// whole number of samples, block k ends at sample round(k·fs/10).
//
// # Bounded memory
//
// Gating and the loudness range need every window's value until the end.
// The meter keeps them exactly for 2¹⁶ blocks (1 h 49 min), so shorter
// programmes get the textbook result to the last bit; past that it keeps a
// histogram of 0.005 LU bins with the exact energy sum of each bin, and the
// exact absolute-gated mean, so integrated loudness and loudness range stay
// within a few thousandths of an LU of the exact method on programme
// material (histogram.go argues the bound). The maxima are running maxima;
// the 10 Hz series are decimated to the extremes of growing stretches once
// they reach 2¹⁶ elements (see Series). A day of audio needs the same few
// megabytes as an hour.
//
// # True peak
//
// The signal is oversampled 4× below 88.2 kHz, 2× from 88.2 kHz and not at
// all from 176.4 kHz by the 48-tap, 4-phase interpolator of BS.1770 Annex 2;
// the true peak is the largest magnitude of the oversampled signal (the
// Annex's −12.04 dB pre-attenuation only protects fixed-point arithmetic
// and is not needed in floating point). The 2× interpolator uses phases 0 and 2 of
// the same table: it reads the same interpolated waveform at half the
// density. The interpolator lets through up to ≈0.2 dB of ripple and, at
// 4× and 48 kHz, can miss up to 0.47 dB of a 20 kHz peak between its
// points; EBU Tech 3341 allows +0.2/−0.4 dB.
//
// Speed comes from two exact shortcuts. Phases 3 and 2 are phases 0 and 1
// reversed, so sums and differences of mirrored input pairs give two phases
// from one set of products. And a run of input whose 12-sample
// neighbourhood has magnitudes at most m cannot interpolate above
// m·maxₖΣₜ|hₖ[t]|; when that bound is below the highest value already found
// in the current 100 ms block, the run is skipped (the run with the largest
// sample goes first, and consecutive runs that cannot be skipped go to the
// interpolator together). Plain reference implementations in the tests
// check that neither changes a result.
//
// The interpolator adds in float32 (truepeak32.go): eight windows per AVX2
// register instead of four. PCM samples of up to 24 bits and every
// coefficient are exact in float32; the sums' rounding moves a peak by at
// most 1.2·10⁻⁶ of the largest sample nearby (peak32Error: about 1e-5 dB,
// asserted against the float64 interpolator within 1e-4 dB), and the skip
// bound is widened by 1e-5 so that skipping stays exact for the float32
// values. The running maximum and the result are float64. Chunks with a
// sample above 2⁶⁰ or all below 2⁻⁶⁰ in magnitude use the float64
// interpolator.
//
// # SIMD kernels
//
// On amd64 the hot loops run in assembly: SSE2 (two values per
// instruction) on every CPU, AVX2 (four) where the CPU has it. The
// K-weighting recursion waits for each output before the next, so the
// kernels fill the lanes with independent recursions: SSE2 filters two
// channels side by side; AVX2 puts a stereo pair's two shelves and two
// high-passes in the four lanes of one register, the high-passes three
// samples behind (the high-pass numerator [1, −2, 1] multiplies exactly,
// so both stages are one biquad form), filters four channels at once for
// surround, and an odd channel as a pair with a copy of itself. The
// interpolator computes consecutive windows in the lanes (two groups of
// four per iteration with AVX2, so the loads of each coefficient and the
// long chains of additions are shared between more work); AVX2 also
// finds the maxima for the skip test of a whole chunk in one pass, and
// de-interleaves stereo and 5.1 with the sample peak in one pass. Each
// lane performs the operations of the Go loops in the same order, and
// those loops round every product before adding it (no fused
// multiply-add), so the figures are the same to the last bit with or
// without the kernels. Elsewhere, or with the build tag purego, the Go
// loops run. One exception: the SSE2 set keeps the float64 interpolator,
// so its true peaks differ from the other sets' float32 ones, within
// peak32Error.
//
// # Bad samples
//
// Float input may exceed full scale and is measured as it is, up to
// ±MaxMagnitude (1e100): within that bound every figure is finite (the
// constant's comment argues why). NaN, ±Inf and larger samples are measured
// as 0 and counted in Result.Rejected, so that one bad sample cannot poison
// the filter state for the rest of the stream; a caller refuses the stream.
package loudness
