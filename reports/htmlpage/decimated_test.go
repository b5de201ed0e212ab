package htmlpage

import (
	"math"
	"strings"
	"testing"

	"github.com/kweigh/kweigh/loudness"
	"github.com/kweigh/kweigh/measure"
	"github.com/kweigh/kweigh/rules"
)

// decimatedEntry is a 20-hour mono programme in the engine's decimated
// form: a series at Step = 8 (each element 0.8 s, each pair of elements the
// extremes of 1.6 s), and the undecimated short-term level distribution, all of it at -24 LUFS but one true-peak over. The figures
// are invented to match the series; the verdict comes from the real rules.
func decimatedEntry(t *testing.T) Entry {
	const step, n = 8, 90000 // 90 000 elements × 0.8 s = 20 h
	s := &loudness.Series{Step: step,
		Momentary: make([]float32, n), ShortTerm: make([]float32, n),
		TruePeak: make([]float32, n), SamplePeak: make([]float32, n),
		ShortTermLevels: make([]int64, 461),
	}
	for i := range n {
		s.Momentary[i], s.ShortTerm[i], s.TruePeak[i], s.SamplePeak[i] = -24, -24, -6, -6.5
	}
	s.Momentary[0], s.ShortTerm[0] = float32(math.NaN()), float32(math.NaN())
	s.TruePeak[50001] = 0.4                // in pair 25000
	s.ShortTermLevels[460] = 20*36000 - 29 // every short-term value, in the bin from -24.0 to -23.9 LUFS
	m := &measure.Measurement{
		Path: "archive/harbour-night-log.wav", Format: "rf64", Codec: "pcm",
		SampleRateHz: 48000, Channels: 1, ChannelLayout: []string{"M"}, LayoutSource: "default",
		BitsPerSample: 24, SampleFormat: "int", DurationS: 20 * 3600,
		IntegratedLUFS: ptr(-24), LoudnessRangeLU: ptr(0), TruePeakDBTP: ptr(0.4), SamplePeakDBFS: ptr(-0.2),
		MaxMomentaryLUFS: ptr(-24), MaxShortTermLUFS: ptr(-24),
		ChannelTruePeakDBTP: []*float64{ptr(0.4)}, ChannelSamplePeakDBFS: []*float64{ptr(-0.2)},
		Notes: []string{}, Series: s,
	}
	spec := northwindSpec(t)
	r := rules.Evaluate(spec, m)
	return Entry{Result: &r, Target: TargetFor(spec, m.Channels)}
}

// TestDecimatedSeries: a decimated series spans the file's real length on
// the time axis, its over is counted as one stretch of 1.6 s (not as one
// 100 ms block), and the histogram counts every short-term value from the
// level distribution rather than the decimated extremes.
func TestDecimatedSeries(t *testing.T) {
	e := decimatedEntry(t)
	if d := seriesDuration(e); d != 20*3600 {
		t.Errorf("plot spans %v s, want 72000", d)
	}
	plot := loudnessPlot(e, "d", true)
	if !strings.Contains(plot, "over the ceiling: in 1 stretch of 1.6 s") {
		t.Error("the legend should count the over as one 1.6 s stretch")
	}
	if !strings.Contains(plot, "in 1 stretch of 1.6 s above the") {
		t.Error("the description should say the over lies in one 1.6 s stretch")
	}
	runs := overRuns(e.Result.Series.TruePeak, elementSeconds(e.Result.Series), -1, PlotColumns)
	if len(runs) != 1 || runs[0].from > 50001*0.8 || runs[0].to < 50002*0.8 || runs[0].to-runs[0].from > 120 {
		t.Errorf("over runs %+v, want one around %v s", runs, 50001*0.8)
	}
	hist := shortTermHistogram(e, "h")
	if !strings.Contains(hist, "Distribution of 719971 short-term loudness values") {
		t.Error("the histogram should count every short-term value of the level distribution")
	}
	region := loudnessRangeRegion(shortTermLevels(e.Result.Series))
	if !region.ok || math.Abs(region.low+23.95) > 1e-9 || region.high != region.low {
		t.Errorf("range region %+v, want both ends at the -24 LUFS bin's centre", region)
	}
}
