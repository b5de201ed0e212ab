package fix

import (
	"math"
	"math/rand/v2"
)

// quantizer turns float samples (integer full scale ±1.0) into integer
// codes of a word length with TPDF dither: the sum of two independent
// uniform variables of one LSB each, triangular over ±1 LSB, added before
// rounding. With it the quantisation error is independent of the signal
// (no distortion products, no noise modulation) and white, with a total
// power of Δ²/4 (Δ²/12 from rounding plus Δ²/6 from the dither; Lipshitz,
// Wannamaker and Vanderkooy, "Quantization and Dither: A Theoretical
// Survey", J. AES 40(5), 1992, from memory).
//
// The generator is seeded with constants, so a file fixed twice comes out
// the same, and the pass that measures a candidate sees exactly the codes
// the writer then writes.
type quantizer struct {
	scale    float64 // 2^(bits−1)
	lo, hi   float64 // code range
	rng      *rand.PCG
	noDither bool
}

// newQuantizer returns a quantizer for bits-bit words (8 to 32).
func newQuantizer(bits int) *quantizer {
	s := math.Ldexp(1, bits-1)
	return &quantizer{scale: s, lo: -s, hi: s - 1, rng: rand.NewPCG(0x6b776569, 0x676820666978)}
}

// code returns the dithered integer code of v and whether it had to be
// clipped to the word's range.
func (q *quantizer) code(v float64) (int64, bool) {
	x := v * q.scale
	if !q.noDither {
		// Two independent uniform 32-bit values from one 64-bit draw;
		// their difference over 2³² is triangular on (−1, 1) LSB.
		u := q.rng.Uint64()
		x += (float64(u>>32) - float64(u&0xFFFFFFFF)) * 0x1p-32
	}
	x = math.Round(x)
	switch {
	case x > q.hi:
		return int64(q.hi), true
	case x < q.lo:
		return int64(q.lo), true
	}
	return int64(x), false
}

// value returns the float sample a code stands for (what a decoder reads).
func (q *quantizer) value(code int64) float64 { return float64(code) / q.scale }
