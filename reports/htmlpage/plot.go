package htmlpage

import (
	"fmt"
	"math"
	"path/filepath"
	"sort"
	"strconv"
	"strings"

	"github.com/kweigh/kweigh/loudness"
	"github.com/kweigh/kweigh/reports"
)

// Geometry of the loudness-over-time plot, in SVG user units (px at 100 %).
const (
	plotWidth   = 960.0
	plotLeft    = 62.0
	plotRight   = 846.0 // room on the right for the value labels
	laneTop     = 6.0   // the true-peak overs lane
	laneHeight  = 14.0
	areaTop     = 30.0
	areaBottom  = 310.0
	legendTop   = 362.0
	legendRow   = 20.0
	plotHeight  = legendTop + 2*legendRow
	seriesStepS = 0.1 // the engine's series step (10 Hz)
)

// PlotColumns is the number of drawn columns of the loudness plot; longer
// series are decimated to it (see Decimate).
const PlotColumns = int(plotRight - plotLeft)

// levelRange returns the dB range of the level axis shared by the plot and
// the histogram: from at least −60 up to at least 0, widened to keep the
// curves, the target band and the ceiling in view.
func levelRange(e Entry) (lo, hi float64) {
	lo, hi = -60, 0
	top := math.Inf(-1)
	if s := e.Result.Series; s != nil {
		for _, v := range s.Momentary {
			if f := float64(v); !math.IsNaN(f) && !math.IsInf(f, 0) && f > top {
				top = f
			}
		}
	}
	t := e.Target
	if t.TruePeakCeilingDBTP != nil {
		top = max(top, *t.TruePeakCeilingDBTP)
	}
	if t.IntegratedLUFS != nil {
		top = max(top, *t.IntegratedLUFS+tolerance(t))
	}
	if top > -1 {
		hi = math.Ceil((top+1)/5) * 5
	}
	for _, v := range []*float64{e.Result.IntegratedLUFS, t.IntegratedLUFS} {
		if v != nil && *v-30 < lo {
			lo = math.Floor((*v-30)/10) * 10
		}
	}
	return max(lo, -120), min(hi, 30)
}

func tolerance(t Target) float64 {
	if t.ToleranceLU == nil {
		return 0
	}
	return math.Abs(*t.ToleranceLU)
}

// seriesDuration is the time the plot spans: the file's duration, or the
// series' length if that is longer.
func seriesDuration(e Entry) float64 {
	d := e.Result.DurationS
	if s := e.Result.Series; s != nil {
		step := elementSeconds(s)
		d = max(d, float64(len(s.ShortTerm))*step, float64(len(s.Momentary))*step)
	}
	if !(d > 0) {
		d = 1
	}
	return d
}

// elementSeconds is the time one series element stands for: 100 ms, or
// Step × 100 ms for a series the engine decimated (streams longer than
// 1 h 49 min).
func elementSeconds(s *loudness.Series) float64 {
	return seriesStepS * float64(max(1, s.Step))
}

// columnTime is the time at the middle of a column of elements stepS
// seconds apart: series element i describes the window ending at
// (i+1)·stepS.
func columnTime(c Column, stepS float64) float64 {
	return (float64(c.Start+c.End)/2 + 0.5) * stepS
}

// seriesPath draws decimated columns as one path: each column is a vertical
// stroke from its minimum to its maximum in time order, joined to the next;
// a column that is not Valid breaks the line (a gap, never a zero).
func seriesPath(cols []Column, stepS float64, x, y scale) string {
	var b strings.Builder
	pen := false // a subpath is open
	points := 0  // points in the open subpath
	point := func(px, py float64) {
		if pen {
			b.WriteString(" L")
		} else {
			if b.Len() > 0 {
				b.WriteByte(' ')
			}
			b.WriteByte('M')
			pen = true
		}
		b.WriteString(num(px) + " " + num(py))
		points++
	}
	endSubpath := func() {
		if pen && points == 1 {
			b.WriteString(" h0.5") // a lone value still shows as a dot
		}
		pen, points = false, 0
	}
	for _, c := range cols {
		if !c.Valid {
			endSubpath()
			continue
		}
		px := x.at(columnTime(c, stepS))
		first, second := c.Min, c.Max
		if !c.MinFirst {
			first, second = c.Max, c.Min
		}
		point(px, y.at(float64(first)))
		if first != second {
			point(px, y.at(float64(second)))
		}
	}
	endSubpath()
	return b.String()
}

