//go:build !purego

package loudness

// peak4Squares is peak4SquaresGo with the interpolator run several windows
// at a time in SIMD lanes: four with AVX2 (peak4QuadsAVX2), two with SSE2
// (part of every amd64 CPU; lane 0 computes output positions 4n…4n+3,
// lane 1 positions 4n+4…4n+7, from one unaligned load per tap). Each lane
// performs the very operations of the Go loop in the same order, so the
// result is bit-for-bit the same. The windows left over go to the next
// narrower kernel, the last odd one to the Go loop; the maximum does not
// depend on the order the windows are visited in.
func peak4Squares(w []float64, sq float64) float64 {
	switch {
	case kernels == goKernels:
		return peak4SquaresGo(w, sq)
	case kernels >= avx2Kernels:
		sq = peak4QuadsAVX2(w, sq)
		done := (len(w) - history) &^ 3
		if done <= 0 {
			break
		}
		w = w[done:]
	}
	sq = peak4PairsSSE2(w, sq)
	if n := len(w) - history; n > 0 && n%2 == 1 {
		sq = peak4SquaresGo(w[len(w)-interpolatorTaps:], sq)
	}
	return sq
}

// peak2Squares is peak2SquaresGo in SIMD lanes, as peak4Squares is
// peak4SquaresGo.
func peak2Squares(w []float64, sq float64) float64 {
	switch {
	case kernels == goKernels:
		return peak2SquaresGo(w, sq)
	case kernels >= avx2Kernels:
		sq = peak2QuadsAVX2(w, sq)
		done := (len(w) - history) &^ 3
		if done <= 0 {
			break
		}
		w = w[done:]
	}
	sq = peak2PairsSSE2(w, sq)
	if n := len(w) - history; n > 0 && n%2 == 1 {
		sq = peak2SquaresGo(w[len(w)-interpolatorTaps:], sq)
	}
	return sq
}

// maxAbs returns max|x| (0 for an empty slice) as maxAbsGo does; with AVX2
// eight elements at a time (the integer maximum of the bit patterns is
// exact, so the order does not matter).
func maxAbs(x []float64) float64 {
	if kernels < avx2Kernels || len(x) < 8 {
		return maxAbsGo(x)
	}
	m := maxAbsBitsAVX2(x)
	if tail := x[len(x)&^7:]; len(tail) > 0 {
		m = max(m, maxAbsBitsGo(tail))
	}
	return float64frombits(m)
}

// fill sets the detector's input sample i to src[i·stride] for i < n ≤
// chunkFrames, its float32 copy and the blocks' maxima, as fillGo does,
// and returns the largest bit pattern of |x| over the n samples: with AVX2
// the whole skipRun-sample blocks in one pass (fillAVX2, or fillAVX512 on
// the avx512 set; copies, exact conversions and integer maxima, so
// fillGo's result bit for bit), the rest in Go. len(src) must be at least (n−1)·stride+1.
func (t *TruePeak) fill(src []float64, stride, n int) uint64 {
	if n <= 0 {
		return 0
	}
	_ = src[(n-1)*stride]
	blocks := 0
	if kernels >= avx2Kernels {
		blocks = n / skipRun
	}
	var peak uint64
	if blocks > 0 {
		fillKernel := fillAVX2
		if kernels >= avx512Kernels {
			fillKernel = fillAVX512
		}
		fillKernel(&src[0], stride*8, blocks, &t.buf[history], &t.w32[history], &t.blocks[0])
		for _, b := range t.blocks[:blocks] {
			peak = max(peak, b[0])
		}
	}
	if done := blocks * skipRun; done < n {
		peak = max(peak, t.fillGo(src, stride, done, n))
	}
	return peak
}

// fillAVX2 is fillGo over the first blocks·skipRun samples src[0],
// src[stride/8], … (stride in bytes) into dst, dst32 and blocks, four
// samples a register (split_avx2_amd64.s).
//
//go:noescape
func fillAVX2(src *float64, stride, blocks int, dst *float64, dst32 *float32, out *[2]uint64)

