//go:build !amd64 || purego

package loudness

// peak4Squares is peak4SquaresGo on platforms without a SIMD kernel.
func peak4Squares(w []float64, sq float64) float64 { return peak4SquaresGo(w, sq) }

// peak2Squares is peak2SquaresGo on platforms without a SIMD kernel.
func peak2Squares(w []float64, sq float64) float64 { return peak2SquaresGo(w, sq) }

// maxAbs is maxAbsGo on platforms without a SIMD kernel.
func maxAbs(x []float64) float64 { return maxAbsGo(x) }

// runMaxBits sets runMax[r] to max|x| over run r of peakRuns (w[32r :
// 32r+43], shorter at the end) for r < runs.
func runMaxBits(w []float64, runMax []float64, runs int) {
	n := len(w) - history
	for r := range runs {
		runMax[r] = maxAbs(w[r*skipRun : min((r+1)*skipRun, n)+history])
	}
}

// peak4Max32 is peak4Max32Go on platforms without a SIMD kernel.
func peak4Max32(w []float32) float32 { return peak4Max32Go(w) }

// narrow is narrowGo on platforms without a SIMD kernel.
func narrow(dst []float32, src []float64) { narrowGo(dst, src) }

// peak2Max32 is peak2Max32Go on platforms without a SIMD kernel.
func peak2Max32(w []float32) float32 { return peak2Max32Go(w) }
