//go:build !purego

package loudness

// splitFast is the first half of Meter.process for stereo on AVX2: it
// de-interleaves the n frames into the two detectors' inputs, their
// float32 copies and block maxima, whole 32-frame blocks in one pass
// (splitStereoAVX2; splitStereoAVX512 on the avx512 set) and the rest in Go (fillGo), raises the block's sample
// peaks and reports true. It reports false, having changed nothing that
// process does not overwrite, for other channel counts or kernel sets and
// for a chunk holding a sample the meter cannot measure (its magnitude bits
// exceed maxMagnitudeBits): Meter.splitChannel then counts and zeroes
// those. Copies, exact conversions and integer maxima: splitChannel's
// result bit for bit.
func (m *Meter) splitFast(frames []float64, n int) bool {
	if m.channels != 2 || kernels < avx2Kernels || n <= 0 {
		return false
	}
	frames = frames[:2*n]
	l, r := m.peaks[0], m.peaks[1]
	blocks := n / skipRun
	if blocks > 0 {
		split := splitStereoAVX2
		if kernels >= avx512Kernels {
			split = splitStereoAVX512
		}
		split(&frames[0], blocks, &l.buf[history], &r.buf[history], &l.w32[history], &r.w32[history], &l.blocks[0], &r.blocks[0])
	}
	var pl, pr uint64
	if done := blocks * skipRun; done < n {
		pl = l.fillGo(frames, 2, done, n)
		pr = r.fillGo(frames[1:], 2, done, n)
	}
	for k := range blocks {
		pl = max(pl, l.blocks[k][0])
		pr = max(pr, r.blocks[k][0])
	}
	if pl > maxMagnitudeBits || pr > maxMagnitudeBits {
		return false
	}
	m.raisePeak(0, pl)
	m.raisePeak(1, pr)
	return true
}

// splitStereoAVX2 is fillGo for both channels of blocks·32 stereo frames
// (split_avx2_amd64.s).
//
//go:noescape
func splitStereoAVX2(frames *float64, blocks int, l, r *float64, l32, r32 *float32, lb, rb *[2]uint64)

// splitStereoAVX512 is splitStereoAVX2 with the maxima by AVX-512 VL's
// VPMAXUQ, for the avx512 set (split_avx2_amd64.s).
//
//go:noescape
func splitStereoAVX512(frames *float64, blocks int, l, r *float64, l32, r32 *float32, lb, rb *[2]uint64)

// split6Fast is Meter.split6's pass with AVX2 (split6AVX2; split6AVX512 on
// the avx512 set) for the whole
// 32-frame blocks of the n frames: it fills the six detectors' inputs,
// float32 copies and block maxima and returns how many frames it did (0
// without AVX2, which leaves them all to the Go loop).
func (m *Meter) split6Fast(frames []float64, n int) int {
	blocks := n / skipRun
	if kernels < avx2Kernels || blocks == 0 {
		return 0
	}
	_ = frames[6*n-1]
	var dst split6Dst
	for c, tp := range m.peaks[:6] {
		dst.x[c], dst.x32[c], dst.blocks[c] = &tp.buf[history], &tp.w32[history], &tp.blocks[0]
	}
	if kernels >= avx512Kernels {
		split6AVX512(&frames[0], blocks, &dst)
	} else {
		split6AVX2(&frames[0], blocks, &dst)
	}
	return blocks * skipRun
}

// split6Dst are split6AVX2's outputs per channel: the detector's input,
// its float32 copy and its block maxima (the kernel reads them at offsets
// 0, 48 and 96).
type split6Dst struct {
	x      [6]*float64
	x32    [6]*float32
	blocks [6]*[2]uint64
}

// split6AVX2 is fillGo for all six channels of blocks·32 frames
// (split_avx2_amd64.s).
//
//go:noescape
func split6AVX2(frames *float64, blocks int, dst *split6Dst)

// split6AVX512 is split6AVX2 with the maxima by AVX-512 VL's VPMAXUQ, for
// the avx512 set (split_avx2_amd64.s).
//
//go:noescape
func split6AVX512(frames *float64, blocks int, dst *split6Dst)
