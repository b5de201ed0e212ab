package rules

import (
	"strings"
	"testing"

	"github.com/kweigh/kweigh/decode"
	"github.com/kweigh/kweigh/measure"
)

// TestHygieneChecks trips each signal-hygiene check with one changed field
// and leaves it alone without it. With a built-in spec (no hygiene limits)
// a finding warns against kweigh's QC default; with the Harbourlight Radio
// house spec (rules/testdata/house-spec.toml, invented) it fails. The
// thresholds are kweigh's QC defaults or the house spec's own values
// (common practice, no published source).
func TestHygieneChecks(t *testing.T) {
	house, err := LoadFile("testdata/house-spec.toml")
	if err != nil {
		t.Fatal(err)
	}
	builtin := mustLookup(t, "ebu-r128")
	tests := []struct {
		check       string
		trip        func(m *measure.Measurement)
		builtinWant Verdict // with ebu-r128 (QC default)
		houseWant   Verdict // with the house spec
		reason      string  // substring of the tripped reason
	}{
		{"clipping", func(m *measure.Measurement) {
			m.Signal.ClipRuns, m.Signal.LongestClipRun, m.Signal.ClippedSamples = 3, 17, 40
		}, Warn, Fail, "3 runs of 3 or more consecutive full-scale samples (longest 17 samples, 40 full-scale samples in all)"},
		// 0.02 of full scale = 20·log10(0.02) = -33.98 dBFS, above -40 dBFS.
		{"dc_offset", func(m *measure.Measurement) { m.Signal.DCOffset = []float64{0.0001, -0.02} },
			Warn, Warn, "DC offset -34.0 dBFS (2.00 % of full scale) on channel R"},
		// House spec min_correlation -0.2; QC default -0.3.
		{"phase", func(m *measure.Measurement) { m.Signal.Correlation = ptr(-0.98) },
			Warn, Fail, "is -0.98, below"},
		{"phase_window", func(m *measure.Measurement) { m.Signal.MinWindowCorrelation = ptr(-0.7) },
			Warn, Warn, "lowest L/R correlation over 3 s windows is -0.70, below -0.50"},
		{"dual_mono", func(m *measure.Measurement) { m.Signal.DualMono = true },
			Warn, Fail, "same signal"},
		{"silent_channels", func(m *measure.Measurement) { m.Signal.SilentChannels = []string{"R"} },
			Warn, Fail, "channel R is silent throughout (below -60 dBFS)"},
	}
	for _, tt := range tests {
		t.Run(tt.check, func(t *testing.T) {
			clean := cleanStereo(-23, -3)
			for name, s := range map[string]*Spec{"builtin": builtin, "house": house} {
				if c := mustCheck(t, Evaluate(s, clean), tt.check); c.Verdict != Pass {
					t.Errorf("%s, clean file: %s (%s), want pass", name, c.Verdict, c.Reason)
				}
			}
			m := cleanStereo(-23, -3)
			tt.trip(m)
			c := mustCheck(t, Evaluate(builtin, m), tt.check)
			if c.Verdict != tt.builtinWant || !strings.Contains(c.Reason, tt.reason) || !strings.Contains(c.Limit, "QC default") {
				t.Errorf("builtin: %+v, want %s with %q", c, tt.builtinWant, tt.reason)
			}
			if c := mustCheck(t, Evaluate(house, m), tt.check); c.Verdict != tt.houseWant {
				t.Errorf("house: %+v, want %s", c, tt.houseWant)
			}
		})
	}
}

func TestHygieneEdges(t *testing.T) {
	s := mustLookup(t, "podcast")
	m := cleanStereo(-16, -3)
	// Isolated full-scale samples are not runs: no finding.
	m.Signal.ClippedSamples = 2
	if c := mustCheck(t, Evaluate(s, m), "clipping"); c.Verdict != Pass || !strings.Contains(c.Reason, "2 full-scale samples") {
		t.Errorf("isolated full-scale samples: %+v", c)
	}
	// A spec allowing 2 runs passes 2 and fails 3.
	u := s.Clone()
	u.Signal.MaxClipRuns = ptr(int64(2))
	m.Signal.ClipRuns = 2
	if c := mustCheck(t, Evaluate(u, m), "clipping"); c.Verdict != Pass {
		t.Errorf("2 runs with 2 allowed: %+v", c)
	}
	m.Signal.ClipRuns = 3
	if c := mustCheck(t, Evaluate(u, m), "clipping"); c.Verdict != Fail {
		t.Errorf("3 runs with 2 allowed: %+v", c)
	}
	// DC exactly at -40 dBFS (0.01 of full scale) passes; no DC at all passes.
	m = cleanStereo(-16, -3)
	m.Signal.DCOffset = []float64{0.01, 0}
	if c := mustCheck(t, Evaluate(s, m), "dc_offset"); c.Verdict != Pass {
		t.Errorf("DC at -40 dBFS: %+v", c)
	}
	m.Signal.DCOffset = []float64{0, 0}
	if c := mustCheck(t, Evaluate(s, m), "dc_offset"); c.Verdict != Pass || c.Measured != nil {
		t.Errorf("no DC: %+v", c)
	}
	// Correlation exactly at the QC default -0.3 passes.
	m.Signal.Correlation = ptr(-0.3)
	if c := mustCheck(t, Evaluate(s, m), "phase"); c.Verdict != Pass {
		t.Errorf("correlation at -0.30: %+v", c)
	}
	// No L/R pair (mono): no phase or dual-mono checks.
	r := Evaluate(s, cleanMono(-19, -3))
	for _, id := range []string{"phase", "phase_window", "dual_mono"} {
		if _, ok := findCheck(r, id); ok {
			t.Errorf("mono file has a %s check", id)
		}
	}
	// A silent LFE is normal in 5.1.
	m = cleanStereo(-16, -3)
	m.Channels, m.ChannelLayout = 6, decode.DefaultLayout(6)
	m.Signal.SilentChannels = []string{decode.LowFrequency}
	if c := mustCheck(t, Evaluate(s, m), "silent_channels"); c.Verdict != Pass {
		t.Errorf("silent LFE: %+v", c)
	}
	// Policy "allow" removes the check.
	u = s.Clone()
	u.Signal.DualMono, u.Signal.SilentChannels = PolicyAllow, PolicyAllow
	m = cleanStereo(-16, -3)
	m.Signal.DualMono, m.Signal.SilentChannels = true, []string{"R"}
	r = Evaluate(u, m)
	if _, ok := findCheck(r, "dual_mono"); ok {
		t.Error("dual_mono checked under policy allow")
	}
	if _, ok := findCheck(r, "silent_channels"); ok {
		t.Error("silent_channels checked under policy allow")
	}
}

