package rules

import (
	"testing"

	"github.com/kweigh/kweigh/measure"
)

// cleanStereo returns a measurement of a well-behaved 48 kHz/24-bit stereo
// WAV at the given integrated loudness and true peak. The hygiene figures are
// those of ordinary programme material; tests change one field at a time so
// that each check is seen to trip on exactly what it looks at. (These values
// are constructed for the rules unit tests: package measure is tested on
// real signals.)
func cleanStereo(integrated, truePeak float64) *measure.Measurement {
	return &measure.Measurement{
		Path: "harbour/episode-12.wav", Format: "wav", Codec: "pcm",
		SampleRateHz: 48000, Channels: 2, ChannelLayout: []string{"L", "R"}, LayoutSource: "default",
		BitsPerSample: 24, SampleFormat: "int", DurationS: 1800,
		IntegratedLUFS: ptr(integrated), TruePeakDBTP: ptr(truePeak),
		LoudnessRangeLU: ptr(7.0), SamplePeakDBFS: ptr(truePeak - 0.3),
		MaxMomentaryLUFS: ptr(integrated + 6), MaxShortTermLUFS: ptr(integrated + 3),
		Signal: measure.Signal{
			SilenceThresholdDBFS: -60, LeadingSilenceS: 0.2, TrailingSilenceS: 0.8,
			ClipRunMinSamples: 3, DCOffset: []float64{0.0001, -0.0002},
			Correlation: ptr(0.55), MinWindowCorrelation: ptr(0.1),
			SilentChannels: []string{},
		},
		Notes: []string{},
	}
}

// cleanMono is cleanStereo as a one-channel file.
func cleanMono(integrated, truePeak float64) *measure.Measurement {
	m := cleanStereo(integrated, truePeak)
	m.Channels, m.ChannelLayout = 1, []string{"M"}
	m.Signal.DCOffset = []float64{0.0001}
	m.Signal.Correlation, m.Signal.MinWindowCorrelation = nil, nil
	return m
}

// mustLookup returns a built-in spec or stops the test.
func mustLookup(t testing.TB, id string) *Spec {
	t.Helper()
	s, err := Lookup(id)
	if err != nil {
		t.Fatal(err)
	}
	return s
}

// findCheck returns the check with the given ID, and whether it is there.
func findCheck(r Result, id string) (Check, bool) {
	for _, c := range r.Checks {
		if c.ID == id {
			return c, true
		}
	}
	return Check{}, false
}

// mustCheck returns the check with the given ID or stops the test.
func mustCheck(t testing.TB, r Result, id string) Check {
	t.Helper()
	c, ok := findCheck(r, id)
	if !ok {
		t.Fatalf("no %q check in %+v", id, r.Checks)
	}
	return c
}

// measureError builds the measurement of a file that could not be measured.
type measureError struct{ msg string }

func (e *measureError) measurement() *measure.Measurement {
	return &measure.Measurement{Path: "harbour/promo.wav", Error: e.msg, Notes: []string{}}
}
