package rules

import (
	"math"
	"strings"
	"testing"

	"github.com/kweigh/kweigh/decode"
	"github.com/kweigh/kweigh/measure"
)

// TestNonFiniteMeasurementsFail: a NaN or ±Inf figure, wherever it sits in
// the record, makes its check fail (never pass, never warn) and gets no gain
// or limiter advice. The spec sets a limit for every check concerned.
func TestNonFiniteMeasurementsFail(t *testing.T) {
	spec, err := Parse("all-limits.toml", []byte(`extends = "ebu-r128"
[loudness]
max_short_term_lufs = -18
max_momentary_lufs = -10
min_lra_lu = 1
max_lra_lu = 20
check_downmix = true
[timing]
min_duration_s = 1
max_leading_silence_s = 5
max_trailing_silence_s = 5
[signal]
max_dc_offset_dbfs = -40
min_correlation = -0.5
min_window_correlation = -0.9
[bext]
mismatch = "warn"
`))
	if err != nil {
		t.Fatal(err)
	}
	type setter func(m *measure.Measurement, v float64)
	set := map[string]setter{
		"integrated":         func(m *measure.Measurement, v float64) { m.IntegratedLUFS = &v },
		"true_peak":          func(m *measure.Measurement, v float64) { m.TruePeakDBTP = &v },
		"max_short_term":     func(m *measure.Measurement, v float64) { m.MaxShortTermLUFS = &v },
		"max_momentary":      func(m *measure.Measurement, v float64) { m.MaxMomentaryLUFS = &v },
		"loudness_range":     func(m *measure.Measurement, v float64) { m.LoudnessRangeLU = &v },
		"downmix_integrated": func(m *measure.Measurement, v float64) { m.StereoDownmix.IntegratedLUFS = &v },
		"duration":           func(m *measure.Measurement, v float64) { m.DurationS = v },
		"leading_silence":    func(m *measure.Measurement, v float64) { m.Signal.LeadingSilenceS = v },
		"trailing_silence":   func(m *measure.Measurement, v float64) { m.Signal.TrailingSilenceS = v },
		"dc_offset":          func(m *measure.Measurement, v float64) { m.Signal.DCOffset[1] = v },
		"phase":              func(m *measure.Measurement, v float64) { m.Signal.Correlation = &v },
		"phase_window":       func(m *measure.Measurement, v float64) { m.Signal.MinWindowCorrelation = &v },
		"bext_loudness": func(m *measure.Measurement, v float64) {
			m.IntegratedLUFS = &v // the figure the declared value is compared with
		},
	}
	for id, put := range set {
		for _, bad := range []float64{math.NaN(), math.Inf(1), math.Inf(-1)} {
			m := cleanStereo(-23, -3)
			m.StereoDownmix = &measure.Downmix{Method: measure.DownmixMethod, IntegratedLUFS: ptr(-23.0), TruePeakDBTP: ptr(-3.0)}
			m.Bext = bextWithLoudness(-23)
			put(m, bad)
			r := Evaluate(spec, m)
			c, ok := findCheck(r, id)
			if !ok {
				t.Errorf("%s = %v: check missing from %v", id, bad, checkIDs(r))
				continue
			}
			if c.Verdict != Fail || c.Measured != nil || !strings.Contains(c.Reason, "not a measurement") {
				t.Errorf("%s = %v: %s, measured %v, %q; want a failure without a figure", id, bad, c.Verdict, c.Measured, c.Reason)
			}
			if r.Verdict != Fail {
				t.Errorf("%s = %v: file verdict %s, want fail", id, bad, r.Verdict)
			}
			if r.SuggestedGainDB != nil || r.LimiterReductionDB != nil || strings.Contains(r.Advice, "Inf") || strings.Contains(r.Advice, "NaN") {
				t.Errorf("%s = %v: advice %v %v %q from a non-finite figure", id, bad, r.SuggestedGainDB, r.LimiterReductionDB, r.Advice)
			}
		}
	}
}

func checkIDs(r Result) []string {
	var ids []string
	for _, c := range r.Checks {
		ids = append(ids, c.ID)
	}
	return ids
}

// bextWithLoudness is a BWF bext record declaring integrated loudness v.
func bextWithLoudness(v float64) *decode.Bext {
	return &decode.Bext{Version: 2, LoudnessValue: &v}
}