// overRun is a stretch of consecutive columns whose true peak exceeds the
// ceiling.
type overRun struct {
	from, to float64 // seconds
	peak     float32 // dBTP
}

func overRuns(truePeak []float32, stepS, ceiling float64, columns int) []overRun {
	var runs []overRun
	open := false
	for _, c := range Decimate(truePeak, columns) {
		over := c.Valid && float64(c.Max) > ceiling
		switch {
		case over && open:
			r := &runs[len(runs)-1]
			r.to = float64(c.End) * stepS
			r.peak = max(r.peak, c.Max)
		case over:
			runs = append(runs, overRun{from: float64(c.Start) * stepS, to: float64(c.End) * stepS, peak: c.Max})
			open = true
		default:
			open = false
		}
	}
	return runs
}

// countOvers counts the 100 ms blocks whose true peak exceeds ceiling; in
// a decimated series (Step > 1), the stretches of 2·Step blocks (pairs of
// elements) holding at least one such block.
func countOvers(s *loudness.Series, ceiling float64) int {
	n := 0
	over := func(v float32) bool { return float64(v) > ceiling && !math.IsNaN(float64(v)) }
	if s.Step <= 1 {
		for _, v := range s.TruePeak {
			if over(v) {
				n++
			}
		}
		return n
	}
	for i := 0; i < len(s.TruePeak); i += 2 {
		if over(s.TruePeak[i]) || i+1 < len(s.TruePeak) && over(s.TruePeak[i+1]) {
			n++
		}
	}
	return n
}

// oversText says how much of the file is over the ceiling: "12 × 100 ms",
// or for a decimated series "in 3 stretches of 3.2 s".
func oversText(s *loudness.Series, overs int) string {
	if s == nil || s.Step <= 1 {
		return fmt.Sprintf("%d × 100 ms", overs)
	}
	noun := "stretches"
	if overs == 1 {
		noun = "stretch"
	}
	return fmt.Sprintf("in %d %s of %s s", overs, noun, strconv.FormatFloat(2*elementSeconds(s), 'f', -1, 64))
}