// TestBextLoudness compares bext loudness metadata (EBU Tech 3285 v2
// LoudnessValue, MaxTruePeakLevel, LoudnessRange) with the measurement
// against kweigh's default tolerances (0.5 LU, 1.0 dB, 2.0 LU; common
// practice, no published source).
func TestBextLoudness(t *testing.T) {
	s := mustLookup(t, "ebu-r128")
	m := cleanStereo(-23, -3)
	if _, ok := findCheck(Evaluate(s, m), "bext_loudness"); ok {
		t.Error("bext check without bext metadata or requirement")
	}
	m.Bext = &decode.Bext{Version: 2, LoudnessValue: ptr(-23.4), MaxTruePeakLevel: ptr(-2.1), LoudnessRange: ptr(8.5)}
	if c := mustCheck(t, Evaluate(s, m), "bext_loudness"); c.Verdict != Pass || c.Measured != 1.5 {
		t.Errorf("agreeing bext: %+v", c)
	}
	m.Bext.LoudnessValue = ptr(-23.55) // 0.55 LU from -23.0: beyond 0.5
	c := mustCheck(t, Evaluate(s, m), "bext_loudness")
	if c.Verdict != Warn || !strings.Contains(c.Reason, "integrated declared -23.55 LUFS, measured -23.00 LUFS (0.55 LU apart, tolerance ±0.5 LU)") {
		t.Errorf("disagreeing bext, default policy: %+v", c)
	}
	u := s.Clone()
	u.Bext.Mismatch = PolicyFail
	if c := mustCheck(t, Evaluate(u, m), "bext_loudness"); c.Verdict != Fail {
		t.Errorf("disagreeing bext, policy fail: %+v", c)
	}
	m.Bext.LoudnessValue = ptr(-23.5) // exactly 0.5 LU: passes
	if c := mustCheck(t, Evaluate(u, m), "bext_loudness"); c.Verdict != Pass {
		t.Errorf("bext at tolerance: %+v", c)
	}
	u.Bext.Required = true
	m.Bext = &decode.Bext{Version: 1}
	if c := mustCheck(t, Evaluate(u, m), "bext_loudness"); c.Verdict != Fail || !strings.Contains(c.Reason, "requires") {
		t.Errorf("required bext missing: %+v", c)
	}
}

// TestBextMaxima: the declared maximum momentary and short-term loudness
// (EBU Tech 3285 v2 MaxMomentaryLoudness, MaxShortTermLoudness) are
// compared with the measurement like the other declared values, at the
// integrated tolerance (kweigh's default ±0.5 LU, common practice, no
// published source).
func TestBextMaxima(t *testing.T) {
	s := mustLookup(t, "ebu-r128")
	m := cleanStereo(-23, -3) // max M -17, max S -20 (cleanStereo)
	m.Bext = &decode.Bext{Version: 2, MaxMomentaryLoudness: ptr(-17.2), MaxShortTermLoudness: ptr(-20.1)}
	if c := mustCheck(t, Evaluate(s, m), "bext_loudness"); c.Verdict != Pass || c.Reason != "bext max momentary, max short-term agree with the measurement" {
		t.Errorf("agreeing maxima: %+v", c)
	}
	m.Bext.MaxShortTermLoudness = ptr(-21.26)
	c := mustCheck(t, Evaluate(s, m), "bext_loudness")
	if c.Verdict != Warn || c.Measured != 1.26 || !strings.Contains(c.Reason, "max short-term declared -21.26 LUFS, measured -20.00 LUFS (1.26 LU apart, tolerance ±0.5 LU)") {
		t.Errorf("short-term maximum 1.26 LU off: %+v", c)
	}
}
