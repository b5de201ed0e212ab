package rules

import (
	"fmt"
	"math"
	"slices"
	"strings"

	"github.com/kweigh/kweigh/decode"
)

// valueKind is the TOML type a spec key takes.
type valueKind int

const (
	kindNumber valueKind = iota // float or integer
	kindInt                     // integer (a float with no fraction is accepted)
	kindBool
	kindString
	kindIntList
	kindStringList
)

func (k valueKind) String() string {
	return [...]string{"a number", "a whole number", "true or false", "a string", "a list of whole numbers", "a list of strings"}[k]
}

// specKey is one key a user spec may set: its TOML type, the check whose
// limit it sets (for LimitSources) and how it is validated and applied.
// apply returns a problem in words, or "".
type specKey struct {
	name  string
	kind  valueKind
	check string
	apply func(s *Spec, v any) string
}

// knownBitRateModes are the values of measure.Measurement.BitRateMode.
var knownBitRateModes = []string{"cbr", "vbr", "abr"}

// Known containers: the names measure.Measurement.Format uses.
var knownContainers = []string{"wav", "rf64", "bw64", "flac", "mp3", "aiff", "aifc"}

// specTables lists every table of a user spec and its keys. The top-level
// keys name, title, description, source and extends are handled by Parse.
var specTables = map[string][]specKey{
	"loudness": {
		number("target_lufs", "integrated", inRange(-70, 0, "LUFS"), func(s *Spec, v float64) { s.Loudness.TargetLUFS = &v }),
		number("tolerance_lu", "integrated", inRange(0, 20, "LU"), func(s *Spec, v float64) { s.Loudness.ToleranceLU = v }),
		number("mono_target_lufs", "integrated", inRange(-70, 0, "LUFS"), func(s *Spec, v float64) { s.Loudness.MonoTargetLUFS = &v }),
		number("min_integrated_lufs", "integrated", inRange(-70, 0, "LUFS"), func(s *Spec, v float64) { s.Loudness.MinIntegratedLUFS = &v }),
		number("max_integrated_lufs", "integrated", inRange(-70, 0, "LUFS"), func(s *Spec, v float64) { s.Loudness.MaxIntegratedLUFS = &v }),
		number("warn_margin_lu", "warn_margin", inRange(0, 20, "LU"), func(s *Spec, v float64) { s.Loudness.WarnMarginLU = v }),
		number("max_true_peak_dbtp", "true_peak", inRange(-70, 6, "dBTP"), func(s *Spec, v float64) { s.Loudness.MaxTruePeakDBTP = &v }),
		number("max_short_term_lufs", "max_short_term", inRange(-70, 0, "LUFS"), func(s *Spec, v float64) { s.Loudness.MaxShortTermLUFS = &v }),
		number("max_momentary_lufs", "max_momentary", inRange(-70, 0, "LUFS"), func(s *Spec, v float64) { s.Loudness.MaxMomentaryLUFS = &v }),
		number("min_lra_lu", "loudness_range", inRange(0, 60, "LU"), func(s *Spec, v float64) { s.Loudness.MinLRALU = &v }),
		number("max_lra_lu", "loudness_range", inRange(0, 60, "LU"), func(s *Spec, v float64) { s.Loudness.MaxLRALU = &v }),
		boolean("lra_advisory", "loudness_range", func(s *Spec, v bool) { s.Loudness.LRAAdvisory = v }),
		boolean("check_downmix", "downmix_integrated", func(s *Spec, v bool) { s.Loudness.CheckDownmix = v }),
	},
	"format": {
		stringList("containers", "container", oneOf(knownContainers), func(s *Spec, v []string) { s.Format.Containers = v }),
		intList("sample_rates_hz", "sample_rate", 1000, 768000, func(s *Spec, v []int) { s.Format.SampleRatesHz = v }),
		intList("bit_depths", "bit_depth", 1, 64, func(s *Spec, v []int) { s.Format.BitDepths = v }),
		stringList("sample_formats", "sample_format", oneOf([]string{string(decode.Int), string(decode.Float)}), func(s *Spec, v []string) { s.Format.SampleFormats = v }),
		intList("channels", "channels", 1, 64, func(s *Spec, v []int) { s.Format.Channels = v }),
		{name: "layouts", kind: kindStringList, check: "channel_layout", apply: applyLayouts},
		number("min_bit_rate_kbps", "bit_rate", inRange(8, 640, "kbps"), func(s *Spec, v float64) { s.Format.MinBitRateKbps = &v }),
		number("max_bit_rate_kbps", "bit_rate", inRange(8, 640, "kbps"), func(s *Spec, v float64) { s.Format.MaxBitRateKbps = &v }),
		stringList("bit_rate_modes", "bit_rate_mode", oneOf(knownBitRateModes), func(s *Spec, v []string) { s.Format.BitRateModes = v }),
	},
	"timing": {
		number("min_duration_s", "duration", inRange(0, math.Inf(1), "s"), func(s *Spec, v float64) { s.Timing.MinDurationS = &v }),
		number("max_duration_s", "duration", inRange(0, math.Inf(1), "s"), func(s *Spec, v float64) { s.Timing.MaxDurationS = &v }),
		number("max_leading_silence_s", "leading_silence", inRange(0, math.Inf(1), "s"), func(s *Spec, v float64) { s.Timing.MaxLeadingSilenceS = &v }),
		number("max_trailing_silence_s", "trailing_silence", inRange(0, math.Inf(1), "s"), func(s *Spec, v float64) { s.Timing.MaxTrailingSilenceS = &v }),
	},
	"signal": {
		{name: "max_clip_runs", kind: kindInt, check: "clipping", apply: func(s *Spec, v any) string {
			n := v.(int64)
			if n < 0 {
				return fmt.Sprintf("must be 0 or more, got %d", n)
			}
			s.Signal.MaxClipRuns = &n
			return ""
		}},
		number("max_dc_offset_dbfs", "dc_offset", inRange(-200, 0, "dBFS"), func(s *Spec, v float64) { s.Signal.MaxDCOffsetDBFS = &v }),
		number("min_correlation", "phase", inRange(-1, 1, ""), func(s *Spec, v float64) { s.Signal.MinCorrelation = &v }),
		number("min_window_correlation", "phase_window", inRange(-1, 1, ""), func(s *Spec, v float64) { s.Signal.MinWindowCorrelation = &v }),
		policy("dual_mono", "dual_mono", func(s *Spec, p Policy) { s.Signal.DualMono = p }),
		policy("silent_channels", "silent_channels", func(s *Spec, p Policy) { s.Signal.SilentChannels = p }),
	},
	"bext": {
		boolean("required", "bext_loudness", func(s *Spec, v bool) { s.Bext.Required = v }),
		number("loudness_tolerance_lu", "bext_loudness", inRange(0, 20, "LU"), func(s *Spec, v float64) { s.Bext.LoudnessToleranceLU = v }),
		number("true_peak_tolerance_db", "bext_loudness", inRange(0, 20, "dB"), func(s *Spec, v float64) { s.Bext.TruePeakToleranceDB = v }),
		number("lra_tolerance_lu", "bext_loudness", inRange(0, 20, "LU"), func(s *Spec, v float64) { s.Bext.LRAToleranceLU = v }),
		policy("mismatch", "bext_loudness", func(s *Spec, p Policy) { s.Bext.Mismatch = p }),
	},
}