// fillAVX512 is fillAVX2 with the maxima by AVX-512 VL's VPMAXUQ
// (split_avx2_amd64.s).
//
//go:noescape
func fillAVX512(src *float64, stride, blocks int, dst *float64, dst32 *float32, out *[2]uint64)

// peak4PairsSSE2 is peak4SquaresGo over the first 2·⌊(len(w)−11)/2⌋
// windows of w (truepeak_amd64.s).
//
//go:noescape
func peak4PairsSSE2(w []float64, sq float64) float64

// peak4QuadsAVX2 is peak4SquaresGo over the first 4·⌊(len(w)−11)/4⌋
// windows of w (truepeak_avx2_amd64.s).
//
//go:noescape
func peak4QuadsAVX2(w []float64, sq float64) float64

// peak2PairsSSE2 is peak2SquaresGo over the first 2·⌊(len(w)−11)/2⌋
// windows of w (truepeak_amd64.s).
//
//go:noescape
func peak2PairsSSE2(w []float64, sq float64) float64

// peak2QuadsAVX2 is peak2SquaresGo over the first 4·⌊(len(w)−11)/4⌋
// windows of w (truepeak_avx2_amd64.s).
//
//go:noescape
func peak2QuadsAVX2(w []float64, sq float64) float64

// maxAbsBitsAVX2 is maxAbsBitsGo over the first 8·⌊len(x)/8⌋ elements
// (truepeak_avx2_amd64.s).
//
//go:noescape
func maxAbsBitsAVX2(x []float64) uint64

// peak4Max32 is peak4Max32Go, with AVX-512 sixteen windows at a time
// (peak4Max32AVX512, which takes the last few in a masked group as well),
// with AVX2 eight at a time (peak4Max32AVX2, the same operations in every
// lane; the maximum does not depend on the order the windows are visited
// in) and the windows left over in the Go loop.
func peak4Max32(w []float32) float32 {
	if kernels >= avx512Kernels {
		return peak4Max32AVX512(w)
	}
	if kernels < avx2Kernels {
		return peak4Max32Go(w)
	}
	done := (len(w) - history) &^ 7
	if done <= 0 {
		return peak4Max32Go(w)
	}
	return max(peak4Max32AVX2(w), peak4Max32Go(w[done:]))
}

// peak2Max32 is peak2Max32Go, with AVX-512 sixteen windows at a time
// (peak2Max32AVX512) or AVX2 eight (peak2Max32AVX2), as peak4Max32.
func peak2Max32(w []float32) float32 {
	if kernels >= avx512Kernels {
		return peak2Max32AVX512(w)
	}
	if kernels < avx2Kernels {
		return peak2Max32Go(w)
	}
	done := (len(w) - history) &^ 7
	if done <= 0 {
		return peak2Max32Go(w)
	}
	return max(peak2Max32AVX2(w), peak2Max32Go(w[done:]))
}

// peak2Max32AVX2 is peak2Max32Go over the first 8·⌊(len(w)−11)/8⌋
// windows of w (truepeak32_avx2_amd64.s).
//
//go:noescape
func peak2Max32AVX2(w []float32) float32

// peak4Max32AVX512 is peak4Max32Go over every window of w
// (truepeak32_avx512_amd64.s; AVX-512 F and DQ).
//
//go:noescape
func peak4Max32AVX512(w []float32) float32

// peak2Max32AVX512 is peak2Max32Go over every window of w
// (truepeak32_avx512_amd64.s).
//
//go:noescape
func peak2Max32AVX512(w []float32) float32

// peak4Max32AVX2 is peak4Max32Go over the first 8·⌊(len(w)−11)/8⌋
// windows of w (truepeak32_avx2_amd64.s).
//
//go:noescape
func peak4Max32AVX2(w []float32) float32
