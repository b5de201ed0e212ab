//go:build !amd64 || purego

package loudness

// peak4Squares is peak4SquaresGo on platforms without a SIMD kernel.
func peak4Squares(w []float64, sq float64) float64 { return peak4SquaresGo(w, sq) }

// peak2Squares is peak2SquaresGo on platforms without a SIMD kernel.
func peak2Squares(w []float64, sq float64) float64 { return peak2SquaresGo(w, sq) }

// maxAbs is maxAbsGo on platforms without a SIMD kernel.
func maxAbs(x []float64) float64 { return maxAbsGo(x) }

// fill is fillGo over the n samples src[0], src[stride], … on platforms
// without a SIMD kernel, and returns the largest bit pattern of |x|.
func (t *TruePeak) fill(src []float64, stride, n int) uint64 { return t.fillGo(src, stride, 0, n) }

// peak4Max32 is peak4Max32Go on platforms without a SIMD kernel.
func peak4Max32(w []float32) float32 { return peak4Max32Go(w) }

// peak2Max32 is peak2Max32Go on platforms without a SIMD kernel.
func peak2Max32(w []float32) float32 { return peak2Max32Go(w) }
