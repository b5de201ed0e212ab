package htmlpage

import (
	"bytes"
	"encoding/xml"
	"io"
	"math"
	"strconv"
	"strings"
	"testing"

	"github.com/kweigh/kweigh/loudness"
	"github.com/kweigh/kweigh/measure"
	"github.com/kweigh/kweigh/rules"
)

// threeHourEntry is a three-hour stereo programme built from a
// deterministic series rather than measured audio (the drawing is under
// test here, and three hours of audio would make a slow test): loudness
// swinging slowly around -24 LUFS, true peak -6 dBTP, except one 100 ms
// block at element spike with momentary -4 LUFS and true peak +0.5 dBTP.
// The figures are invented to match the series; the verdict and checks come
// from the real rules engine against the demo's house spec.
func threeHourEntry(t testing.TB, spike int) Entry {
	n := threeHours
	s := &loudness.Series{
		Momentary:  make([]float32, n),
		ShortTerm:  make([]float32, n),
		TruePeak:   make([]float32, n),
		SamplePeak: make([]float32, n),
	}
	for i := 0; i < n; i++ {
		swing := float32(3 * math.Sin(float64(i)/900))
		s.Momentary[i] = -24 + swing + float32(i%5)*0.3
		s.ShortTerm[i] = -24 + swing
		s.TruePeak[i] = -6
		s.SamplePeak[i] = -6.2
	}
	for i := 0; i < 29; i++ { // windows not yet full (EBU Tech 3341: 0.4 s and 3 s)
		s.ShortTerm[i] = float32(math.NaN())
		if i < 3 {
			s.Momentary[i] = float32(math.NaN())
		}
	}
	s.Momentary[spike], s.TruePeak[spike], s.SamplePeak[spike] = -4, 0.5, 0.1
	m := &measure.Measurement{
		Path: "archive/night_shift_marathon.wav", Format: "rf64", Codec: "pcm",
		SampleRateHz: 48000, Channels: 2, ChannelLayout: stereo, LayoutSource: "file",
		BitsPerSample: 24, SampleFormat: "int", DurationS: float64(n) / 10,
		IntegratedLUFS: ptr(-24), LoudnessRangeLU: ptr(4.2), TruePeakDBTP: ptr(0.5), SamplePeakDBFS: ptr(0.1),
		MaxMomentaryLUFS: ptr(-4), MaxShortTermLUFS: ptr(-21),
		ChannelTruePeakDBTP: []*float64{ptr(0.5), ptr(-6)}, ChannelSamplePeakDBFS: []*float64{ptr(0.1), ptr(-6.2)},
		Notes: []string{}, Series: s,
	}
	spec := northwindSpec(t)
	r := rules.Evaluate(spec, m)
	return Entry{Result: &r, Target: TargetFor(spec, m.Channels)}
}

// svgElements parses an SVG document and returns its elements with their
// attributes.
func svgElements(t *testing.T, doc string) []xml.StartElement {
	t.Helper()
	var out []xml.StartElement
	d := xml.NewDecoder(strings.NewReader(doc))
	for {
		tok, err := d.Token()
		if err == io.EOF {
			return out
		}
		if err != nil {
			t.Fatalf("plot is not well-formed XML: %v", err)
		}
		if el, ok := tok.(xml.StartElement); ok {
			out = append(out, el.Copy())
		}
	}
}

func xmlAttr(el xml.StartElement, name string) string {
	for _, a := range el.Attr {
		if a.Name.Local == name {
			return a.Value
		}
	}
	return ""
}

func attrNum(t *testing.T, el xml.StartElement, name string) float64 {
	t.Helper()
	v, err := strconv.ParseFloat(xmlAttr(el, name), 64)
	if err != nil {
		t.Fatalf("<%s %s=%q>: %v", el.Name.Local, name, xmlAttr(el, name), err)
	}
	return v
}

