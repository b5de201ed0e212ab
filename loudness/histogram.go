package loudness

import "math"

// Bounded gating. BS.1770 gating and the EBU Tech 3342 loudness range are
// two-pass statistics: which blocks count depends on the mean of all of
// them, known only at the end. Keeping every block's energy costs 8 bytes
// per 100 ms (about 7 MB a day for each of the two statistics). A
// gatedValues keeps them exactly while there are at most exactLimit
// (about 1.8 hours), so shorter programmes get the textbook result to the
// last bit; beyond that it pours them into a levelHistogram and forgets
// them, and memory stops growing.
//
// # The histogram and its error bound
//
// Values above the absolute gate go into bins histogramStep (0.005 LU)
// wide, from −70 LUFS upwards; each bin keeps how many values it holds and
// the exact sum of their energies. Two things are kept exactly whatever the
// length: the sum and count of every value above the absolute gate (so the
// absolute-gated mean, and from it the relative gate, are exact), and the
// largest value. What the histogram loses is only the order of the values
// inside one bin, so:
//
//   - Integrated loudness. Every bin wholly above the relative gate counts
//     with its exact energy sum, so the only blocks that can be misjudged
//     are those in the one bin the gate falls in, all within 0.005 LU of
//     the gate. The bin counts whole when the mean energy of its blocks is
//     above the gate. If a fraction f of the kept blocks lies in that bin,
//     the power mean changes by a factor between 1/(1+f) and 1+f, so the
//     result by at most 10·log10(1+f) ≈ 4.3·f LU. Programme material spreads
//     its blocks over many LU, and the gate sits 10 LU below the mean, in
//     the thin lower tail: a bin there holds well under 0.1 % of the blocks
//     (f < 0.001), an error below 0.005 LU. Only a signal that parks a large
//     share of its blocks exactly 10 LU under its own mean could do worse.
//   - Loudness range. The relative gate (20 LU under the mean) is judged the
//     same way; the 10th and 95th percentiles are taken by rank over the
//     bins' counts and read as the centre of their bin, within 0.0025 LU of
//     the true value each, so the range is within 0.005 LU plus the gate
//     bin's share as above.
//
// TestHistogramMatchesExact compares both against the exact method on an
// hour of programme-like material (requirement: within 0.01 LU).
//
// The bins grow upwards only as far as the loudest value seen: 100 LU of
// range is 20 000 bins, 320 KB; the absurd worst case, audio near
// MaxMagnitude (+2000 LUFS), is 0.42 million bins, 6.7 MB.

// histogramStep is the width of a histogram bin in LU.
const histogramStep = 0.005

// exactLimit is how many values a gatedValues keeps exactly before it
// switches to its histogram: 2¹⁶ blocks of 100 ms, 1 h 49 min.
const exactLimit = 1 << 16

// levelHistogram counts values above the absolute gate in bins of
// histogramStep LU, with the exact energy sum of each bin.
type levelHistogram struct {
	count []int64
	sum   []float64
}

// binOf returns the bin of a weighted mean square z above the absolute gate.
func binOf(z float64) int {
	return max(0, int(math.Floor((loudnessOf(z)-absoluteGate)/histogramStep)))
}

// binCentre returns the loudness at the middle of bin i.
func binCentre(i int) float64 { return absoluteGate + (float64(i)+0.5)*histogramStep }

func (h *levelHistogram) add(z float64) {
	i := binOf(z)
	if i >= len(h.count) {
		grow := i + 1 - len(h.count)
		h.count = append(h.count, make([]int64, grow)...)
		h.sum = append(h.sum, make([]float64, grow)...)
	}
	h.count[i]++
	h.sum[i] += z
}

// firstAbove returns the first bin that counts as above the energy gate:
// every bin from it up lies above the gate, except that the bin the gate
// falls in counts when the mean of its values is above the gate.
func (h *levelHistogram) firstAbove(gate float64) int {
	if gate <= energyOf(absoluteGate) {
		return 0 // only values above the absolute gate were added
	}
	i := binOf(gate)
	if i < len(h.count) && h.count[i] > 0 && h.sum[i]/float64(h.count[i]) <= gate {
		i++
	}
	return i
}

// reset empties the histogram, keeping its storage.
func (h *levelHistogram) reset() {
	h.count, h.sum = h.count[:0], h.sum[:0]
}