// loudnessPlot draws the loudness-over-time plot of one entry.
func loudnessPlot(e Entry, id string, standalone bool) string {
	r := e.Result
	series := r.Series
	t := e.Target
	dur := seriesDuration(e)
	lo, hi := levelRange(e)
	x := scale{0, dur, plotLeft, plotRight}
	y := scale{lo, hi, areaBottom, areaTop}
	name := filepath.Base(r.Path)

	s := &svgDoc{id: id}
	s.open(plotWidth, plotHeight, "Loudness over time: "+name, plotDescription(e), standalone)
	s.hatch("silence", "#8C8C8C", 6)
	s.hatch("over", inkVermillion, 4)

	// Plot area, then leading/trailing silence below everything else.
	s.rect(plotLeft, areaTop, plotRight-plotLeft, areaBottom-areaTop, `fill="#FFFFFF" stroke="`+inkAxis+`" stroke-width="1"`)
	silence := func(from, to float64, what string) {
		if to-from <= 0 {
			return
		}
		x0, x1 := x.at(from), x.at(to)
		s.printf(`<rect x="%s" y="%s" width="%s" height="%s" fill="url(#%ssilence)"><title>%s</title></rect>`+"\n",
			num(x0), num(areaTop), num(max(x1-x0, 1)), num(areaBottom-areaTop), id, escapeXML(what))
	}
	lead, trail := r.Signal.LeadingSilenceS, r.Signal.TrailingSilenceS
	silence(0, min(lead, dur), "leading silence "+reports.Fixed(lead, reports.UnitDecimals("s"))+" s")
	if lead < dur {
		silence(max(dur-trail, lead), dur, "trailing silence "+reports.Fixed(trail, reports.UnitDecimals("s"))+" s")
	}

	// Target band.
	if t.IntegratedLUFS != nil {
		tol := tolerance(t)
		yTop, yBot := y.at(*t.IntegratedLUFS+tol), y.at(*t.IntegratedLUFS-tol)
		s.rect(plotLeft, yTop, plotRight-plotLeft, max(yBot-yTop, 1), `fill="`+inkGreen+`" fill-opacity="0.16"`)
		if tol > 0 {
			s.line(plotLeft, yTop, plotRight, yTop, inkGreen, 1, "4 3")
			s.line(plotLeft, yBot, plotRight, yBot, inkGreen, 1, "4 3")
		}
		s.line(plotLeft, y.at(*t.IntegratedLUFS), plotRight, y.at(*t.IntegratedLUFS), inkGreen, 1, "")
	}

	// Grid and axes.
	for _, v := range levelTicks(lo, hi, 9) {
		py := y.at(v)
		s.line(plotLeft, py, plotRight, py, inkGrid, 1, "")
		s.text(plotLeft-6, py+4, "end", ` fill="`+inkAxis+`"`, strconv.FormatFloat(v, 'f', -1, 64))
	}
	for _, sec := range TimeTicks(dur, 10) {
		px := x.at(sec)
		s.line(px, areaTop, px, areaBottom, inkGrid, 1, "")
		s.line(px, areaBottom, px, areaBottom+5, inkAxis, 1, "")
		anchor := "middle"
		if sec == 0 {
			anchor = "start"
		}
		s.text(px, areaBottom+19, anchor, ` fill="`+inkAxis+`"`, reports.Clock(sec))
	}
	s.text(plotLeft, areaBottom+38, "start", ` fill="`+inkAxis+`" font-size="11"`, "time (h:mm:ss)")
	s.printf(`<text x="16" y="%s" text-anchor="middle" transform="rotate(-90 16 %s)" fill="%s" font-size="11">%s</text>`+"\n",
		num((areaTop+areaBottom)/2), num((areaTop+areaBottom)/2), inkAxis, levelAxisLabel(t, e.Result.Unit()))

	// Curves: momentary below, short-term above it.
	drawn := false
	if series != nil {
		if p := seriesPath(Decimate(series.Momentary, PlotColumns), elementSeconds(series), x, y); p != "" {
			s.printf(`<path d="%s" fill="none" stroke="%s" stroke-width="0.9" stroke-linejoin="round" stroke-linecap="round"/>`+"\n", p, inkOrange)
			drawn = true
		}
		if p := seriesPath(Decimate(series.ShortTerm, PlotColumns), elementSeconds(series), x, y); p != "" {
			s.printf(`<path d="%s" fill="none" stroke="%s" stroke-width="2.2" stroke-linejoin="round" stroke-linecap="round"/>`+"\n", p, inkBlue)
			drawn = true
		}
	}
	switch {
	case series == nil:
		s.text((plotLeft+plotRight)/2, (areaTop+areaBottom)/2, "middle", ` fill="`+inkAxis+`"`, "no loudness series recorded for this file")
	case !drawn:
		s.text((plotLeft+plotRight)/2, (areaTop+areaBottom)/2, "middle", ` fill="`+inkAxis+`"`, "nothing to draw: shorter than one 400 ms window, or digital silence throughout")
	}

	// Integrated loudness and true-peak ceiling.
	var labels []valueLabel
	if r.IntegratedLUFS != nil {
		py := y.at(*r.IntegratedLUFS)
		s.line(plotLeft, py, plotRight, py, inkBlack, 1.5, "9 4")
		labels = append(labels, valueLabel{py, "I " + reports.Loudness(r.IntegratedLUFS) + " " + r.Unit(), inkBlack, "bold"})
	}
	if t.IntegratedLUFS != nil {
		labels = append(labels, valueLabel{y.at(*t.IntegratedLUFS), "target " + reports.Loudness(t.IntegratedLUFS), "#00694D", ""})
	}
	overs := 0
	if t.TruePeakCeilingDBTP != nil {
		ceiling := *t.TruePeakCeilingDBTP
		py := y.at(ceiling)
		s.line(plotLeft, py, plotRight, py, inkVermillion, 1.5, "7 3 1.5 3")
		labels = append(labels, valueLabel{py, "ceiling " + reports.Peak(t.TruePeakCeilingDBTP), "#A33F00", ""})
		s.text(plotLeft-6, laneTop+laneHeight-3, "end", ` fill="`+inkAxis+`" font-size="11"`, "TP over")
		s.rect(plotLeft, laneTop, plotRight-plotLeft, laneHeight, `fill="none" stroke="`+inkGrid+`" stroke-width="1"`)
		if series != nil {
			overs = countOvers(series, ceiling)
			if overs == 0 {
				s.text(plotLeft+6, laneTop+laneHeight-3, "start", ` fill="`+inkAxis+`" font-size="11"`, "no true-peak overs")
			}
			for _, run := range overRuns(series.TruePeak, elementSeconds(series), ceiling, PlotColumns) {
				x0, x1 := x.at(run.from), x.at(run.to)
				peak := float64(run.peak)
				tip := fmt.Sprintf("true peak over the ceiling %s – %s, highest %s dBTP", reports.Clock(run.from), reports.Clock(run.to), reports.Peak(&peak))
				s.printf(`<rect x="%s" y="%s" width="%s" height="%s" fill="%s" stroke="%s" stroke-width="0.5"><title>%s</title></rect>`+"\n",
					num(x0), num(laneTop), num(max(x1-x0, 2)), num(laneHeight), inkVermillion, inkBlack, escapeXML(tip))
				// A matching tick under the ceiling line ties the lane to the level axis.
				s.line(x0+max(x1-x0, 2)/2, py-5, x0+max(x1-x0, 2)/2, py+5, inkVermillion, 2, "")
			}
		}
	}
	placeLabels(s, labels)
	legend(s, e, overs)
	return s.close()
}

