package htmlpage

import (
	"math"
	"strconv"

	"github.com/kweigh/kweigh/reports"
)

// Geometry of the per-channel peak bars.
const (
	peakWidth    = 470.0
	peakLeft     = 50.0
	peakRight    = 370.0
	peakValueX   = 464.0 // right edge of the value column
	peakTop      = 34.0
	peakRowStep  = 30.0
	peakBarThick = 10.0
)

// channelLabel is the layout label of channel i, or Ch<n> when the
// measurement carries no layout.
func channelLabel(labels []string, i int) string {
	if i < len(labels) && labels[i] != "" {
		return labels[i]
	}
	return "Ch" + strconv.Itoa(i+1)
}

// channelPeakBars draws, per channel, a true-peak bar and a sample-peak bar
// against the dB scale, with the spec's true-peak ceiling.
func channelPeakBars(e Entry, id string) string {
	r := e.Result
	n := max(len(r.ChannelTruePeakDBTP), len(r.ChannelSamplePeakDBFS), r.Channels)
	lo, hi := -60.0, 0.0
	for _, list := range [][]*float64{r.ChannelTruePeakDBTP, r.ChannelSamplePeakDBFS} {
		for _, v := range list {
			if v != nil && *v+1 > hi {
				hi = math.Ceil(*v + 1)
			}
		}
	}
	ceiling := e.Target.TruePeakCeilingDBTP
	if ceiling != nil && *ceiling+1 > hi {
		hi = math.Ceil(*ceiling + 1)
	}
	hi = min(hi, 30)
	x := scale{lo, hi, peakLeft, peakRight}
	bottom := peakTop + float64(max(n, 1))*peakRowStep
	height := bottom + 62

	s := &svgDoc{id: id}
	s.open(peakWidth, height, "Peaks per channel: "+r.Path, peakDescription(e, n), false)
	s.rect(peakLeft, peakTop, peakRight-peakLeft, bottom-peakTop, `fill="#FFFFFF" stroke="`+inkAxis+`"`)
	for _, v := range levelTicks(lo, hi, 8) {
		px := x.at(v)
		s.line(px, peakTop, px, bottom, inkGrid, 1, "")
		s.line(px, bottom, px, bottom+4, inkAxis, 1, "")
		s.text(px, bottom+17, "middle", ` fill="`+inkAxis+`"`, strconv.FormatFloat(v, 'f', -1, 64))
	}
	s.text(peakLeft, bottom+33, "start", ` fill="`+inkAxis+`" font-size="11"`, "level (dBTP / dBFS); values below -60 are drawn at -60")

	bar := func(y float64, v *float64, unit, fill string) {
		if v == nil {
			s.text(peakLeft+6, y+peakBarThick-1, "start", ` fill="`+inkAxis+`" font-size="11"`, "silent: no peak")
			s.text(peakValueX, y+peakBarThick-1, "end", ` font-size="11"`, reports.NotAvailable)
			return
		}
		w := x.at(*v) - peakLeft
		s.rect(peakLeft, y, max(w, 0.5), peakBarThick, fill)
		label := reports.Peak(v) + " " + unit
		if unit == "dBTP" && ceiling != nil && *v > *ceiling {
			label = "over " + label
		}
		s.text(peakValueX, y+peakBarThick-1, "end", ` font-size="11"`, label)
	}
	for i := 0; i < n; i++ {
		y := peakTop + float64(i)*peakRowStep + 4
		s.text(peakLeft-8, y+peakBarThick+4, "end", ` font-weight="bold"`, channelLabel(r.ChannelLayout, i))
		bar(y, at(r.ChannelTruePeakDBTP, i), "dBTP", `fill="`+inkBlue+`"`)
		bar(y+peakBarThick+2, at(r.ChannelSamplePeakDBFS, i), "dBFS", `fill="`+inkSkyBlue+`" stroke="`+inkBlue+`" stroke-width="0.6"`)
	}
	if ceiling != nil {
		px := x.at(*ceiling)
		s.line(px, peakTop-6, px, bottom, inkVermillion, 1.5, "7 3 1.5 3")
		s.text(px, peakTop-10, "middle", ` fill="#A33F00" font-size="11"`, "ceiling "+reports.Peak(ceiling)+" dBTP")
	}
	// Key.
	ky := bottom + 44
	s.rect(peakLeft, ky, 18, peakBarThick, `fill="`+inkBlue+`"`)
	s.text(peakLeft+24, ky+9, "start", ` font-size="11"`, "true peak (upper bar)")
	s.rect(peakLeft+160, ky, 18, peakBarThick, `fill="`+inkSkyBlue+`" stroke="`+inkBlue+`" stroke-width="0.6"`)
	s.text(peakLeft+184, ky+9, "start", ` font-size="11"`, "sample peak (lower bar)")
	return s.close()
}

func at(list []*float64, i int) *float64 {
	if i < len(list) {
		return list[i]
	}
	return nil
}

func peakDescription(e Entry, n int) string {
	r := e.Result
	d := "True peak and sample peak of " + strconv.Itoa(n) + " channels:"
	for i := 0; i < n; i++ {
		d += " " + channelLabel(r.ChannelLayout, i) + " " + reports.Peak(at(r.ChannelTruePeakDBTP, i)) + " dBTP / " + reports.Peak(at(r.ChannelSamplePeakDBFS, i)) + " dBFS;"
	}
	if c := e.Target.TruePeakCeilingDBTP; c != nil {
		d += " ceiling " + reports.Peak(c) + " dBTP."
	}
	return d
}
