package layer3

import "math"

// Joint stereo (ISO/IEC 11172-3 §2.4.3.4.9, ISO/IEC 13818-3 §2.4.3.2).
// With intensity stereo on, the scale-factor bands of the right channel
// above its last non-zero line carry no right-channel spectrum: both
// channels are made from the left (or mid) lines of the band, weighted by
// the band's intensity position is_pos, which the right channel's scale
// factor holds. In MPEG-1 is_pos (0–6; 7 means "not intensity coded")
// gives the ratio tan(is_pos·π/12), split as
//
//	L = xr · r/(1 + r),  R = xr · 1/(1 + r);
//
// at the lower sampling frequencies is_pos scales one channel down in
// steps of 2^(−1/4) (intensity_scale 0) or 2^(−1/2) (1): odd positions
// scale the left, even ones the right, 0 neither; the largest value the
// scale factor's length can code means "not intensity coded". M/S is
// applied to every line not intensity coded. The last band of each
// block kind has no scale factor and takes the position of the band
// below it (common decoder practice [memory]).

// isRatio1[p] is (left, right) for MPEG-1 intensity position p.
var isRatio1 [7][2]float64

// isRatio2[scale][p] is (left, right) for an LSF intensity position p.
var isRatio2 [2][32][2]float64

func init() {
	for p := range 7 {
		if p == 6 {
			isRatio1[p] = [2]float64{1, 0}
			continue
		}
		r := math.Tan(float64(p) * math.Pi / 12)
		isRatio1[p] = [2]float64{r / (1 + r), 1 / (1 + r)}
	}
	for scale := range 2 {
		step := math.Pow(2, -0.25*float64(scale+1))
		for p := range 32 {
			switch {
			case p == 0:
				isRatio2[scale][p] = [2]float64{1, 1}
			case p&1 == 1:
				isRatio2[scale][p] = [2]float64{math.Pow(step, float64(p+1)/2), 1}
			default:
				isRatio2[scale][p] = [2]float64{1, math.Pow(step, float64(p)/2)}
			}
		}
	}
}

// stereo undoes the joint-stereo coding of granule gr in d.xr.
func (d *Decoder) stereo(h Header, gr int) {
	ms := h.ModeExt&2 != 0
	if h.ModeExt&1 == 0 {
		if ms {
			midSide(&d.xr[0], &d.xr[1], max(d.nonzero[0], d.nonzero[1]))
		}
		return
	}
	var done [576]bool // lines intensity coded
	g := &d.si.gr[gr][1]
	sf := &d.sf[1]
	right := &d.xr[1]
	long := &longBands[h.RateIndex]
	short := &shortBands[h.RateIndex]
	apply := func(from, to, pos, maxPos int) {
		if h.LSF {
			if pos >= maxPos {
				return
			}
		} else if pos >= 7 {
			return
		}
		var k [2]float64
		if h.LSF {
			k = isRatio2[g.sfCompress&1][pos&31]
		} else {
			k = isRatio1[pos]
		}
		for i := from; i < to; i++ {
			v := d.xr[0][i]
			d.xr[0][i], d.xr[1][i] = v*k[0], v*k[1]
			done[i] = true
		}
	}
	longPart := func(limit, bands int) {
		last := -1
		for i := limit - 1; i >= 0; i-- {
			if right[i] != 0 {
				last = i
				break
			}
		}
		for sfb := range bands {
			if long[sfb] <= last || long[sfb] >= limit {
				continue
			}
			src := min(sfb, 20)
			apply(long[sfb], min(long[sfb+1], limit), sf.long[src], sf.maxLong[src])
		}
	}
	if !g.windowSwitching || g.blockType != 2 {
		longPart(576, 22)
	} else {
		first := 0
		if g.mixed {
			first = 3
		}
		anyShort := false
		for w := range 3 {
			last := -1 // highest band of window w with a non-zero line
			for sfb := 12; sfb >= first && last < 0; sfb-- {
				width := short[sfb+1] - short[sfb]
				p := 3*short[sfb] + w*width
				for i := p; i < p+width; i++ {
					if right[i] != 0 {
						last = sfb
						break
					}
				}
			}
			if last >= 0 {
				anyShort = true
			}
			for sfb := max(last+1, first); sfb < 13; sfb++ {
				width := short[sfb+1] - short[sfb]
				p := 3*short[sfb] + w*width
				src := min(sfb, 11)
				apply(p, p+width, sf.short[src][w], sf.maxShort[src][w])
			}
		}
		if g.mixed && !anyShort {
			bands := 8
			if h.LSF {
				bands = 6
			}
			longPart(36, bands)
		}
	}
	if ms {
		for i := range 576 {
			if !done[i] {
				a, b := d.xr[0][i], d.xr[1][i]
				d.xr[0][i], d.xr[1][i] = (a+b)*math.Sqrt2/2, (a-b)*math.Sqrt2/2
			}
		}
	}
}