// gatedValues collects the weighted mean squares of a stream of windows
// (400 ms blocks for gating, 3 s windows for the loudness range) in bounded
// memory; see the comment above.
type gatedValues struct {
	n      int64     // values added
	top    float64   // largest value added
	exact  []float64 // every value, while n ≤ exactLimit
	hist   levelHistogram
	binned bool    // exact has been poured into hist
	sumAbs float64 // Σ of the values above the absolute gate, in order
	nAbs   int64
	limit  int // exactLimit; lowered by tests
}

func newGatedValues() gatedValues { return gatedValues{limit: exactLimit} }

func (g *gatedValues) add(z float64) {
	g.n++
	g.top = max(g.top, z)
	above := z > energyOf(absoluteGate)
	if above {
		g.sumAbs += z
		g.nAbs++
	}
	if !g.binned {
		if len(g.exact) < g.limit {
			g.exact = append(g.exact, z)
			return
		}
		g.binned = true
		for _, v := range g.exact {
			if v > energyOf(absoluteGate) {
				g.hist.add(v)
			}
		}
		g.exact = g.exact[:0]
	}
	if above {
		g.hist.add(z)
	}
}

func (g *gatedValues) reset() {
	limit := g.limit
	exact := g.exact[:0]
	hist := g.hist
	hist.reset()
	*g = gatedValues{limit: limit, exact: exact, hist: hist}
}

// integrated is BS.1770 gating (see gatedLoudness) over the values added.
func (g *gatedValues) integrated() Reading {
	if !g.binned {
		return gatedLoudness(g.exact)
	}
	if g.nAbs == 0 {
		return undefined(whyBelowGate)
	}
	abs := energyOf(absoluteGate)
	gate := max(abs, g.sumAbs/float64(g.nAbs)*math.Pow(10, relativeGate/10))
	sum, n := 0.0, int64(0)
	for i := g.hist.firstAbove(gate); i < len(g.hist.count); i++ {
		sum += g.hist.sum[i]
		n += g.hist.count[i]
	}
	if n == 0 { // cannot happen: the top bin lies above any relative gate
		return undefined(whyBelowGate)
	}
	return defined(loudnessOf(sum / float64(n)))
}

// loudnessRange is EBU Tech 3342 (see loudnessRange) over the values added.
func (g *gatedValues) loudnessRange() Reading {
	if !g.binned {
		return loudnessRange(g.exact)
	}
	if g.nAbs == 0 {
		return undefined(whyRangeBelowGate)
	}
	abs := energyOf(absoluteGate)
	gate := max(abs, g.sumAbs/float64(g.nAbs)*math.Pow(10, rangeRelGate/10))
	first := g.hist.firstAbove(gate)
	var n int64
	for _, c := range g.hist.count[min(first, len(g.hist.count)):] {
		n += c
	}
	if n == 0 {
		return undefined(whyRangeBelowGate)
	}
	lo := g.binOfRank(first, int64(percentileIndex(int(n), rangeLowPercent)))
	hi := g.binOfRank(first, int64(percentileIndex(int(n), rangeHighPercent)))
	return defined(binCentre(hi) - binCentre(lo))
}

// binOfRank returns the bin holding the value of 0-based rank r among the
// values in bins first and up, in ascending order.
func (g *gatedValues) binOfRank(first int, r int64) int {
	var seen int64
	for i := first; i < len(g.hist.count); i++ {
		seen += g.hist.count[i]
		if seen > r {
			return i
		}
	}
	return len(g.hist.count) - 1
}

// levels counts the values above the absolute gate in bins of LevelStep
// LU from −70 LUFS up (see Series.ShortTermLevels): exactly while the
// values are kept, from the finer histogram bins (whole multiples of them)
// after.
func (g *gatedValues) levels() []int64 {
	abs := energyOf(absoluteGate)
	perLevel := int(math.Round(LevelStep / histogramStep))
	var out []int64
	count := func(i int, n int64) {
		if i >= len(out) {
			out = append(out, make([]int64, i+1-len(out))...)
		}
		out[i] += n
	}
	if !g.binned {
		for _, z := range g.exact {
			if z > abs {
				count(binOf(z)/perLevel, 1)
			}
		}
		return out
	}
	for i, n := range g.hist.count {
		if n > 0 {
			count(i/perLevel, n)
		}
	}
	return out
}

// maximum returns the loudness of the largest value, undefined with
// tooShort when there is none and with silent when all are zero.
func (g *gatedValues) maximum(tooShort, silent string) Reading {
	if g.n == 0 {
		return undefined(tooShort)
	}
	if g.top <= 0 {
		return undefined(silent)
	}
	return defined(loudnessOf(g.top))
}