// pathPoints returns the (x, y) points of a path made of M, L and h0.5
// (the dot marker) commands, as seriesPath writes them.
func pathPoints(t *testing.T, d string) [][2]float64 {
	t.Helper()
	var nums []float64
	fields := strings.Fields(strings.NewReplacer("M", " ", "L", " ", "h", " h ", "Z", " ").Replace(d))
	for i := 0; i < len(fields); i++ {
		if fields[i] == "h" {
			i++ // skip the dot's length
			continue
		}
		v, err := strconv.ParseFloat(fields[i], 64)
		if err != nil {
			t.Fatalf("path %q: %v", d, err)
		}
		nums = append(nums, v)
	}
	if len(nums)%2 != 0 {
		t.Fatalf("path %q has an odd number of coordinates", d)
	}
	pts := make([][2]float64, 0, len(nums)/2)
	for i := 0; i < len(nums); i += 2 {
		pts = append(pts, [2]float64{nums[i], nums[i+1]})
	}
	return pts
}

// TestLongPlotKeepsSpike draws a three-hour programme with one over in one
// 100 ms block: the overs strip shows exactly one mark at that time and the
// momentary curve (a min/max band at this length) still reaches the
// block's level.
func TestLongPlotKeepsSpike(t *testing.T) {
	const spike = 77_777 // 2:09:37.7
	e := threeHourEntry(t, spike)
	x := scale{0, seriesDuration(e), plotLeft, plotRight}
	lo, hi := levelRange(e)
	y := scale{lo, hi, areaBottom, areaTop}

	var overs []xml.StartElement
	lowestY := math.Inf(1)
	for _, el := range svgElements(t, loudnessPlot(e, "t-", true)) {
		switch {
		case el.Name.Local == "rect" && xmlAttr(el, "fill") == inkVermillion && xmlAttr(el, "y") == num(laneTop):
			overs = append(overs, el)
		case el.Name.Local == "path" && xmlAttr(el, "stroke") == inkOrange:
			for _, pt := range pathPoints(t, xmlAttr(el, "d")) {
				lowestY = min(lowestY, pt[1])
			}
		}
	}
	if len(overs) != 1 {
		t.Fatalf("found %d over marks, want 1", len(overs))
	}
	left, width := attrNum(t, overs[0], "x"), attrNum(t, overs[0], "width")
	at := x.at(float64(spike) * seriesStepS)
	if at < left-0.1 || at > left+width+0.1 {
		t.Errorf("over mark spans x %.1f..%.1f, want it to cover the spike at x %.1f", left, left+width, at)
	}
	if want := y.at(-4); math.Abs(lowestY-want) > 0.06 {
		t.Errorf("momentary curve peaks at y %.1f, want y %.1f (-4 LUFS)", lowestY, want)
	}
}

// TestLongReportSize: a three-hour file's report stays small, because the
// curves are decimated to PlotColumns columns.
func TestLongReportSize(t *testing.T) {
	var b bytes.Buffer
	e := threeHourEntry(t, 5000)
	page := Page{Title: "Archive check", Generated: demoTime, Specs: []string{e.Result.Spec}, Entries: []Entry{e}}
	if err := Write(&b, page); err != nil {
		t.Fatal(err)
	}
	const limit = 2 << 20 // "a few MB" (issue 5); 2 MiB leaves room
	if b.Len() > limit {
		t.Errorf("three-hour report is %d bytes, want at most %d", b.Len(), limit)
	}
	t.Logf("three-hour report: %d bytes", b.Len())
}

func BenchmarkWriteThreeHours(b *testing.B) {
	e := threeHourEntry(b, 5000)
	page := Page{Title: "Archive check", Generated: demoTime, Specs: []string{e.Result.Spec}, Entries: []Entry{e}}
	var out bytes.Buffer
	for b.Loop() {
		out.Reset()
		if err := Write(&out, page); err != nil {
			b.Fatal(err)
		}
	}
	b.ReportMetric(float64(out.Len()), "bytes/report")
}
