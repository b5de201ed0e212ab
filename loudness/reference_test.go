package loudness

import (
	"math"
	"slices"
)

// This file holds plain, slow implementations of the true-peak
// interpolator and of the gated measurements, straight from the formulas,
// for the tests to cross-check the streaming ones against (like hash/crc32's
// simple and fast versions). They need the whole signal in memory.

// referenceTruePeak returns max |y| over every interpolated value y of x at
// oversampling factor (4, 2 or 1), with silence before x and, for the
// filter's tail, after it: output L·n+k = Σₜ hₖ[t]·x[n−t] for
// n = 0 … len(x)+10.
func referenceTruePeak(x []float64, factor int) float64 {
	at := func(i int) float64 {
		if i < 0 || i >= len(x) {
			return 0
		}
		return x[i]
	}
	peak := 0.0
	phases := phasesFor(factor)
	tail := history
	if factor == 1 {
		tail = 0
	}
	for n := 0; n < len(x)+tail; n++ {
		for _, h := range phases {
			y := 0.0
			for t, c := range h {
				y += c * at(n-t)
			}
			peak = max(peak, math.Abs(y))
		}
	}
	return peak
}

// referenceLoudness measures channels (each one channel's samples, not yet
// K-weighted) the plain way: K-weight each channel whole, cut 400 ms blocks
// and 3 s windows every 100 ms (block boundaries at round(k·rate/10)),
// compute each one's loudness and gate in the logarithmic domain exactly as
// BS.1770 and Tech 3342 write it.
func referenceLoudness(channels [][]float64, weights []float64, rate int) (integrated, lra, maxM, maxS Reading) {
	k := NewKWeighting(rate)
	filtered := make([][]float64, len(channels))
	for c, x := range channels {
		k.Reset()
		filtered[c] = k.Filter(nil, x)
	}
	frames := 0
	if len(channels) > 0 {
		frames = len(channels[0])
	}
	bound := func(k int) int { return (k*rate + 5) / 10 }
	windows := func(size int) []float64 { // loudness of each full window
		var l []float64
		for j := 0; bound(j+size) <= frames; j++ {
			lo, hi := bound(j), bound(j+size)
			z := 0.0
			for c, y := range filtered {
				sum := 0.0
				for _, v := range y[lo:hi] {
					sum += v * v
				}
				z += weights[c] * sum / float64(hi-lo)
			}
			l = append(l, -0.691+10*math.Log10(z))
		}
		return l
	}
	powerMean := func(l []float64) float64 {
		sum := 0.0
		for _, v := range l {
			sum += math.Pow(10, (v+0.691)/10)
		}
		return -0.691 + 10*math.Log10(sum/float64(len(l)))
	}
	gate := func(l []float64, threshold float64) []float64 {
		var kept []float64
		for _, v := range l {
			if v > threshold {
				kept = append(kept, v)
			}
		}
		return kept
	}

	blocks := windows(4)
	switch kept := gate(blocks, -70); {
	case len(blocks) == 0:
		integrated = undefined(whyTooShortBlock)
	case len(kept) == 0:
		integrated = undefined(whyBelowGate)
	default:
		integrated = defined(powerMean(gate(kept, powerMean(kept)-10)))
	}

	short := windows(30)
	switch kept := gate(short, -70); {
	case len(short) == 0:
		lra = undefined(whyTooShortWindow)
	case len(kept) == 0:
		lra = undefined(whyRangeBelowGate)
	default:
		kept = gate(kept, powerMean(kept)-20)
		slices.Sort(kept)
		n := float64(len(kept) - 1)
		lra = defined(kept[int(math.Round(n*0.95))] - kept[int(math.Round(n*0.10))])
	}

	highest := func(l []float64, tooShort, silent string) Reading {
		if len(l) == 0 {
			return undefined(tooShort)
		}
		if m := slices.Max(l); !math.IsInf(m, -1) {
			return defined(m)
		}
		return undefined(silent)
	}
	maxM = highest(blocks, whyTooShortBlock, whySilentBlocks)
	maxS = highest(short, whyTooShortShort, whySilentWindows)
	return integrated, lra, maxM, maxS
}
