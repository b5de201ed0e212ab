package reports_test

import (
	"fmt"
	"os"
	"time"

	"github.com/kweigh/kweigh/measure"
	"github.com/kweigh/kweigh/reports"
	"github.com/kweigh/kweigh/rules"
)

func figure(x float64) *float64 { return &x }

// A measurement from Kestrel Lane Audio's (invented) promo delivery, printed
// as the `kweigh measure` table.
func ExampleNewMeasureWriter() {
	m := &measure.Measurement{
		Path: "promos/HO_promo_30s.wav", Format: "wav", Codec: "pcm",
		SampleRateHz: 48000, Channels: 2, ChannelLayout: []string{"L", "R"}, LayoutSource: "default",
		BitsPerSample: 24, SampleFormat: "int", DurationS: 30,
		IntegratedLUFS: figure(-23.1), LoudnessRangeLU: figure(3.2),
		TruePeakDBTP: figure(-2.04), SamplePeakDBFS: figure(-2.3),
		MaxMomentaryLUFS: figure(-18.6), MaxShortTermLUFS: figure(-20.4),
		ChannelTruePeakDBTP:   []*float64{figure(-2.04), figure(-2.51)},
		ChannelSamplePeakDBFS: []*float64{figure(-2.3), figure(-2.77)},
		Signal:                measure.Signal{SilenceThresholdDBFS: -60, TrailingSilenceS: 0.3, ClipRunMinSamples: 3},
	}
	w, err := reports.NewMeasureWriter(os.Stdout, reports.Text, reports.Options{})
	if err != nil {
		fmt.Println(err)
		return
	}
	var s reports.Summary
	w.Write(m)
	s.AddMeasurement(m)
	if err := w.Close(s); err != nil {
		fmt.Println(err)
	}
	// Output:
	// promos/HO_promo_30s.wav
	//   stream          wav, pcm, 24-bit int, 48000 Hz, 2 channels
	//   layout          L R (default for the channel count)
	//   duration        0:30.0 (30.000 s)
	//   integrated        -23.1 LUFS
	//   loudness range      3.2 LU
	//   true peak         -2.04 dBTP   L -2.04  R -2.51
	//   sample peak       -2.30 dBFS   L -2.30  R -2.77
	//   max momentary     -18.6 LUFS
	//   max short-term    -20.4 LUFS
	//   silence         leading 0.0 s, trailing 0.3 s (below -60 dBFS)
	//   clipping        none
	//
	// 1 file measured · 0:30.0 of audio
}

// The same promo judged too loud for an (invented) outlet's spec, printed as
// the `kweigh check` text report.
func ExampleNewCheckWriter() {
	r := &rules.Result{
		Measurement: &measure.Measurement{
			Path: "promos/HO_promo_30s_v2.wav", DurationS: 30,
			IntegratedLUFS: figure(-20.3), LoudnessRangeLU: figure(3.4), TruePeakDBTP: figure(-0.9),
		},
		Spec:    "ebu-r128",
		Verdict: rules.Fail,
		Checks: []rules.Check{
			{ID: "integrated", Verdict: rules.Fail, Measured: -20.3, Unit: "LUFS", Limit: "-23.0 LUFS ±1.0 LU", Reason: "2.7 LU louder than the target"},
			{ID: "true_peak", Verdict: rules.Fail, Measured: -0.9, Unit: "dBTP", Limit: "≤ -1.0 dBTP", Reason: "0.1 dB over the ceiling"},
			{ID: "sample_rate", Verdict: rules.Pass, Measured: 48000.0, Unit: "Hz", Limit: "48000 Hz", Reason: "as required"},
		},
		SuggestedGainDB: figure(-2.7),
		Advice:          "Turn it down by 2.7 dB; that also brings the true peak under the ceiling.",
	}
	w, err := reports.NewCheckWriter(os.Stdout, reports.Text, reports.Options{Spec: "ebu-r128"})
	if err != nil {
		fmt.Println(err)
		return
	}
	s := reports.Summary{Elapsed: 1500 * time.Millisecond}
	w.Write(r)
	s.Add(r)
	if err := w.Close(s); err != nil {
		fmt.Println(err)
	}
	// Output:
	// Checking against spec ebu-r128
	//
	// FAIL  ✗  promos/HO_promo_30s_v2.wav
	//           integrated -20.3 LUFS · range 3.4 LU · true peak -0.90 dBTP · duration 0:30.0
	//           ✗ fail  integrated  -20.3 LUFS  limit -23.0 LUFS ±1.0 LU
	//                   2.7 LU louder than the target
	//           ✗ fail  true_peak   -0.90 dBTP  limit ≤ -1.0 dBTP
	//                   0.1 dB over the ceiling
	//           1 other check passed
	//           gain -2.7 dB suggested
	//           advice: Turn it down by 2.7 dB; that also brings the true peak under the ceiling.
	//
	// 0 passed, 0 warned, 1 failed, 0 errors · 1 file, 0:30.0 of audio checked in 1.5 s
	// A pass means the figures meet the spec as kweigh reads it; the receiving party's own QC and local regulation decide acceptance.
}

func ExampleParseFormat() {
	for _, name := range []string{"JSONL", "xml"} {
		f, err := reports.ParseFormat(name)
		fmt.Println(f, f.Streaming(), err)
	}
	// Output:
	// jsonl true <nil>
	//  false unknown report format "xml" (use one of: text, json, jsonl, csv, junit)
}