// levelAxisLabel names the level axis' units: the spec's loudness unit
// (LUFS or LKFS) for the curves, and dBTP only when a true-peak ceiling is
// drawn on the same axis.
func levelAxisLabel(t Target, unit string) string {
	if t.TruePeakCeilingDBTP != nil {
		return "level: " + unit + " (curves), dBTP (ceiling)"
	}
	return "level: " + unit
}

// plotDescription is the plot's text alternative.
func plotDescription(e Entry) string {
	r := e.Result
	parts := []string{
		"Short-term and momentary loudness over " + reports.Clock(seriesDuration(e)),
		"integrated " + reports.Loudness(r.IntegratedLUFS) + " " + r.Unit(),
	}
	if t := e.Target.IntegratedLUFS; t != nil {
		tol := tolerance(e.Target)
		parts = append(parts, "target "+reports.Loudness(t)+" "+r.Unit()+" ±"+reports.Loudness(&tol)+" LU")
	}
	if c := e.Target.TruePeakCeilingDBTP; c != nil && r.Series != nil {
		if n := countOvers(r.Series, *c); r.Series.Step <= 1 {
			parts = append(parts, fmt.Sprintf("%d blocks of 100 ms above the %s dBTP ceiling", n, reports.Peak(c)))
		} else {
			parts = append(parts, fmt.Sprintf("%s above the %s dBTP ceiling", oversText(r.Series, n), reports.Peak(c)))
		}
	}
	return strings.Join(parts, "; ") + "."
}

