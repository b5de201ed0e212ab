//go:build !amd64 || purego

package loudness

// peak4Squares is peak4SquaresGo on platforms without a SIMD kernel.
func peak4Squares(w []float64, sq float64) float64 { return peak4SquaresGo(w, sq) }
