//go:build !purego

package loudness

// peak4Squares is peak4SquaresGo with the interpolator run two windows at a
// time in the two lanes of SSE2 registers (part of every amd64 CPU): lane 0
// computes output positions 4n…4n+3, lane 1 positions 4n+4…4n+7, from one
// unaligned load per tap. Each lane performs the very operations of the Go
// loop in the same order, so the result is bit-for-bit the same. An odd last
// window is left to the Go loop.
func peak4Squares(w []float64, sq float64) float64 {
	sq = peak4PairsSSE2(w, sq)
	if n := len(w) - history; n > 0 && n%2 == 1 {
		sq = peak4SquaresGo(w[len(w)-interpolatorTaps:], sq)
	}
	return sq
}

// peak4PairsSSE2 is peak4SquaresGo over the first 2·⌊(len(w)−11)/2⌋
// windows of w (truepeak_amd64.s).
//
//go:noescape
func peak4PairsSSE2(w []float64, sq float64) float64
