package htmlpage

import (
	"fmt"
	"math"
	"strconv"

	"github.com/kweigh/kweigh/loudness"
	"github.com/kweigh/kweigh/measure"
	"github.com/kweigh/kweigh/reports"
)

// Geometry of the panes below the loudness pane: true peak (dBTP, its own
// axis, so a peak level is never read off the loudness scale) and the
// events lane on the time axis.
const (
	peakPaneTop    = 262.0
	peakPaneBottom = 334.0
	eventTop       = 340.0
	eventHeight    = 12.0
	timeAxisY      = eventTop + eventHeight // the time axis' baseline
)

// bandColumnsPerElement is how many series elements a drawn column may
// hold before the momentary curve is drawn as a min/max band: beyond it
// a line would swing from minimum to maximum in every column and fill
// the pane solid.
const bandColumnsPerElement = 4

// peakRange is the dBTP range of the peaks pane: −40 (or lower, to keep
// the lowest block's peak in view down to −80) up to a little above the
// highest of the ceiling and the file's true peak.
func peakRange(e Entry) (lo, hi float64) {
	lo, hi = -40, 0
	top := math.Inf(-1)
	if p := e.Result.TruePeakDBTP; p != nil {
		top = *p
	}
	if c := e.Target.TruePeakCeilingDBTP; c != nil {
		top = max(top, *c)
	}
	if top > -3 {
		hi = math.Ceil((top+3)/3) * 3
	}
	return lo, min(hi, 30)
}

// peakPane draws the true peak of every 100 ms block (the highest over
// the channels) and the ceiling on their own dBTP axis.
func peakPane(s *svgDoc, e Entry, x scale) {
	lo, hi := peakRange(e)
	y := scale{lo, hi, peakPaneBottom, peakPaneTop}
	s.rect(plotLeft, peakPaneTop, plotRight-plotLeft, peakPaneBottom-peakPaneTop, `fill="#FFFFFF" stroke="`+inkAxis+`" stroke-width="1"`)
	for _, v := range levelTicks(lo, hi, 3) {
		py := y.at(v)
		s.line(plotLeft, py, plotRight, py, inkGrid, 1, "")
		s.text(plotLeft-6, py+4, "end", ` fill="`+inkAxis+`"`, strconv.FormatFloat(v, 'f', -1, 64))
	}
	mid := (peakPaneTop + peakPaneBottom) / 2
	s.printf(`<text x="16" y="%s" text-anchor="middle" transform="rotate(-90 16 %s)" fill="%s" font-size="11">%s</text>`+"\n",
		num(mid), num(mid), inkAxis, "peak: dBTP")
	if series := e.Result.Series; series != nil {
		if p := seriesPath(Decimate(series.TruePeak, PlotColumns), elementSeconds(series), x, y); p != "" {
			s.printf(`<path class="true-peak" d="%s" fill="none" stroke="%s" stroke-width="0.9" stroke-linejoin="round"/>`+"\n", p, inkPurple)
		}
	}
	if c := e.Target.TruePeakCeilingDBTP; c != nil {
		py := y.at(*c)
		s.line(plotLeft, py, plotRight, py, inkVermillion, 1.5, "7 3 1.5 3")
		s.text(plotRight+6, py+4, "start", ` fill="#A33F00"`, "ceiling "+reports.Peak(c))
	}
	if p := e.Result.TruePeakDBTP; p != nil {
		s.text(plotRight+6, peakPaneBottom-4, "start", ` fill="`+inkBlack+`" font-weight="bold"`, "TP "+reports.Peak(p))
	}
}

// eventColour is the mark colour of an event kind on the time axis.
func eventColour(kind string) string {
	switch kind {
	case measure.EventTruePeakOver, measure.EventClipping:
		return inkVermillion
	case measure.EventShortTermOver, measure.EventMomentaryOver, measure.EventLoudSection:
		return inkOrange
	case measure.EventQuietSection, measure.EventSilence:
		return inkBlue
	}
	return inkPurple
}

// eventLane marks every event on the time axis: a bar from its start to
// its end (at least 2 units wide), coloured by kind, with its timecode
// and description as the mark's title.
func eventLane(s *svgDoc, m *measure.Measurement, x scale) int {
	s.rect(plotLeft, eventTop, plotRight-plotLeft, eventHeight, `fill="#F7F7F7" stroke="`+inkGrid+`" stroke-width="1"`)
	s.text(plotLeft-6, eventTop+eventHeight-2, "end", ` fill="`+inkAxis+`" font-size="11"`, "events")
	n := 0
	mark := func(prefix string, evs []measure.Event) {
		for _, ev := range evs {
			x0, x1 := x.at(ev.StartS), x.at(ev.EndS)
			tip := fmt.Sprintf("%s%s %s–%s: %s", prefix, reports.MarkerName(ev), ev.StartTimecode, ev.EndTimecode, reports.EventText(ev))
			s.printf(`<rect class="event %s" x="%s" y="%s" width="%s" height="%s" fill="%s"><title>%s</title></rect>`+"\n",
				ev.Kind, num(x0), num(eventTop+1), num(max(x1-x0, 2)), num(eventHeight-2), eventColour(ev.Kind), escapeXML(tip))
			n++
		}
	}
	mark("", m.Events)
	for _, g := range m.Groups {
		mark("group "+g.Name+": ", g.Events)
	}
	if n == 0 {
		s.text(plotLeft+6, eventTop+eventHeight-2, "start", ` fill="`+inkAxis+`" font-size="10"`, "no events")
	}
	return n
}

// momentaryPath draws the momentary curve: a line while each drawn column
// holds few elements, else a band from each column's minimum to its
// maximum (a closed outline filled lightly), so a long file does not turn
// into a solid block.
func momentaryPath(s *svgDoc, series *loudness.Series, x, y scale) bool {
	cols := Decimate(series.Momentary, PlotColumns)
	if len(series.Momentary) <= bandColumnsPerElement*PlotColumns {
		if p := seriesPath(cols, elementSeconds(series), x, y); p != "" {
			s.printf(`<path d="%s" fill="none" stroke="%s" stroke-width="0.9" stroke-linejoin="round" stroke-linecap="round"/>`+"\n", p, inkOrange)
			return true
		}
		return false
	}
	step := elementSeconds(series)
	drawn := false
	var upper, lower []string
	flush := func() {
		if len(upper) == 0 {
			return
		}
		d := "M" + upper[0]
		for _, p := range upper[1:] {
			d += " L" + p
		}
		for i := len(lower) - 1; i >= 0; i-- {
			d += " L" + lower[i]
		}
		s.printf(`<path class="momentary-band" d="%s Z" fill="%s" fill-opacity="0.35" stroke="%s" stroke-width="0.5"/>`+"\n", d, inkOrange, inkOrange)
		upper, lower = upper[:0], lower[:0]
		drawn = true
	}
	for _, c := range cols {
		if !c.Valid {
			flush()
			continue
		}
		px := num(x.at(columnTime(c, step)))
		upper = append(upper, px+" "+num(y.at(float64(c.Max))))
		lower = append(lower, px+" "+num(y.at(float64(c.Min))))
	}
	flush()
	return drawn
}
