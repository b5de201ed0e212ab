package reports

import (
	"time"

	"github.com/kweigh/kweigh/decode"
	"github.com/kweigh/kweigh/measure"
	"github.com/kweigh/kweigh/rules"
)

// The test scenario is invented: Kestrel Lane Audio, a fictional production
// house, delivers episodes of its fictional drama "The Hollow Orchard" to a
// broadcaster (spec ebu-r128) and a trailer to a podcast outlet (spec
// podcast, from a per-folder spec file). Every figure below is invented
// input for the writers, not a measurement.

func num(x float64) *float64 { return &x }

// testOptions pins everything that would otherwise change from run to run:
// the clock (in a zone east of UTC, so the output shows it is converted),
// the version and the spec.
func testOptions() Options {
	return Options{
		Spec:    "ebu-r128",
		Version: "0.9.0-test",
		Clock: func() time.Time {
			return time.Date(2025, 3, 14, 10, 30, 15, 0, time.FixedZone("AEDT", 11*3600))
		},
	}
}

func stereoPass() *measure.Measurement {
	return &measure.Measurement{
		Path: "deliveries/hollow-orchard/HO_S02E01_final.wav", Format: "wav", Codec: "pcm",
		SampleRateHz: 48000, Channels: 2, ChannelLayout: []string{"L", "R"}, LayoutSource: "file",
		BitsPerSample: 24, SampleFormat: "int", DurationS: 1694.352,
		IntegratedLUFS: num(-23.04), LoudnessRangeLU: num(7.42), TruePeakDBTP: num(-1.83),
		SamplePeakDBFS: num(-2.1), MaxMomentaryLUFS: num(-15.27), MaxShortTermLUFS: num(-18.91),
		ChannelTruePeakDBTP:   []*float64{num(-1.83), num(-2.26)},
		ChannelSamplePeakDBFS: []*float64{num(-2.1), num(-2.48)},
		Signal: measure.Signal{
			SilenceThresholdDBFS: -60, LeadingSilenceS: 0.5, TrailingSilenceS: 1.2,
			ClipRunMinSamples: 3, DCOffset: []float64{0.00001, -0.00002},
			Correlation: num(0.71), MinWindowCorrelation: num(0.18),
		},
		Bext: &decode.Bext{
			Description: "The Hollow Orchard S02E01 broadcast mix", Originator: "Kestrel Lane Audio",
			OriginatorReference: "KLA-HO-0201", OriginationDate: "2025-03-11", OriginationTime: "16:42:07",
			Version: 2, LoudnessValue: num(-23), LoudnessRange: num(7.4), MaxTruePeakLevel: num(-1.8),
			MaxMomentaryLoudness: num(-15.3), MaxShortTermLoudness: num(-18.9),
		},
		Notes: []string{},
	}
}

func surroundTooLoud() *measure.Measurement {
	return &measure.Measurement{
		Path: "deliveries/hollow-orchard/HO_S02E02_final_51.wav", Format: "rf64", Codec: "pcm",
		SampleRateHz: 48000, Channels: 6, ChannelLayout: []string{"L", "R", "C", "LFE", "Ls", "Rs"},
		LayoutSource: "file", BitsPerSample: 24, SampleFormat: "int", DurationS: 1712.5,
		IntegratedLUFS: num(-19.62), LoudnessRangeLU: num(9.1), TruePeakDBTP: num(-0.38),
		SamplePeakDBFS: num(-0.61), MaxMomentaryLUFS: num(-11.84), MaxShortTermLUFS: num(-14.2),
		ChannelTruePeakDBTP:   []*float64{num(-0.38), num(-0.52), num(-1.97), num(-9.4), num(-6.15), num(-6.3)},
		ChannelSamplePeakDBFS: []*float64{num(-0.61), num(-0.7), num(-2.2), num(-9.41), num(-6.4), num(-6.52)},
		Signal: measure.Signal{
			SilenceThresholdDBFS: -60, LeadingSilenceS: 0.4, TrailingSilenceS: 2.1,
			ClippedSamples: 14, ClipRuns: 2, ClipRunMinSamples: 3, LongestClipRun: 5,
			DCOffset: []float64{0, 0, 0, 0, 0, 0}, Correlation: num(0.64), MinWindowCorrelation: num(-0.12),
		},
		// Notes left nil on purpose: JSON must still write [].
	}
}

