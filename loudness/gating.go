package loudness

import (
	"math"
	"slices"
)

// Gates of BS.1770-4/5 (integrated loudness) and EBU Tech 3342 (loudness
// range), SOURCES.md §1 and §3.
const (
	absoluteGate     = -70.0 // LKFS: blocks at or below never count
	relativeGate     = -10.0 // LU below the absolute-gated power mean (BS.1770, since 2011)
	rangeRelGate     = -20.0 // LU below the absolute-gated power mean (Tech 3342)
	rangeLowPercent  = 0.10  // Tech 3342: LRA = L95 − L10
	rangeHighPercent = 0.95
)

// loudnessOf is BS.1770's L = −0.691 + 10·log10(z) for a weighted sum z of
// channel mean squares.
func loudnessOf(z float64) float64 { return -0.691 + 10*math.Log10(z) }

// energyOf inverts loudnessOf: the weighted mean square that reads l.
func energyOf(l float64) float64 { return math.Pow(10, (l+0.691)/10) }

// Why texts for undefined readings.
const (
	whyTooShortBlock  = "shorter than one 400 ms gating block: BS.1770 defines no loudness"
	whyBelowGate      = "every 400 ms block is below the -70 LKFS absolute gate (silence or near-silence)"
	whyTooShortWindow = "shorter than one 3 s short-term window: EBU Tech 3342 defines no loudness range"
	whyRangeBelowGate = "every 3 s short-term window is below the -70 LUFS absolute gate (silence or near-silence)"
	whySilentBlocks   = "every 400 ms window is digital silence"
	whySilentWindows  = "every 3 s window is digital silence"
	whyTooShortShort  = "shorter than one 3 s short-term window"
)

// undefined returns a Reading with no value.
func undefined(why string) Reading { return Reading{Why: why} }

// defined returns a Reading holding v.
func defined(v float64) Reading { return Reading{Value: v, Defined: true} }

// gatedLoudness is BS.1770 gating over the weighted mean squares z of the
// 400 ms blocks: keep blocks above −70 LKFS, then those above the power mean
// of the kept ones less 10 LU, and return the loudness of their power mean.
// It compares energies, not logarithms.
func gatedLoudness(z []float64) Reading {
	if len(z) == 0 {
		return undefined(whyTooShortBlock)
	}
	abs := energyOf(absoluteGate)
	mean, n := meanAbove(z, abs)
	if n == 0 {
		return undefined(whyBelowGate)
	}
	mean, _ = meanAbove(z, max(abs, mean*math.Pow(10, relativeGate/10)))
	return defined(loudnessOf(mean))
}

// meanAbove returns the mean of the values of z strictly above gate, and
// how many there are: the power mean of the blocks a gate keeps.
func meanAbove(z []float64, gate float64) (mean float64, n int) {
	sum := 0.0
	for _, v := range z {
		if v > gate {
			sum += v
			n++
		}
	}
	if n == 0 {
		return 0, 0
	}
	return sum / float64(n), n
}

// loudnessRange is EBU Tech 3342 over the weighted mean squares z of the
// 3 s short-term windows at 10 Hz: keep windows above −70 LUFS, then those
// above the power mean of the kept ones less 20 LU, and return the spread
// between the 10th and 95th percentiles of their loudness. Percentiles are
// nearest-rank on the sorted values: index round((n−1)·p), 0-based (from
// memory of the Tech 3342 reference pseudo-code; it keeps a single
// stationary value at LRA 0).
func loudnessRange(z []float64) Reading {
	if len(z) == 0 {
		return undefined(whyTooShortWindow)
	}
	abs := energyOf(absoluteGate)
	mean, n := meanAbove(z, abs)
	if n == 0 {
		return undefined(whyRangeBelowGate)
	}
	rel := max(abs, mean*math.Pow(10, rangeRelGate/10))
	kept := make([]float64, 0, n)
	for _, v := range z {
		if v > rel {
			kept = append(kept, v)
		}
	}
	slices.Sort(kept)
	lo := kept[percentileIndex(len(kept), rangeLowPercent)]
	hi := kept[percentileIndex(len(kept), rangeHighPercent)]
	return defined(loudnessOf(hi) - loudnessOf(lo))
}

// percentileIndex is the nearest-rank index round((n−1)·p) into n sorted
// values.
func percentileIndex(n int, p float64) int {
	return int(math.Round(float64(n-1) * p))
}
