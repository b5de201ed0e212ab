package htmlpage

import (
	"math"
	"sort"
	"strconv"

	"github.com/kweigh/kweigh/loudness"
	"github.com/kweigh/kweigh/reports"
)

// Geometry of the short-term histogram.
const (
	histWidth  = 470.0
	histHeight = 300.0
	histLeft   = 46.0
	histRight  = 458.0
	histTop    = 44.0
	histBottom = 236.0
)

// rangeRegion is the loudness range region of EBU Tech 3342 computed from a
// short-term series: the values above the −70 LUFS absolute gate and above
// the −20 LU relative gate, and their 10th and 95th percentiles.
type rangeRegion struct {
	low, high float64
	ok        bool
}

// level is a short-term loudness value and how many 100 ms steps have it.
type level struct {
	lufs  float64
	count int64
}

// shortTermLevels returns the short-term loudness values of a series: each
// element once while the series is not decimated; for a decimated series
// (Step > 1, whose elements are only the extremes of their stretch) the
// engine's undecimated level distribution, each 0.1 LU bin at its centre.
func shortTermLevels(s *loudness.Series) []level {
	if s == nil {
		return nil
	}
	var out []level
	if s.Step > 1 && s.ShortTermLevels != nil {
		for i, n := range s.ShortTermLevels {
			if n > 0 {
				out = append(out, level{-70 + (float64(i)+0.5)*loudness.LevelStep, n})
			}
		}
		return out
	}
	for _, v := range s.ShortTerm {
		out = append(out, level{float64(v), 1})
	}
	return out
}

// loudnessRangeRegion computes the region the histogram marks. Percentiles
// are nearest-rank on the gated values (EBU Tech 3342 leaves the
// interpolation open).
func loudnessRangeRegion(shortTerm []level) rangeRegion {
	const absoluteGate, relativeGate = -70.0, -20.0 // EBU Tech 3342
	var kept []level
	power, n := 0.0, int64(0)
	for _, v := range shortTerm {
		f := v.lufs
		if math.IsNaN(f) || math.IsInf(f, 0) || f <= absoluteGate {
			continue
		}
		kept = append(kept, v)
		power += float64(v.count) * math.Pow(10, f/10)
		n += v.count
	}
	if n == 0 {
		return rangeRegion{}
	}
	gate := 10*math.Log10(power/float64(n)) + relativeGate
	gated := kept[:0]
	var total int64
	for _, v := range kept {
		if v.lufs > gate {
			gated = append(gated, v)
			total += v.count
		}
	}
	sort.Slice(gated, func(i, j int) bool { return gated[i].lufs < gated[j].lufs })
	at := func(p float64) float64 {
		rank := int64(math.Round(p * float64(total-1)))
		for _, v := range gated {
			if rank < v.count {
				return v.lufs
			}
			rank -= v.count
		}
		return gated[len(gated)-1].lufs
	}
	return rangeRegion{low: at(0.10), high: at(0.95), ok: true}
}

