package rules_test

import (
	"fmt"
	"os"

	"github.com/kweigh/kweigh/measure"
	"github.com/kweigh/kweigh/rules"
)

func f(v float64) *float64 { return &v }

// A stereo podcast episode from the invented "Tidewater Tales" show, 2.6 LU
// too quiet for podcast practice (-16 LUFS stereo; common practice, no
// published source), whose peaks would go over -1 dBTP after raising it.
func ExampleEvaluate() {
	spec, err := rules.Lookup("podcast")
	if err != nil {
		panic(err)
	}
	m := &measure.Measurement{
		Path: "tidewater-tales/ep07.wav", Format: "wav", SampleRateHz: 48000, Channels: 2,
		ChannelLayout: []string{"L", "R"}, BitsPerSample: 24, SampleFormat: "int", DurationS: 1520,
		IntegratedLUFS: f(-18.6), TruePeakDBTP: f(-1.4), LoudnessRangeLU: f(6.2),
		MaxMomentaryLUFS: f(-11.0), MaxShortTermLUFS: f(-14.2),
		Signal: measure.Signal{SilenceThresholdDBFS: -60, DCOffset: []float64{0, 0}, Correlation: f(0.8), MinWindowCorrelation: f(0.4)},
	}
	r := rules.Evaluate(spec, m)
	fmt.Println(r.Spec, r.Verdict)
	for _, c := range r.Checks {
		fmt.Printf("%-16s %-5s %s\n", c.ID, c.Verdict, c.Reason)
	}
	fmt.Println(r.Advice)
	// Output:
	// podcast fail
	// integrity        pass  the audio decoded without damage
	// integrated       fail  integrated -18.6 LUFS is 2.6 LU below the -16.0 LUFS target (tolerance ±1.0 LU)
	// true_peak        pass  true peak -1.40 dBTP is 0.4 dB below the -1.0 dBTP ceiling
	// clipping         pass  no full-scale samples
	// dc_offset        pass  no DC offset
	// phase            pass  L/R correlation over the whole file is 0.80, not below -0.30
	// phase_window     pass  lowest L/R correlation over 3 s windows is 0.40, not below -0.50
	// dual_mono        pass  the two channels carry different signals
	// silent_channels  pass  every channel carries signal
	// Raise the level by 2.6 dB to reach -16.0 LUFS. That would put the true peak at +1.20 dBTP, so a true-peak limiter must take the peaks down by a further 2.2 dB to stay at or below -1.0 dBTP. Raising the level makes the file louder: check the result at a moderate listening level.
}

func ExampleSpec_Summary() {
	for _, s := range rules.Builtin()[:3] {
		fmt.Printf("%-12s %s\n", s.ID, s.Summary())
	}
	// Output:
	// ebu-r128     -23.0 LUFS ±1.0 LU, true peak ≤ -1.0 dBTP; EBU R 128 v4.0 (2020)
	// ebu-r128-qc  -23.0 LUFS ±0.2 LU, true peak ≤ -1.0 dBTP; EBU R 128 v4.0 (2020)
	// ebu-r128-s1  -23.0 LUFS ±0.5 LU, true peak ≤ -1.0 dBTP, short-term ≤ -18.0 LUFS; EBU R 128 s1 (2016)
}

func ExampleParse() {
	spec, err := rules.Parse("kweigh.toml", []byte(`
name = "quayside-podcasts"
extends = "podcast"

[loudness]
max_true_peak_dbtp = -1.5
tolerance_lu = 0.5
`))
	if err != nil {
		panic(err)
	}
	fmt.Println(spec.ID, "extends", spec.Extends+":", spec.Summary())

	_, err = rules.Parse("kweigh.toml", []byte("[loudness]\ntarget_lufs = -16\nmax_truepeak_dbtp = -1\n"))
	fmt.Println(err)
	// Output:
	// quayside-podcasts extends podcast: -16.0 LUFS ±0.5 LU (mono -19.0 LUFS), true peak ≤ -1.5 dBTP; user spec kweigh.toml
	// kweigh.toml:3: loudness.max_truepeak_dbtp: unknown key "max_truepeak_dbtp" (did you mean "max_true_peak_dbtp"?) (known in [loudness]: target_lufs, tolerance_lu, mono_target_lufs, min_integrated_lufs, max_integrated_lufs, warn_margin_lu, max_true_peak_dbtp, max_short_term_lufs, max_momentary_lufs, min_lra_lu, max_lra_lu, lra_advisory, check_downmix)
}

func ExampleSpec_Describe() {
	spec, _ := rules.Lookup("ebu-r128-s1")
	spec.Describe(os.Stdout)
	// Output:
	// ebu-r128-s1: EBU R 128 s1, short-form content (advertisements, promos, trailers)
	// Short-form content at -23 LUFS whose loudest 3 s window stays at or below -18 LUFS.
	// Source: EBU R 128 s1 (2016) [desc]
	//
	// CHECK                 LIMIT
	// integrated            -23.0 LUFS ±0.5 LU
	//                         source: EBU R 128 s1 (2016): target -23.0 LUFS [desc], tolerance ±0.5 LU [memory]
	// integrated near edge  warn within 0.2 LU of the edge
	//                         source: kweigh default (common practice, no published source)
	// true_peak             ≤ -1.0 dBTP
	//                         source: EBU R 128 s1 (2016): maximum true peak -1 dBTP [desc]
	// max_short_term        ≤ -18.0 LUFS
	//                         source: EBU R 128 s1 (2016): maximum short-term loudness -18 LUFS [desc]
	// clipping              no runs of consecutive full-scale samples
	//                         source: kweigh QC default, warn only (common practice, no published source)
	// dc_offset             ≤ -40.0 dBFS
	//                         source: kweigh QC default, warn only (common practice, no published source)
	// phase                 whole-file L/R correlation ≥ -0.30
	//                         source: kweigh QC default, warn only (common practice, no published source)
	// phase_window          3 s window L/R correlation ≥ -0.50
	//                         source: kweigh QC default, warn only (common practice, no published source)
	// dual_mono             two-channel file must not carry the same signal twice
	//                         source: kweigh QC default, warn only (common practice, no published source)
	// silent_channels       no silent channel (LFE excepted)
	//                         source: kweigh QC default, warn only (common practice, no published source)
	// bext_loudness         declared within ±0.5 LU (I, max M, max S), ±1.0 dB (true peak), ±2.0 LU (LRA) of measured; mismatch: warn
	//                         source: kweigh QC default, warn only (common practice, no published source)
	//
	// Notes:
	// - Values are compared with their limits after rounding both to 0.01.
	// - A pass is not a legal or broadcaster certification: local regulation and the receiving party's own QC decide.
}
