//go:build !purego

package loudness

import "math"

// splitFast is the first half of Meter.process for stereo on AVX2: it
// de-interleaves the n frames into the two true-peak inputs and raises the
// block's sample peaks in one pass, four frames at a time
// (splitStereoAVX2), and reports true. It reports false, having changed
// nothing that process does not overwrite, for other channel counts or
// kernel sets and for a chunk holding a sample the meter cannot measure
// (its magnitude bits exceed maxMagnitudeBits): Meter.splitChannel then
// counts and zeroes those. The result is the Go loop's bit for bit:
// copies, and a maximum of integers.
func (m *Meter) splitFast(frames []float64, n int) bool {
	if m.channels != 2 || kernels < avx2Kernels || n < 4 {
		return false
	}
	l, r := m.peaks[0].input(n), m.peaks[1].input(n)
	pl, pr := splitStereoAVX2(frames[:2*n], l, r)
	for i := n &^ 3; i < n; i++ {
		a, b := frames[2*i], frames[2*i+1]
		l[i], r[i] = a, b
		pl = max(pl, math.Float64bits(a)&^signBit)
		pr = max(pr, math.Float64bits(b)&^signBit)
	}
	if pl > maxMagnitudeBits || pr > maxMagnitudeBits {
		return false
	}
	m.blockPeak[0] = max(m.blockPeak[0], math.Float64frombits(pl))
	m.blockPeak[1] = max(m.blockPeak[1], math.Float64frombits(pr))
	return true
}

// splitStereoAVX2 de-interleaves the first 4·⌊len(l)/4⌋ stereo frames of
// frames into l and r (len(r) ≥ len(l), len(frames) ≥ 2·len(l)) and
// returns the largest bit pattern of |x| of each (split_avx2_amd64.s).
//
//go:noescape
func splitStereoAVX2(frames, l, r []float64) (pl, pr uint64)

// split6Fast is Meter.split6's loop with AVX2 (split6AVX2) for the first
// 4·⌊n/4⌋ frames: it fills the six inputs and returns each channel's
// largest bit pattern of |x| over those frames, and how many frames it did
// (0 without AVX2, which leaves them all to the Go loop).
func (m *Meter) split6Fast(frames []float64, n int) (p [6]uint64, done int) {
	if kernels < avx2Kernels || n < 4 {
		return p, 0
	}
	var dst [6]*float64
	for c := range dst {
		dst[c] = &m.peaks[c].input(n)[0]
	}
	split6AVX2(frames[:6*n], &dst, n, &p)
	return p, n &^ 3
}

// split6AVX2 de-interleaves the first 4·⌊n/4⌋ six-channel frames of frames
// (len(frames) ≥ 6n) into the six arrays of dst (each of at least n
// elements) and sets peaks[c] to the largest bit pattern of |x| of channel
// c over them (split_avx2_amd64.s).
//
//go:noescape
func split6AVX2(frames []float64, dst *[6]*float64, n int, peaks *[6]uint64)
