package layer3

import "math"

// The stages between requantisation and the polyphase synthesis
// (ISO/IEC 11172-3 §2.4.3.4.8–§2.4.3.4.10): M/S stereo, reordering of
// short blocks, alias reduction, and the hybrid filter bank's IMDCT with
// overlap-add and frequency inversion, producing 18 samples for each of
// the 32 subbands per granule.

// aliasC are the coefficients c_i of the alias-reduction butterflies
// (ISO/IEC 11172-3 Table 3-B.9) [memory]; cs = 1/√(1+c²), ca = c/√(1+c²).
var aliasC = [8]float64{-0.6, -0.535, -0.33, -0.185, -0.095, -0.041, -0.0142, -0.0037}

var aliasCS, aliasCA [8]float64

func init() {
	for i, c := range aliasC {
		d := math.Sqrt(1 + c*c)
		aliasCS[i], aliasCA[i] = 1/d, c/d
	}
}

// midSide turns the mid and side lines m and s (the first n of them)
// into left and right in place: L = (M + S)/√2, R = (M − S)/√2
// (§2.4.3.4.9.2).
func midSide(m, s *[576]float64, n int) {
	for i := range n {
		a, b := m[i], s[i]
		m[i], s[i] = (a+b)*math.Sqrt2/2, (a-b)*math.Sqrt2/2
	}
}

// reorder rearranges the short-block lines of xr, coded band by band and
// window by window, so that each subband's 18 values hold line i of
// window w at 3i + w, the order hybridBlock reads (§2.4.3.4.8). The long
// part of a mixed block (the first 36 lines) stays.
func reorder(xr *[576]float64, g *granule, rateIndex int) {
	if !g.windowSwitching || g.blockType != 2 {
		return
	}
	short := &shortBands[rateIndex]
	var out [576]float64
	pos, sfb := 0, 0
	if g.mixed {
		copy(out[:36], xr[:36])
		pos, sfb = 36, 3
	}
	for ; sfb < 13; sfb++ {
		for w := range 3 {
			for f := short[sfb]; f < short[sfb+1]; f++ {
				out[18*(f/6)+3*(f%6)+w] = xr[pos]
				pos++
			}
		}
	}
	*xr = out
}

// aliasReduce applies the butterflies between neighbouring subbands
// (§2.4.3.4.10, Figure A.5): for long blocks between all 32 subbands, for
// mixed blocks between subbands 0 and 1 only, for short blocks not at
// all.
func aliasReduce(xr *[576]float64, g *granule) {
	aliasReduceBelow(xr, g, 576)
}

// aliasReduceBelow is aliasReduce for lines that are zero from top on
// (0 ≤ top ≤ 576); it returns a line from which they are still zero.
func aliasReduceBelow(xr *[576]float64, g *granule, top int) int {
	bands := 32
	if g.windowSwitching && g.blockType == 2 {
		if !g.mixed {
			return top
		}
		bands = 2
	}
	// A butterfly between subbands sb − 1 and sb reads lines 18sb − 8 to
	// 18sb + 7; above the last non-zero line they are all zero and stay so.
	last := top - 1
	for last >= 0 && xr[last] == 0 {
		last--
	}
	bands = min(bands, (last+8)/18+1)
	if bands > 1 {
		top = max(last+1, min(576, 18*(bands-1)+8))
	} else {
		top = last + 1
	}
	for sb := 1; sb < bands; sb++ {
		for i := range 8 {
			lo, hi := 18*sb-1-i, 18*sb+i
			a, b := xr[lo], xr[hi]
			xr[lo] = a*aliasCS[i] - b*aliasCA[i]
			xr[hi] = b*aliasCS[i] + a*aliasCA[i]
		}
	}
	return top
}

// hybrid runs the IMDCT of each subband of xr with its block type (the
// first two subbands of a mixed block are long, type 0), adds the second
// half of the previous granule's blocks kept in overlap, keeps this
// granule's second halves there, and inverts the frequency of odd
// subbands (every odd sample negated, §2.4.3.4.10.4). out[t][sb] is time
// sample t of subband sb, the order the synthesis takes them in.
func hybrid(xr *[576]float64, g *granule, overlap *[32][18]float64, out *[18][32]float64) {
	hybridBelow(xr, g, overlap, out, 576)
}

// hybridBelow is hybrid for lines that are zero from top on (0 ≤ top ≤
// 576).
func hybridBelow(xr *[576]float64, g *granule, overlap *[32][18]float64, out *[18][32]float64, top int) {
	var block [36]float64
	// Subbands above the last non-zero line have nothing to transform:
	// their output is what the previous granule left in overlap.
	last := top - 1
	for last >= 0 && xr[last] == 0 {
		last--
	}
	limit := last/18 + 1
	if last < 0 {
		limit = 0
	}
	for sb := limit; sb < 32; sb++ {
		ov := &overlap[sb]
		for t := range 18 {
			out[t][sb] = ov[t]
		}
		*ov = [18]float64{}
	}
	bt := g.blockType
	if !g.windowSwitching {
		bt = 0
	}
	for sb := range limit {
		b := bt
		if g.windowSwitching && g.mixed && sb < 2 {
			b = 0
		}
		hybridBlock((*[18]float64)(xr[18*sb:18*sb+18]), b, &block)
		ov := &overlap[sb]
		for t := range 18 {
			out[t][sb] = block[t] + ov[t]
		}
		copy(ov[:], block[18:])
	}
	// Frequency inversion: every odd sample of every odd subband negated.
	for t := 1; t < 18; t += 2 {
		o := &out[t]
		for sb := 1; sb < 32; sb += 2 {
			o[sb] = -o[sb]
		}
	}
}
