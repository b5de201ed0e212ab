package reports

import (
	"fmt"
	"math"
	"testing"
	"time"
)

func TestFigures(t *testing.T) {
	cases := []struct {
		name, got, want string
	}{
		// Decimals from issue 2: one for loudness, gains and durations, two
		// for peaks. The clock forms (m:ss.s, h:mm:ss) and "n/a" are
		// kweigh's own conventions (no published source).
		{"loudness rounds to one decimal", Loudness(num(-23.04)), "-23.0"},
		{"peak rounds to two decimals", Peak(num(-1.835)), "-1.83"}, // -1.835 is stored just above, rounds down
		{"no negative zero", Loudness(num(-0.04)), "0.0"},
		{"undefined", Loudness(nil), "n/a"},
		{"-Inf is undefined", Peak(num(math.Inf(-1))), "n/a"},
		{"NaN is undefined", Loudness(num(math.NaN())), "n/a"},
		{"fixed NaN is undefined", Fixed(math.NaN(), 1), "n/a"},
		{"gain shows its sign", Gain(3.9), "+3.9"},
		{"negative gain", Gain(-3.62), "-3.6"},
		{"zero gain has no sign", Gain(-0.01), "0.0"},
		{"NaN gain is undefined", Gain(math.NaN()), "n/a"},
		{"measured LUFS", Measured(-19.62, "LUFS"), "-19.6 LUFS"},
		{"measured dBTP", Measured(-0.375, "dBTP"), "-0.38 dBTP"},
		{"measured Hz", Measured(44100.0, "Hz"), "44100 Hz"},
		{"measured int", Measured(3, "runs"), "3 runs"},
		{"measured string", Measured("mp3", ""), "mp3"},
		{"measured nil", Measured(nil, "LUFS"), "n/a"},
		{"measured NaN", Measured(math.NaN(), "LU"), "n/a"},
		{"duration under an hour", Duration(1694.352), "28:14.4"},
		{"duration over an hour", Duration(5969.86), "1:39:29.9"},
		{"duration rounding up a minute", Duration(59.96), "1:00.0"},
		{"duration zero", Duration(0), "0:00.0"},
		{"negative duration", Duration(-1), "n/a"},
		{"clock", Clock(5969.86), "1:39:29"}, // whole seconds, rounded down
		{"clock under a minute", Clock(15), "0:00:15"},
		{"clock negative", Clock(-3), "0:00:00"},
		{"wall time", WallTime(4200 * time.Millisecond), "4.2 s"},
		{"long wall time", WallTime(90 * time.Second), "1:30.0"},
	}
	for _, c := range cases {
		if c.got != c.want {
			t.Errorf("%s: got %q, want %q", c.name, c.got, c.want)
		}
	}
}

func TestUnitDecimals(t *testing.T) {
	// Decimals from issue 2 (loudness one, peaks two); counts have none.
	for unit, want := range map[string]int{"LUFS": 1, "LKFS": 1, "LU": 1, "dB": 1, "s": 1, "dBTP": 2, "dBFS": 2, "Hz": 0, "bits": 0, "samples": 0, "kbps": 0, "": 2} {
		if got := UnitDecimals(unit); got != want {
			t.Errorf("UnitDecimals(%q) = %d, want %d", unit, got, want)
		}
	}
}

// The text and HTML reports print figures through these functions.
func ExampleLoudness() {
	integrated, truePeak := -23.04, -0.996
	fmt.Println(Loudness(&integrated), Peak(&truePeak), Gain(2.35), Loudness(nil), Clock(4530.7))
	// Output: -23.0 -1.00 +2.4 n/a 1:15:30
}
