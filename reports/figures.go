package reports

import (
	"fmt"
	"math"
	"strconv"
	"strings"
	"time"
)

// notAvailable is what the text formats print for a figure the standard
// leaves undefined; a note in the record says why.
const notAvailable = "n/a"

// fixed formats x with the given number of decimals, never as "-0.0".
func fixed(x float64, decimals int) string {
	s := strconv.FormatFloat(x, 'f', decimals, 64)
	if strings.HasPrefix(s, "-") && strings.Trim(s, "-0.") == "" {
		return s[1:]
	}
	return s
}

// defined reports whether p holds a finite number.
func defined(p *float64) bool {
	return p != nil && !math.IsNaN(*p) && !math.IsInf(*p, 0)
}

// loudness formats a loudness figure (LUFS, LU): one decimal.
func loudness(p *float64) string {
	if !defined(p) {
		return notAvailable
	}
	return fixed(*p, 1)
}

// peak formats a peak figure (dBTP, dBFS): two decimals.
func peak(p *float64) string {
	if !defined(p) {
		return notAvailable
	}
	return fixed(*p, 2)
}

// gain formats a gain in dB with its sign: one decimal, like loudness.
func gain(db float64) string {
	s := fixed(db, 1)
	if !strings.HasPrefix(s, "-") && s != "0.0" {
		s = "+" + s
	}
	return s
}

// decimalsForUnit returns how many decimals a figure in unit gets in text:
// one for loudness and durations, two for peaks and unitless ratios, none
// for counts.
func decimalsForUnit(unit string) int {
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

// measuredText formats a check's measured value (number, string or nil)
// with its unit.
func measuredText(v any, unit string) string {
	var s string
	switch x := v.(type) {
	case nil:
		return notAvailable
	case float64:
		if math.IsNaN(x) || math.IsInf(x, 0) {
			return notAvailable
		}
		s = fixed(x, decimalsForUnit(unit))
	case float32:
		return measuredText(float64(x), unit)
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

// clockDuration formats seconds as h:mm:ss.s, or m:ss.s under an hour.
func clockDuration(seconds float64) string {
	if math.IsNaN(seconds) || math.IsInf(seconds, 0) || seconds < 0 {
		return notAvailable
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

// wallTime prints a run's wall time: seconds to a tenth under a minute,
// clock form above.
func wallTime(d time.Duration) string {
	if d < time.Minute {
		return fmt.Sprintf("%.1f s", d.Seconds())
	}
	return clockDuration(d.Seconds())
}
