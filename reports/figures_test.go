package reports

import (
	"math"
	"testing"
	"time"
)

func TestFigures(t *testing.T) {
	cases := []struct {
		name, got, want string
	}{
		// Decimals from issue 2: one for loudness, two for peaks.
		{"loudness rounds to one decimal", loudness(num(-23.04)), "-23.0"},
		{"peak rounds to two decimals", peak(num(-1.835)), "-1.83"}, // -1.835 is stored just above, rounds down
		{"no negative zero", loudness(num(-0.04)), "0.0"},
		{"undefined", loudness(nil), "n/a"},
		{"-Inf is undefined", peak(num(math.Inf(-1))), "n/a"},
		{"gain shows its sign", gain(3.9), "+3.9"},
		{"negative gain", gain(-3.62), "-3.6"},
		{"zero gain has no sign", gain(-0.01), "0.0"},
		{"measured LUFS", measuredText(-19.62, "LUFS"), "-19.6 LUFS"},
		{"measured dBTP", measuredText(-0.375, "dBTP"), "-0.38 dBTP"},
		{"measured Hz", measuredText(44100.0, "Hz"), "44100 Hz"},
		{"measured string", measuredText("mp3", ""), "mp3"},
		{"measured nil", measuredText(nil, "LUFS"), "n/a"},
		{"duration under an hour", clockDuration(1694.352), "28:14.4"},
		{"duration over an hour", clockDuration(5969.86), "1:39:29.9"},
		{"duration rounding up a minute", clockDuration(59.96), "1:00.0"},
		{"duration zero", clockDuration(0), "0:00.0"},
		{"wall time", wallTime(4200 * time.Millisecond), "4.2 s"},
		{"long wall time", wallTime(90 * time.Second), "1:30.0"},
	}
	for _, c := range cases {
		if c.got != c.want {
			t.Errorf("%s: got %q, want %q", c.name, c.got, c.want)
		}
	}
}