// shortTermHistogram draws the distribution of short-term loudness in 1 LU
// bins with the loudness range region, the integrated value and the target
// band.
func shortTermHistogram(e Entry, id string) string {
	r := e.Result
	lo, hi := histogramRange(e)
	bins := make([]int, int(hi-lo))
	total := 0
	shortTerm := shortTermLevels(r.Series)
	for _, v := range shortTerm {
		f := v.lufs
		if math.IsNaN(f) || math.IsInf(f, 0) || f <= -70 {
			continue // not full yet, digital silence, or below the absolute gate
		}
		b := int(math.Floor(f - lo))
		b = max(0, min(b, len(bins)-1))
		bins[b] += int(v.count)
		total += int(v.count)
	}
	region := loudnessRangeRegion(shortTerm)

	s := &svgDoc{id: id}
	s.open(histWidth, histHeight, "Short-term loudness histogram: "+r.Path,
		histDescription(e, region, total), false)
	s.hatch("lra", inkAxis, 5)
	x := scale{lo, hi, histLeft, histRight}
	s.rect(histLeft, histTop, histRight-histLeft, histBottom-histTop, `fill="#FFFFFF" stroke="`+inkAxis+`"`)

	if t := e.Target; t.IntegratedLUFS != nil {
		tol := tolerance(t)
		x0, x1 := x.at(*t.IntegratedLUFS-tol), x.at(*t.IntegratedLUFS+tol)
		s.rect(x0, histTop, max(x1-x0, 1), histBottom-histTop, `fill="`+inkGreen+`" fill-opacity="0.16"`)
	}
	if region.ok {
		x0, x1 := x.at(region.low), x.at(region.high)
		s.rect(x0, histTop, max(x1-x0, 1), histBottom-histTop, `fill="url(#`+id+`lra)" opacity="0.35"`)
		// Bracket above the plot, labelled with the measured LRA.
		s.line(x0, histTop-8, x1, histTop-8, inkBlack, 1.5, "")
		s.line(x0, histTop-13, x0, histTop-3, inkBlack, 1.5, "")
		s.line(x1, histTop-13, x1, histTop-3, inkBlack, 1.5, "")
		label := "loudness range " + reports.Loudness(r.LoudnessRangeLU) + " LU"
		s.text(min(max((x0+x1)/2, histLeft+textWidth(label)/2), histRight-textWidth(label)/2), histTop-17, "middle", ` font-weight="bold"`, label)
	}

	peak := 0.0
	for _, n := range bins {
		peak = max(peak, float64(n))
	}
	share := 0.0 // highest bin, % of the counted time
	if total > 0 {
		share = 100 * peak / float64(total)
	}
	top := niceCeiling(share)
	y := scale{0, top, histBottom, histTop}
	for _, v := range percentTicks(top) {
		py := y.at(v)
		s.line(histLeft, py, histRight, py, inkGrid, 1, "")
		s.text(histLeft-5, py+4, "end", ` fill="`+inkAxis+`"`, strconv.FormatFloat(v, 'f', -1, 64)+" %")
	}
	if total > 0 {
		for i, n := range bins {
			if n == 0 {
				continue
			}
			x0, x1 := x.at(lo+float64(i)), x.at(lo+float64(i+1))
			py := y.at(100 * float64(n) / float64(total))
			s.rect(x0+0.5, py, max(x1-x0-1, 0.5), histBottom-py, `fill="`+inkSkyBlue+`" stroke="`+inkBlue+`" stroke-width="0.6"`)
		}
	} else {
		s.text((histLeft+histRight)/2, (histTop+histBottom)/2, "middle", ` fill="`+inkAxis+`"`, "no short-term loudness above -70 "+r.Unit())
	}
	if r.IntegratedLUFS != nil {
		px := x.at(*r.IntegratedLUFS)
		s.line(px, histTop, px, histBottom, inkBlack, 1.5, "9 4")
	}
	for _, v := range levelTicks(lo, hi, 8) {
		px := x.at(v)
		s.line(px, histBottom, px, histBottom+4, inkAxis, 1, "")
		s.text(px, histBottom+17, "middle", ` fill="`+inkAxis+`"`, strconv.FormatFloat(v, 'f', -1, 64))
	}
	s.text(histLeft, histBottom+34, "start", ` fill="`+inkAxis+`" font-size="11"`, "short-term loudness ("+r.Unit()+"), 1 LU bins; height = share of time")
	s.rect(histLeft, histBottom+42, 22, 10, `fill="url(#`+id+`lra)" stroke="`+inkAxis+`" stroke-width="0.5"`)
	s.text(histLeft+28, histBottom+51, "start", ` font-size="11"`, "10th–95th percentile (EBU Tech 3342)")
	s.line(histLeft+248, histBottom+47, histLeft+272, histBottom+47, inkBlack, 1.5, "9 4")
	s.text(histLeft+278, histBottom+51, "start", ` font-size="11"`, "integrated")
	return s.close()
}

// histogramRange is the loudness span of the histogram: the short-term
// values above the absolute gate, the integrated value and the target band,
// padded and rounded out to 5 LU, at least 20 LU wide.
func histogramRange(e Entry) (lo, hi float64) {
	lo, hi = math.Inf(1), math.Inf(-1)
	see := func(v float64) {
		if !math.IsNaN(v) && !math.IsInf(v, 0) && v > -70 {
			lo, hi = min(lo, v), max(hi, v)
		}
	}
	if s := e.Result.Series; s != nil {
		for _, v := range s.ShortTerm {
			see(float64(v))
		}
	}
	if v := e.Result.IntegratedLUFS; v != nil {
		see(*v)
	}
	if t := e.Target; t.IntegratedLUFS != nil {
		see(*t.IntegratedLUFS - tolerance(t))
		see(*t.IntegratedLUFS + tolerance(t))
	}
	if lo > hi {
		return levelRange(e)
	}
	lo, hi = math.Floor((lo-2)/5)*5, math.Ceil((hi+2)/5)*5
	for hi-lo < 20 {
		lo, hi = lo-5, hi+5
	}
	return max(lo, -120), min(hi, 30)
}

// percentTicks returns 0 to top in at most five 1-2-2.5-5 steps.
func percentTicks(top float64) []float64 {
	step := top
	for _, m := range []float64{0.1, 0.2, 0.25, 0.5, 1, 2, 2.5, 5, 10, 20, 25, 50} {
		if top/m <= 5 {
			step = m
			break
		}
	}
	var ticks []float64
	for v := 0.0; v <= top+1e-9; v += step {
		ticks = append(ticks, math.Round(v*100)/100)
	}
	return ticks
}

// niceCeiling rounds a percentage up to 1, 2, 5 × a power of ten (at least 1).
func niceCeiling(v float64) float64 {
	if !(v > 1) {
		return 1
	}
	p := math.Pow(10, math.Floor(math.Log10(v)))
	for _, m := range []float64{1, 2, 5, 10} {
		if m*p >= v {
			return m * p
		}
	}
	return 10 * p
}

func histDescription(e Entry, region rangeRegion, counted int) string {
	u := e.Result.Unit()
	d := "Distribution of " + strconv.Itoa(counted) + " short-term loudness values (100 ms steps) above -70 " + u
	if region.ok {
		low, high := region.low, region.high
		d += "; loudness range region " + reports.Loudness(&low) + " to " + reports.Loudness(&high) + " " + u + "; measured loudness range " + reports.Loudness(e.Result.LoudnessRangeLU) + " LU"
	}
	return d + "."
}
