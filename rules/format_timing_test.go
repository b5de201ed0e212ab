package rules

import (
	"strings"
	"testing"

	"github.com/kweigh/kweigh/measure"
)

// TestFormatAndTimingChecks uses the invented Harbourlight Radio house spec
// (testdata/house-spec.toml): wav or bw64, 48 kHz, 24-bit int, mono or
// stereo, at least 5 s, at most 1 s of leading and 3 s of trailing silence.
func TestFormatAndTimingChecks(t *testing.T) {
	house, err := LoadFile("testdata/house-spec.toml")
	if err != nil {
		t.Fatal(err)
	}
	clean := Evaluate(house, cleanStereo(-23, -3))
	if clean.Verdict != Pass {
		t.Fatalf("clean file under the house spec: %s %+v", clean.Verdict, clean.Checks)
	}
	tests := []struct {
		check  string
		change func(m *measure.Measurement)
		reason string
	}{
		{"container", func(m *measure.Measurement) { m.Format = "mp3" }, "container mp3 is not accepted (accepted: wav, bw64)"},
		{"sample_rate", func(m *measure.Measurement) { m.SampleRateHz = 44100 }, "sample rate 44100 Hz is not accepted (accepted: 48000 Hz)"},
		{"bit_depth", func(m *measure.Measurement) { m.BitsPerSample = 16 }, "bit depth 16 bits is not accepted"},
		{"sample_format", func(m *measure.Measurement) { m.SampleFormat = "float" }, "sample format float is not accepted"},
		{"channel_layout", func(m *measure.Measurement) {
			m.Channels, m.ChannelLayout = 6, []string{"L", "R", "C", "LFE", "Ls", "Rs"}
		}, "channel layout L,R,C,LFE,Ls,Rs is not accepted (accepted: M | L,R) (assumed from the channel count"},
		{"duration", func(m *measure.Measurement) { m.DurationS = 4.95 }, "duration 4.95 s is shorter than the 5.0 s minimum"},
		{"leading_silence", func(m *measure.Measurement) { m.Signal.LeadingSilenceS = 1.05 }, "leading silence (below -60 dBFS) lasts 1.05 s, longer than the 1.0 s maximum"},
		{"trailing_silence", func(m *measure.Measurement) { m.Signal.TrailingSilenceS = 7.2 }, "trailing silence (below -60 dBFS) lasts 7.2 s, longer than the 3.0 s maximum"},
	}
	for _, tt := range tests {
		t.Run(tt.check, func(t *testing.T) {
			if c := mustCheck(t, clean, tt.check); c.Verdict != Pass {
				t.Errorf("clean file: %+v", c)
			}
			m := cleanStereo(-23, -3)
			tt.change(m)
			r := Evaluate(house, m)
			c := mustCheck(t, r, tt.check)
			if c.Verdict != Fail || !strings.Contains(c.Reason, tt.reason) {
				t.Errorf("got %s %q\nwant fail %q", c.Verdict, c.Reason, tt.reason)
			}
			if r.Verdict != Fail {
				t.Errorf("file verdict %s, want fail", r.Verdict)
			}
		})
	}
	// Exactly on the timing limits passes.
	m := cleanStereo(-23, -3)
	m.DurationS, m.Signal.LeadingSilenceS, m.Signal.TrailingSilenceS = 5.0, 1.0, 3.0
	r := Evaluate(house, m)
	for _, id := range []string{"duration", "leading_silence", "trailing_silence"} {
		if c := mustCheck(t, r, id); c.Verdict != Pass {
			t.Errorf("%s on its limit: %+v", id, c)
		}
	}
	// Built-in specs set no format or timing limits.
	r = Evaluate(mustLookup(t, "ebu-r128"), m)
	for _, id := range []string{"container", "sample_rate", "bit_depth", "sample_format", "channels", "channel_layout", "duration", "leading_silence", "trailing_silence"} {
		if _, ok := findCheck(r, id); ok {
			t.Errorf("ebu-r128 has a %s check", id)
		}
	}
}

// TestCheckOrder: checks come in CheckIDs order whatever applies.
func TestCheckOrder(t *testing.T) {
	house, err := LoadFile("testdata/house-spec.toml")
	if err != nil {
		t.Fatal(err)
	}
	m := cleanStereo(-23, -3)
	m.Bext = nil
	r := Evaluate(house, m)
	pos := map[string]int{}
	for i, id := range CheckIDs {
		pos[id] = i
	}
	last := -1
	for _, c := range r.Checks {
		p, ok := pos[c.ID]
		if !ok || p <= last {
			t.Fatalf("check %q out of order in %v", c.ID, r.Checks)
		}
		last = p
	}
	if len(r.Checks) < 15 {
		t.Errorf("house spec produced only %d checks", len(r.Checks))
	}
}