// specTableOrder is the order tables are listed in messages and docs.
var specTableOrder = []string{"loudness", "format", "timing", "signal", "bext"}

func number(name, check string, valid func(float64) string, set func(*Spec, float64)) specKey {
	return specKey{name: name, kind: kindNumber, check: check, apply: func(s *Spec, v any) string {
		f := v.(float64)
		if p := valid(f); p != "" {
			return p
		}
		set(s, f)
		return ""
	}}
}

func boolean(name, check string, set func(*Spec, bool)) specKey {
	return specKey{name: name, kind: kindBool, check: check, apply: func(s *Spec, v any) string {
		set(s, v.(bool))
		return ""
	}}
}

func intList(name, check string, lo, hi int, set func(*Spec, []int)) specKey {
	return specKey{name: name, kind: kindIntList, check: check, apply: func(s *Spec, v any) string {
		list := v.([]int)
		for _, n := range list {
			if n < lo || n > hi {
				return fmt.Sprintf("%d is out of range (%d to %d)", n, lo, hi)
			}
		}
		set(s, list)
		return ""
	}}
}

func stringList(name, check string, valid func(string) string, set func(*Spec, []string)) specKey {
	return specKey{name: name, kind: kindStringList, check: check, apply: func(s *Spec, v any) string {
		list := v.([]string)
		for _, x := range list {
			if p := valid(x); p != "" {
				return p
			}
		}
		set(s, list)
		return ""
	}}
}