func monoTrailer() *measure.Measurement {
	return &measure.Measurement{
		Path: "deliveries/podcast/HO_S02_trailer_mono.wav", Format: "wav", Codec: "pcm",
		SampleRateHz: 44100, Channels: 1, ChannelLayout: []string{"M"}, LayoutSource: "default",
		BitsPerSample: 16, SampleFormat: "int", DurationS: 62.75,
		IntegratedLUFS: num(-22.9), LoudnessRangeLU: num(4.3), TruePeakDBTP: num(-3.1),
		SamplePeakDBFS: num(-3.35), MaxMomentaryLUFS: num(-17.6), MaxShortTermLUFS: num(-19.8),
		ChannelTruePeakDBTP:   []*float64{num(-3.1)},
		ChannelSamplePeakDBFS: []*float64{num(-3.35)},
		Signal:                measure.Signal{SilenceThresholdDBFS: -60, LeadingSilenceS: 0.1, TrailingSilenceS: 0.8, ClipRunMinSamples: 3, DCOffset: []float64{0.0003}},
		Notes:                 []string{},
	}
}

func nearEdge() *measure.Measurement {
	m := stereoPass()
	m.Path = "deliveries/hollow-orchard/HO_S02E03_final.wav"
	m.DurationS = 1688.004
	m.IntegratedLUFS, m.LoudnessRangeLU, m.TruePeakDBTP = num(-22.18), num(11.6), num(-1.32)
	m.SamplePeakDBFS, m.MaxMomentaryLUFS, m.MaxShortTermLUFS = num(-1.5), num(-13.9), num(-17.45)
	m.ChannelTruePeakDBTP = []*float64{num(-1.32), num(-1.4)}
	m.ChannelSamplePeakDBFS = []*float64{num(-1.5), num(-1.66)}
	m.Signal.TrailingSilenceS = 4.6
	m.Bext = nil
	return m
}

func corrupt() *measure.Measurement {
	return &measure.Measurement{
		Path:  "deliveries/hollow-orchard/HO_S02E04_final.wav",
		Error: "deliveries/hollow-orchard/HO_S02E04_final.wav: wav: fmt chunk at offset 12 is 8 bytes, need at least 16",
	}
}

func shortSting() *measure.Measurement {
	return &measure.Measurement{
		Path: "deliveries/hollow-orchard/HO_sting_ident.wav", Format: "wav", Codec: "ieee-float",
		SampleRateHz: 48000, Channels: 2, ChannelLayout: []string{"L", "R"}, LayoutSource: "default",
		BitsPerSample: 32, SampleFormat: "float", DurationS: 0.25,
		TruePeakDBTP: num(-6.02), SamplePeakDBFS: num(-6.2),
		ChannelTruePeakDBTP:   []*float64{num(-6.02), nil},
		ChannelSamplePeakDBFS: []*float64{num(-6.2), nil},
		Signal: measure.Signal{
			SilenceThresholdDBFS: -60, ClipRunMinSamples: 3, DCOffset: []float64{0, 0},
			SilentChannels: []string{"R"},
		},
		Notes: []string{
			"integrated loudness undefined: the file is shorter than one 400 ms gating block",
			"loudness range, maximum momentary and short-term loudness undefined: the file is shorter than their windows",
		},
	}
}

func truncated() *measure.Measurement {
	m := stereoPass()
	m.Path = "deliveries/hollow-orchard/HO_S02E05_final.wav"
	m.DurationS = 812.004
	m.Damaged = "truncated data: the header declares 1701.120 s, the file holds 812.004 s"
	m.Bext = nil
	return m
}

// testMeasurements is the measure run, sorted by path as the CLI sorts it.
func testMeasurements() []*measure.Measurement {
	ms := []*measure.Measurement{
		stereoPass(), surroundTooLoud(), nearEdge(), corrupt(), truncated(), shortSting(), monoTrailer(),
	}
	SortMeasurements(ms)
	return ms
}

