package reports

import (
	"fmt"
	"math"
	"strings"
	"testing"
	"time"

	"github.com/kweigh/kweigh/measure"
	"github.com/kweigh/kweigh/rules"
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
		// Gains and limiter figures are rules' own to 0.01 dB: one decimal
		// unless the hundredths digit is set (issue 9).
		{"negative gain", Gain(-3.6), "-3.6"},
		{"gain to 0.01 dB", Gain(-3.62), "-3.62"},
		{"small gain keeps its sign", Gain(-0.04), "-0.04"},
		{"zero gain has no sign", Gain(-0.001), "0.0"},
		{"limiter figure", Adjustment(1.23), "1.23"},
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
	fmt.Println(Loudness(&integrated), Peak(&truePeak), Gain(2.4), Gain(-1.23), Loudness(nil), Clock(4530.7))
	// Output: -23.0 -1.00 +2.4 -1.23 n/a 1:15:30
}

// TestFiguresMatchReasons: the figures line of a report and the reasons
// of package rules print the same integrated loudness and true peak for
// the same measurement (issue 9: one number in every sentence). The sweep
// crosses many x.xx5 values, where rounding straight to one decimal and
// rounding through hundredths differ.
func TestFiguresMatchReasons(t *testing.T) {
	spec, err := rules.Lookup("ebu-r128")
	if err != nil {
		t.Fatal(err)
	}
	for i := 0; i < 4000; i++ {
		v := -40 + float64(i)*0.0025
		tp := v + 20 + float64(i)*0.00001
		m := &measure.Measurement{Path: "x.wav", Channels: 2, IntegratedLUFS: &v, TruePeakDBTP: &tp, Notes: []string{}}
		r := rules.Evaluate(spec, m)
		for _, c := range r.Checks {
			var figure string
			switch c.ID {
			case "integrated":
				figure = "integrated " + Loudness(&v) + " LUFS"
			case "true_peak":
				figure = Peak(&tp)
				if !strings.HasPrefix(figure, "-") && figure != "0.00" {
					figure = "+" + figure
				}
				figure = "true peak " + figure + " dBTP"
			default:
				continue
			}
			// Where the reason prints two decimals near an edge, the
			// figures line still prints one: compare what both print.
			if !strings.HasPrefix(c.Reason, figure+" ") && !(c.ID == "integrated" && twoDecimals(c.Reason)) {
				t.Fatalf("v %.4f, TP %.5f: figures say %q, reason %q", v, tp, figure, c.Reason)
			}
		}
	}
}

// twoDecimals reports whether a reason's first figure has two decimals
// (the near-edge form).
func twoDecimals(reason string) bool {
	for _, f := range strings.Fields(reason) {
		if i := strings.IndexByte(f, '.'); i >= 0 && strings.ContainsAny(f[:i], "0123456789") {
			return len(f)-i-1 == 2
		}
	}
	return false
}