func policy(name, check string, set func(*Spec, Policy)) specKey {
	return specKey{name: name, kind: kindString, check: check, apply: func(s *Spec, v any) string {
		p := Policy(v.(string))
		if p != PolicyFail && p != PolicyWarn && p != PolicyAllow {
			return fmt.Sprintf("must be \"fail\", \"warn\" or \"allow\", got %q", p)
		}
		set(s, p)
		return ""
	}}
}

// inRange accepts finite values from lo to hi, with a hint for loudness
// levels written without their minus sign.
func inRange(lo, hi float64, unit string) func(float64) string {
	return func(v float64) string {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return fmt.Sprintf("must be a finite number, got %v", v)
		}
		if v >= lo && v <= hi {
			return ""
		}
		u := ""
		if unit != "" {
			u = " " + unit
		}
		var p string
		if math.IsInf(hi, 1) {
			p = fmt.Sprintf("must be %s%s or more, got %s", num(lo, 0), u, fmtValue(v))
		} else {
			p = fmt.Sprintf("must be between %s and %s%s, got %s", num(lo, 0), num(hi, 0), u, fmtValue(v))
		}
		if hi <= 0 && v > 0 && -v >= lo {
			p += " (missing minus sign?)"
		}
		return p
	}
}

func fmtValue(v float64) string {
	return strings.TrimSuffix(strings.TrimRight(fmt.Sprintf("%.4f", v), "0"), ".")
}

func oneOf(allowed []string) func(string) string {
	return func(x string) string {
		if slices.Contains(allowed, x) {
			return ""
		}
		return fmt.Sprintf("unknown value %q (known: %s)", x, strings.Join(allowed, ", "))
	}
}

// applyLayouts reads layouts given as presets ("stereo", "5.1") or label
// lists ("L,R,C,LFE,Ls,Rs"), with package decode's vocabulary.
func applyLayouts(s *Spec, v any) string {
	var layouts [][]string
	for _, text := range v.([]string) {
		l, err := decode.ParseLayout(text)
		if err != nil {
			return err.Error()
		}
		layouts = append(layouts, l)
	}
	s.Format.Layouts = layouts
	return ""
}

// convert checks a decoded TOML value against kind and returns it as float64,
// int64, bool, string, []int or []string.
func convert(raw any, kind valueKind) (any, string) {
	bad := func() (any, string) {
		return nil, fmt.Sprintf("must be %s, got %s", kind, describeValue(raw))
	}
	switch kind {
	case kindNumber:
		switch x := raw.(type) {
		case float64:
			return x, ""
		case int64:
			return float64(x), ""
		}
	case kindInt:
		if n, ok := wholeNumber(raw); ok {
			return n, ""
		}
	case kindBool:
		if b, ok := raw.(bool); ok {
			return b, ""
		}
	case kindString:
		if s, ok := raw.(string); ok {
			return s, ""
		}
	case kindIntList:
		list, ok := raw.([]any)
		if !ok {
			return bad()
		}
		out := make([]int, 0, len(list))
		for _, e := range list {
			n, ok := wholeNumber(e)
			if !ok || n != int64(int(n)) {
				return nil, fmt.Sprintf("must be %s, but it contains %s", kind, describeValue(e))
			}
			out = append(out, int(n))
		}
		return out, ""
	case kindStringList:
		list, ok := raw.([]any)
		if !ok {
			return bad()
		}
		out := make([]string, 0, len(list))
		for _, e := range list {
			s, ok := e.(string)
			if !ok {
				return nil, fmt.Sprintf("must be %s, but it contains %s", kind, describeValue(e))
			}
			out = append(out, s)
		}
		return out, ""
	}
	return bad()
}

// wholeNumber accepts an integer, or a float with no fractional part.
func wholeNumber(raw any) (int64, bool) {
	switch x := raw.(type) {
	case int64:
		return x, true
	case float64:
		if x == math.Trunc(x) && math.Abs(x) < 1<<53 {
			return int64(x), true
		}
	}
	return 0, false
}

// describeValue names a decoded TOML value for error messages.
func describeValue(raw any) string {
	switch x := raw.(type) {
	case string:
		hint := ""
		var f float64
		if _, err := fmt.Sscan(x, &f); err == nil {
			hint = " (write numbers without quotes)"
		}
		return fmt.Sprintf("the string %q%s", x, hint)
	case int64, float64:
		return fmt.Sprintf("the number %v", x)
	case bool:
		return fmt.Sprintf("%v", x)
	case []any, []map[string]any:
		return "a list"
	case map[string]any:
		return "a table"
	}
	return fmt.Sprintf("a %T value", raw)
}
