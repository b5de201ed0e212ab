package htmlpage

import (
	"fmt"
	"math"
	"strconv"
	"strings"
)

// Undefined is what the report prints where a figure is not defined (a file
// shorter than one gating block, audio below the absolute gate, a silent
// channel); the file's notes say why.
const Undefined = "—"

// FormatLoudness prints a loudness figure (LUFS or LU) with one decimal, the
// rounding of kweigh's JSON output; nil prints Undefined.
func FormatLoudness(v *float64) string { return formatFixed(v, 1) }

// FormatPeak prints a peak level (dBTP or dBFS) with two decimals, the
// rounding of kweigh's JSON output; nil prints Undefined.
func FormatPeak(v *float64) string { return formatFixed(v, 2) }

// FormatGain prints a gain in dB with one decimal and an explicit sign
// ("+3.4", "-2.0"; zero as "0.0"), so a reader cannot mistake a boost for a
// cut; nil prints Undefined.
func FormatGain(v *float64) string {
	s := formatFixed(v, 1)
	if v != nil && s != Undefined && s != "0.0" && !strings.HasPrefix(s, "-") {
		s = "+" + s
	}
	return s
}

// formatFixed prints *v with decimals digits after the point. Negative zero
// and values that round to zero print without a sign; NaN and infinities
// (which a correct measurement never holds) print Undefined rather than a
// misleading number.
func formatFixed(v *float64, decimals int) string {
	if v == nil || math.IsNaN(*v) || math.IsInf(*v, 0) {
		return Undefined
	}
	s := strconv.FormatFloat(*v, 'f', decimals, 64)
	if strings.Trim(s, "-0.") == "" {
		s = strings.TrimPrefix(s, "-")
	}
	return s
}

// FormatMeasured prints a check's measured value with its unit, rounded
// as kweigh's text and JSON reports round it (see MeasuredDecimals);
// strings print as they are and nil prints Undefined.
func FormatMeasured(measured any, unit string) string {
	var s string
	switch m := measured.(type) {
	case nil:
		return Undefined
	case float64:
		s = formatFixed(&m, MeasuredDecimals(unit))
	case float32:
		f := float64(m)
		s = formatFixed(&f, MeasuredDecimals(unit))
	case int:
		s = strconv.Itoa(m)
	case int64:
		s = strconv.FormatInt(m, 10)
	case string:
		s = m
	default:
		s = fmt.Sprint(m)
	}
	if unit == "" || s == Undefined {
		return s
	}
	return s + " " + unit
}

// MeasuredDecimals is the number of decimals a figure in unit is printed
// with: one for loudness, gains and durations (LUFS, LKFS, LU, dB, s, %),
// two for peaks (dBTP, dBFS) and unitless ratios, none for counts (Hz,
// bits, channels, samples, kbps).
func MeasuredDecimals(unit string) int {
	switch unit {
	case "LUFS", "LKFS", "LU", "dB", "s", "%":
		return 1
	case "dBTP", "dBFS":
		return 2
	case "Hz", "bit", "bits", "channel", "channels", "samples", "kbps":
		return 0
	}
	return 2
}

// FormatClock prints a time offset in seconds as h:mm:ss, the form of the
// plots' time axis. Fractions of a second are dropped (rounded down);
// negative offsets print as 0:00:00.
func FormatClock(seconds float64) string {
	if !(seconds > 0) {
		seconds = 0
	}
	t := int64(seconds + 1e-9)
	return fmt.Sprintf("%d:%02d:%02d", t/3600, t/60%60, t%60)
}

// FormatDuration prints a length in seconds as h:mm:ss.s (tenths), for the
// file details.
func FormatDuration(seconds float64) string {
	if !(seconds > 0) {
		seconds = 0
	}
	tenths := int64(math.Round(seconds * 10))
	t := tenths / 10
	return fmt.Sprintf("%d:%02d:%02d.%d", t/3600, t/60%60, t%60, tenths%10)
}