// valueLabel is a label in the right margin at a level.
type valueLabel struct {
	y            float64
	text, colour string
	weight       string
}

// placeLabels writes the right-margin labels, moving them apart so they
// never overlap.
func placeLabels(s *svgDoc, labels []valueLabel) {
	const gap = 14.0
	sort.SliceStable(labels, func(i, j int) bool { return labels[i].y < labels[j].y })
	for i := range labels {
		if i > 0 && labels[i].y < labels[i-1].y+gap {
			labels[i].y = labels[i-1].y + gap
		}
	}
	// Pull back up whatever was pushed past the bottom.
	for i := len(labels) - 1; i >= 0; i-- {
		limit := areaBottom + 4
		if i < len(labels)-1 {
			limit = labels[i+1].y - gap
		}
		labels[i].y = min(labels[i].y, limit)
	}
	for _, l := range labels {
		attrs := ` fill="` + l.colour + `"`
		if l.weight != "" {
			attrs += ` font-weight="` + l.weight + `"`
		}
		s.text(plotRight+6, l.y+4, "start", attrs, l.text)
	}
}

// legend writes the plot's key in two rows under the time axis: a sample
// of each line or area followed by its meaning in words.
func legend(s *svgDoc, e Entry, overs int) {
	x, y := plotLeft, legendTop
	item := func(sample func(x, y float64), label string) {
		if x+28+6+textWidth(label) > plotWidth-8 {
			x, y = plotLeft, y+legendRow
		}
		sample(x, y-4)
		s.text(x+34, y, "start", "", label)
		x += 34 + textWidth(label) + 22
	}
	lineSample := func(colour string, width float64, dash string) func(x, y float64) {
		return func(x, y float64) { s.line(x, y, x+28, y, colour, width, dash) }
	}
	item(lineSample(inkBlue, 2.2, ""), "short-term loudness (3 s)")
	item(lineSample(inkOrange, 0.9, ""), "momentary loudness (0.4 s)")
	if e.Result.IntegratedLUFS != nil {
		item(lineSample(inkBlack, 1.5, "9 4"), "integrated loudness")
	}
	if t := e.Target; t.IntegratedLUFS != nil {
		tol := tolerance(t)
		item(func(x, y float64) {
			s.rect(x, y-6, 28, 12, `fill="`+inkGreen+`" fill-opacity="0.16" stroke="`+inkGreen+`" stroke-dasharray="4 3"`)
			s.line(x, y, x+28, y, inkGreen, 1, "")
		}, "target "+reports.Loudness(t.IntegratedLUFS)+" "+e.Result.Unit()+" ±"+reports.Loudness(&tol)+" LU")
	}
	if c := e.Target.TruePeakCeilingDBTP; c != nil {
		item(lineSample(inkVermillion, 1.5, "7 3 1.5 3"), "true-peak ceiling "+reports.Peak(c)+" dBTP")
		item(func(x, y float64) {
			s.rect(x+8, y-6, 12, 12, `fill="`+inkVermillion+`" stroke="`+inkBlack+`" stroke-width="0.5"`)
		}, "over the ceiling: "+oversText(e.Result.Series, overs))
	}
	if e.Result.Signal.LeadingSilenceS > 0 || e.Result.Signal.TrailingSilenceS > 0 {
		item(func(x, y float64) {
			s.rect(x, y-6, 28, 12, `fill="url(#`+s.id+`silence)" stroke="#8C8C8C" stroke-width="0.5"`)
		}, "leading/trailing silence")
	}
}

// textWidth estimates the width of a 12 px label in the system sans-serif.
func textWidth(s string) float64 { return 6.6 * float64(len([]rune(s))) }
