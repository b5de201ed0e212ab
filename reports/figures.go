package reports

import (
	"fmt"
	"math"
	"strconv"
	"strings"
	"time"
)

// The figure formatting below is shared by every human-readable report: the
// text writers here and the HTML page (package reports/htmlpage) call these
// functions, so the two can never print the same figure differently. The
// decimals follow issue 2: one for loudness and durations, two for peaks;
// gains and limiter figures are package rules' own, exact to 0.01 dB
// (issue 9: the figure beside a reason is the one the reason implies).

// NotAvailable is what every human-readable report prints for a figure the
// standard leaves undefined (a file shorter than one gating block, audio
// below the absolute gate, a silent channel); a note in the record says why.
const NotAvailable = "n/a"

// Fixed formats x with the given number of decimals, never as "-0.0";
// NaN and infinities print NotAvailable.
func Fixed(x float64, decimals int) string {
	if math.IsNaN(x) || math.IsInf(x, 0) {
		return NotAvailable
	}
	s := strconv.FormatFloat(x, 'f', decimals, 64)
	if strings.HasPrefix(s, "-") && strings.Trim(s, "-0.") == "" {
		return s[1:]
	}
	return s
}

// Defined reports whether p holds a finite number.
func Defined(p *float64) bool {
	return p != nil && !math.IsNaN(*p) && !math.IsInf(*p, 0)
}

// Loudness formats a loudness figure (LUFS, LU) with one decimal; nil or a
// non-finite value prints NotAvailable.
func Loudness(p *float64) string {
	if !Defined(p) {
		return NotAvailable
	}
	return Fixed(*p, 1)
}

// Peak formats a peak figure (dBTP, dBFS) with two decimals; nil or a
// non-finite value prints NotAvailable.
func Peak(p *float64) string {
	if !Defined(p) {
		return NotAvailable
	}
	return Fixed(*p, 2)
}

// Adjustment formats a gain or a peak reduction in dB as package rules
// works it out, to 0.01 dB: one decimal when the hundredths digit is 0
// ("-2.6"), two otherwise ("1.23"), so the figure is the one the advice
// beside it states.
func Adjustment(db float64) string {
	if s := Fixed(db, 2); s != NotAvailable && !strings.HasSuffix(s, "0") {
		return s
	}
	return Fixed(db, 1)
}

// Gain formats a gain in dB like Adjustment with an explicit sign ("+3.4",
// "-2.0", "-0.04"; zero as "0.0"), so a boost cannot be read as a cut.
func Gain(db float64) string {
	s := Adjustment(db)
	if s != NotAvailable && !strings.HasPrefix(s, "-") && strings.Trim(s, "0.") != "" {
		s = "+" + s
	}
	return s
}

// UnitDecimals returns how many decimals a figure in unit is printed with:
// one for loudness, gains and durations (LUFS, LKFS, LU, dB, s, %), two for
// peaks (dBTP, dBFS) and unitless ratios, none for counts (Hz, bits,
// channels, samples, runs, kbps).
func UnitDecimals(unit string) int {
	switch unit {
	case "LUFS", "LKFS", "LU", "dB", "s", "%":
		return 1
	case "dBTP", "dBFS":
		return 2
	case "Hz", "bit", "bits", "channel", "channels", "sample", "samples", "run", "runs", "kbps":
		return 0
	}
	return 2
}

// Measured formats a check's measured value (number, string or nil) with
// its unit, numbers rounded to UnitDecimals(unit). nil and non-finite
// numbers print NotAvailable without a unit.
func Measured(v any, unit string) string {
	var s string
	switch x := v.(type) {
	case nil:
		return NotAvailable
	case float64:
		if math.IsNaN(x) || math.IsInf(x, 0) {
			return NotAvailable
		}
		s = Fixed(x, UnitDecimals(unit))
	case float32:
		return Measured(float64(x), unit)
	case string:
		s = x
	default:
		s = fmt.Sprint(x)
	}
	if unit != "" {
		s += " " + unit
	}
	return s
}

// Duration formats a length in seconds as h:mm:ss.s, or m:ss.s under an
// hour; a negative or non-finite length prints NotAvailable.
func Duration(seconds float64) string {
	if math.IsNaN(seconds) || math.IsInf(seconds, 0) || seconds < 0 {
		return NotAvailable
	}
	tenths := int64(math.Round(seconds * 10))
	h := tenths / 36000
	m := tenths / 600 % 60
	s := float64(tenths%600) / 10
	if h > 0 {
		return fmt.Sprintf("%d:%02d:%04.1f", h, m, s)
	}
	return fmt.Sprintf("%d:%04.1f", m, s)
}

// Clock formats a time offset in seconds as h:mm:ss, whole seconds rounded
// down: the form of time-axis labels and of the moments a report points
// to. Negative and non-finite offsets print as 0:00:00.
func Clock(seconds float64) string {
	if !(seconds > 0) || math.IsInf(seconds, 0) {
		seconds = 0
	}
	t := int64(seconds + 1e-9)
	return fmt.Sprintf("%d:%02d:%02d", t/3600, t/60%60, t%60)
}

// WallTime prints a run's wall time: seconds to a tenth under a minute,
// Duration's clock form above.
func WallTime(d time.Duration) string {
	if d < time.Minute {
		return fmt.Sprintf("%.1f s", d.Seconds())
	}
	return Duration(d.Seconds())
}