// testResults is the check run, sorted by path as the CLI sorts it.
func testResults() []*rules.Result {
	integrated := func(v rules.Verdict, lufs *float64, limit, reason string) rules.Check {
		c := rules.Check{ID: "integrated", Verdict: v, Unit: "LUFS", Limit: limit, Reason: reason}
		if lufs != nil {
			c.Measured = *lufs
		}
		return c
	}
	truePeak := func(v rules.Verdict, dbtp float64, limit, reason string) rules.Check {
		return rules.Check{ID: "true_peak", Verdict: v, Measured: dbtp, Unit: "dBTP", Limit: limit, Reason: reason}
	}
	passing := func(id string, measured any, unit, limit string) rules.Check {
		return rules.Check{ID: id, Verdict: rules.Pass, Measured: measured, Unit: unit, Limit: limit, Reason: "within the limit"}
	}
	const r128 = "-23.0 LUFS ±1.0 LU"
	formatChecks := []rules.Check{
		passing("sample_rate", 48000.0, "Hz", "48000 Hz"),
		passing("bit_depth", 24.0, "bits", "≥ 24 bits"),
	}
	with := func(cs ...rules.Check) []rules.Check { return append(cs, formatChecks...) }

	rs := []*rules.Result{
		{
			Measurement: stereoPass(), Spec: "ebu-r128", Verdict: rules.Pass,
			Checks: with(
				integrated(rules.Pass, num(-23.04), r128, "within the tolerance"),
				truePeak(rules.Pass, -1.83, "≤ -1.0 dBTP", "below the ceiling"),
				rules.Check{ID: "bext_loudness", Verdict: rules.Pass, Measured: -23.0, Unit: "LUFS", Limit: "declared within 0.1 LU of measured", Reason: "declared -23.0 LUFS matches"},
			),
		},
		{
			Measurement: surroundTooLoud(), Spec: "ebu-r128", Verdict: rules.Fail,
			Checks: with(
				integrated(rules.Fail, num(-19.62), r128, "3.6 LU louder than the target"),
				truePeak(rules.Fail, -0.38, "≤ -1.0 dBTP", "0.62 dB over the ceiling"),
				rules.Check{ID: "clipping", Verdict: rules.Warn, Measured: 2.0, Unit: "runs", Limit: "no runs of 3 or more full-scale samples", Reason: "2 runs of clipped samples, longest 5"},
			),
			SuggestedGainDB: num(-3.6),
			Advice:          "Turn the mix down by 3.6 dB; the true peak then sits at -4.0 dBTP, under the ceiling.",
		},
		{
			Measurement: nearEdge(), Spec: "ebu-r128", Verdict: rules.Warn,
			Checks: with(
				integrated(rules.Warn, num(-22.18), r128, "within the tolerance but 0.18 LU from its edge"),
				truePeak(rules.Pass, -1.32, "≤ -1.0 dBTP", "below the ceiling"),
				rules.Check{ID: "trailing_silence", Verdict: rules.Warn, Measured: 4.6, Unit: "s", Limit: "≤ 5.0 s", Reason: "close to the limit"},
			),
			SuggestedGainDB: num(-0.8),
		},
		{Measurement: corrupt(), Spec: "ebu-r128", Verdict: rules.Error},
		{
			Measurement: truncated(), Spec: "ebu-r128", Verdict: rules.Fail,
			Checks: with(
				rules.Check{ID: "integrity", Verdict: rules.Fail, Measured: "truncated", Limit: "complete audio", Reason: "the data ends before the length the header declares"},
				integrated(rules.Pass, num(-23.04), r128, "within the tolerance"),
				truePeak(rules.Pass, -1.83, "≤ -1.0 dBTP", "below the ceiling"),
			),
			Advice: "Export and deliver the file again; the copy received is incomplete.",
		},
		{
			Measurement: shortSting(), Spec: "ebu-r128", Verdict: rules.Warn,
			Checks: with(
				integrated(rules.Warn, nil, r128, "no integrated loudness: shorter than one 400 ms gating block"),
				truePeak(rules.Pass, -6.02, "≤ -1.0 dBTP", "below the ceiling"),
				rules.Check{ID: "silent_channels", Verdict: rules.Warn, Measured: "R", Limit: "no silent channel", Reason: "channel R holds digital silence"},
			),
		},
		{
			Measurement: monoTrailer(), Spec: "podcast", Verdict: rules.Fail,
			Checks: []rules.Check{
				integrated(rules.Fail, num(-22.9), "-19.0 LUFS ±1.0 LU (mono)", "3.9 LU quieter than the mono target"),
				truePeak(rules.Pass, -3.1, "≤ -1.0 dBTP", "below the ceiling"),
				rules.Check{ID: "sample_rate", Verdict: rules.Pass, Measured: 44100.0, Unit: "Hz", Limit: "44100 or 48000 Hz", Reason: "allowed"},
			},
			SuggestedGainDB:    num(3.9),
			LimiterReductionDB: num(1.8),
			Advice:             "Raise the level by 3.9 dB through a true-peak limiter set to -1.0 dBTP; it has to take 1.8 dB off the loudest peaks.",
		},
	}
	SortResults(rs)
	return rs
}

func testMeasureSummary() Summary {
	var s Summary
	for _, m := range testMeasurements() {
		s.AddMeasurement(m)
	}
	s.Elapsed = 4200 * time.Millisecond
	return s
}

func testCheckSummary() Summary {
	var s Summary
	for _, r := range testResults() {
		s.Add(r)
	}
	s.Elapsed = 4200 * time.Millisecond
	return s
}
