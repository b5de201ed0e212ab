package rules

import (
	"strings"
	"testing"
)

// TestBitRateChecks: the [format] keys min_bit_rate_kbps, max_bit_rate_kbps
// and bit_rate_modes judge compressed files (issue 9; the figures are an
// invented outlet's, no published source) and leave uncompressed ones
// alone.
func TestBitRateChecks(t *testing.T) {
	s, err := Parse("pod.toml", []byte("extends = \"podcast\"\n[format]\nmin_bit_rate_kbps = 96\nmax_bit_rate_kbps = 192\nbit_rate_modes = [\"cbr\"]\n"))
	if err != nil {
		t.Fatal(err)
	}
	mp3 := func(kbps float64, mode string) Result {
		m := cleanStereo(-16, -2)
		m.Format, m.Codec, m.SampleRateHz, m.BitsPerSample = "mp3", "mpeg-1 layer 3", 44100, 0
		m.BitRateKbps, m.BitRateMode = kbps, mode
		return Evaluate(s, m)
	}
	for _, tc := range []struct {
		kbps        float64
		mode        string
		rate, modeV Verdict
		reason      string
	}{
		{128, "cbr", Pass, Pass, "bit rate 128.0 kbps is within 96.0 to 192.0 kbps"},
		{64, "cbr", Fail, Pass, "bit rate 64.0 kbps is lower than the 96.0 kbps minimum"},
		{320, "vbr", Fail, Fail, "bit rate 320.0 kbps is higher than the 192.0 kbps maximum"},
		{0, "", Warn, Warn, "the mp3 decoder could not tell the bit rate"},
	} {
		r := mp3(tc.kbps, tc.mode)
		rate, mode := mustCheck(t, r, "bit_rate"), mustCheck(t, r, "bit_rate_mode")
		if rate.Verdict != tc.rate || rate.Reason != tc.reason || mode.Verdict != tc.modeV {
			t.Errorf("%v kbps %q: bit_rate %+v, bit_rate_mode %+v", tc.kbps, tc.mode, rate, mode)
		}
	}
	if c := mustCheck(t, mp3(128, "vbr"), "bit_rate_mode"); !strings.Contains(c.Reason, "bit rate mode vbr is not accepted (accepted: cbr)") {
		t.Errorf("vbr: %+v", c)
	}
	// A WAV has no coded bit rate: neither check applies.
	r := Evaluate(s, cleanStereo(-16, -2))
	for _, id := range []string{"bit_rate", "bit_rate_mode"} {
		if _, ok := findCheck(r, id); ok {
			t.Errorf("%s judged on a WAV", id)
		}
	}
	// A lossy file has no bit depth, which a list of depths never accepts.
	d, err := Parse("depth.toml", []byte("extends = \"podcast\"\n[format]\nbit_depths = [16, 24]\n"))
	if err != nil {
		t.Fatal(err)
	}
	m := cleanStereo(-16, -2)
	m.Format, m.BitsPerSample = "mp3", 0
	if c := mustCheck(t, Evaluate(d, m), "bit_depth"); c.Verdict != Fail || c.Measured != nil || c.Reason != "mp3 has no bit depth (lossy coding); the spec asks for 16, 24 bits" {
		t.Errorf("mp3 bit depth: %+v", c)
	}
	// Bad values are errors with the line.
	for _, bad := range []string{"[format]\nbit_rate_modes = [\"constant\"]\n", "[format]\nmin_bit_rate_kbps = 4\n", "[format]\nmin_bit_rate_kbps = 192\nmax_bit_rate_kbps = 128\n"} {
		if _, err := Parse("bad.toml", []byte(bad)); err == nil || !strings.Contains(err.Error(), "bad.toml:") {
			t.Errorf("%q: error %v", bad, err)
		}
	}
}
