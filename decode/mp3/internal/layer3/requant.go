package layer3

import "math"

// Requantisation (ISO/IEC 11172-3 §2.4.3.4.7.1): a quantised line is, for
// long blocks,
//
//	xr = sign(is) · |is|^(4/3) · 2^((global_gain − 210)/4)
//	     · 2^−(scalefac_multiplier · (scalefac_l + preflag · pretab))
//
// and for short blocks window w
//
//	xr = sign(is) · |is|^(4/3) · 2^((global_gain − 210 − 8 · subblock_gain[w])/4)
//	     · 2^−(scalefac_multiplier · scalefac_s[w])
//
// with scalefac_multiplier 0.5, or 1 when scalefac_scale is set. Both
// factors come from tables built once: |is|^(4/3) for every magnitude a
// stream can code (15 + 2¹³ − 1 with 13 linbits), and the gain, a power
// of 2^(1/4), as one of four mantissas shifted by its integer exponent —
// no math.Pow per sample.

// maxQuantised is the largest |is|: 15 plus 13 linbits.
const maxQuantised = 15 + 1<<13 - 1

var pow43 [maxQuantised + 1]float64

// quarterPowers holds 2^(q/4) for q = 0..3.
var quarterPowers = [4]float64{1, math.Pow(2, 0.25), math.Sqrt2, math.Pow(2, 0.75)}

// pretab is the preemphasis added to the long-block scale factors when
// preflag is set (ISO/IEC 11172-3 Table 3-B.6) [memory].
var pretab = [22]int{0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 1, 1, 1, 1, 2, 2, 3, 3, 3, 2, 0}

func init() {
	for i := range pow43 {
		pow43[i] = math.Pow(float64(i), 4.0/3.0)
	}
}

// gain returns 2^(e/4) for any integer e.
func gain(e int) float64 {
	return math.Ldexp(quarterPowers[e&3], e>>2)
}

// requantLine returns xr for the quantised value v with the gain exponent
// e in quarter steps (2^(e/4)).
func requantLine(v int, g float64) float64 {
	sign := v >> 63 // 0 or -1
	x := pow43[(v^sign)-sign] * g
	// The sign of v onto the product, without a branch that the signs of
	// a spectrum would mispredict half the time.
	return math.Float64frombits(math.Float64bits(x) ^ uint64(sign)<<63)
}

// requantise turns the quantised lines is[:nonzero] of one granule and
// channel into xr (576 lines, zero beyond nonzero), per scale-factor band.
// Short lines stay in the coded order (band, window, line), which
// reordering changes later.
func requantise(is *[576]int, nonzero int, g *granule, sf *scaleFactors, rateIndex int, xr *[576]float64) {
	shift := 1 // scalefac_multiplier in quarter steps: 0.5 → 2, 1 → 4
	if g.sfScale {
		shift = 2
	}
	base := g.globalGain - 210
	long := &longBands[rateIndex]
	short := &shortBands[rateIndex]
	i := 0
	longEnd := 0 // lines coded as long bands
	switch {
	case !g.windowSwitching || g.blockType != 2:
		longEnd = 576
	case g.mixed:
		longEnd = 36
	}
	for sfb := 0; i < longEnd && i < nonzero; sfb++ {
		s := sf.long[sfb]
		if g.preflag {
			s += pretab[sfb]
		}
		f := gain(base - (s << shift))
		for end := min(long[sfb+1], nonzero); i < end; i++ {
			xr[i] = requantLine(is[i], f)
		}
	}
	if longEnd < 576 {
		sfb := 0
		if g.mixed {
			sfb = 3
		}
		for ; sfb < 13 && i < nonzero; sfb++ {
			width := short[sfb+1] - short[sfb]
			for w := range 3 {
				f := gain(base - 8*g.subblockGain[w] - (sf.short[sfb][w] << shift))
				for end := min(i+width, nonzero); i < end; i++ {
					xr[i] = requantLine(is[i], f)
				}
			}
		}
	}
	for ; i < 576; i++ {
		xr[i] = 0
	}
}
