package rules

import "fmt"

// limitNum writes a spec value with one decimal, or two when it has
// hundredths (e.g. a house tolerance of 0.25 LU).
func limitNum(x float64) string {
	if hundredths(x)%10 != 0 {
		return signed(x, 2)
	}
	return signed(x, 1)
}

// magnitude writes an unsigned tolerance or margin.
func magnitude(x float64) string {
	if hundredths(x)%10 != 0 {
		return num(x, 2)
	}
	return num(x, 1)
}

// integratedLimit writes the integrated requirement for a file with the
// given channel count, e.g. "-23.0 LUFS ±1.0 LU" or "-20.0 to -16.0 LUFS".
func (s *Spec) integratedLimit(channels int) string {
	l := s.Loudness
	if t := s.targetFor(channels); t != nil {
		text := fmt.Sprintf("%s LUFS ±%s LU", limitNum(*t), magnitude(l.ToleranceLU))
		if channels == 1 && l.MonoTargetLUFS != nil {
			text += " (mono)"
		}
		return text
	}
	switch {
	case l.MinIntegratedLUFS != nil && l.MaxIntegratedLUFS != nil:
		return fmt.Sprintf("%s to %s LUFS", limitNum(*l.MinIntegratedLUFS), limitNum(*l.MaxIntegratedLUFS))
	case l.MinIntegratedLUFS != nil:
		return fmt.Sprintf("≥ %s LUFS", limitNum(*l.MinIntegratedLUFS))
	case l.MaxIntegratedLUFS != nil:
		return fmt.Sprintf("≤ %s LUFS", limitNum(*l.MaxIntegratedLUFS))
	}
	return ""
}

// checkIntegrated judges integrated loudness against the target and
// tolerance (the mono target for one-channel files) or the window.
func checkIntegrated(j *judge) (Check, bool) {
	s, m := j.spec, j.m
	lo, hi, _, ok := s.integratedWindow(m.Channels)
	if !ok {
		return Check{}, false
	}
	c := Check{ID: "integrated", Unit: "LUFS", Limit: s.integratedLimit(m.Channels)}
	if m.IntegratedLUFS == nil {
		c.Verdict = Fail
		c.Reason = "integrated loudness is undefined: nothing rose above the -70 LUFS absolute gate (silent or too short)"
		return c, true
	}
	v := *m.IntegratedLUFS
	if notFinite(&c, v, "integrated loudness") {
		return c, true
	}
	c.Measured = round2(v)
	margin := hundredths(s.Loudness.WarnMarginLU)
	if t := s.targetFor(m.Channels); t != nil {
		c.Verdict, c.Reason = judgeTarget(v, *t, s.Loudness.ToleranceLU, margin, m.Channels == 1 && s.Loudness.MonoTargetLUFS != nil)
		return c, true
	}
	c.Verdict, c.Reason = judgeWindow(v, lo, hi, margin)
	return c, true
}

// judgeTarget judges v against target ± tol with a near-edge warning margin
// (in hundredths).
func judgeTarget(v, target, tol float64, margin int64, mono bool) (Verdict, string) {
	what := fmt.Sprintf("the %s LUFS target", limitNum(target))
	if mono {
		what = fmt.Sprintf("the %s LUFS mono target", limitNum(target))
	}
	dev := hundredths(v) - hundredths(target)
	if dev == 0 {
		return Pass, fmt.Sprintf("integrated %s LUFS is on %s", num(v, 1), what)
	}
	side, absDev := "above", dev
	if dev < 0 {
		side, absDev = "below", -dev
	}
	d := float64(absDev) / 100
	tolQ := hundredths(tol)
	switch {
	case absDev > tolQ:
		return Fail, fmt.Sprintf("integrated %s LUFS is %s LU %s %s (tolerance ±%s LU)",
			near(v, target+signOf(dev)*tol), near(d, tol), side, what, magnitude(tol))
	case tolQ-absDev < margin:
		return Warn, fmt.Sprintf("integrated %s LUFS is %s LU %s %s: inside ±%s LU but within %s LU of the edge",
			near(v, target+signOf(dev)*tol), near(d, tol), side, what, magnitude(tol), magnitude(float64(margin)/100))
	}
	return Pass, fmt.Sprintf("integrated %s LUFS is %s LU %s %s, within ±%s LU",
		near(v, target+signOf(dev)*tol), near(d, tol), side, what, magnitude(tol))
}

func signOf(q int64) float64 {
	if q < 0 {
		return -1
	}
	return 1
}

// judgeWindow judges v against a window whose sides may be open, with a
// near-edge warning margin (in hundredths).
func judgeWindow(v float64, lo, hi *float64, margin int64) (Verdict, string) {
	q := hundredths(v)
	if hi != nil && q > hundredths(*hi) {
		d := float64(q-hundredths(*hi)) / 100
		return Fail, fmt.Sprintf("integrated %s LUFS is %s LU above the %s LUFS maximum", near(v, *hi), amount(d), limitNum(*hi))
	}
	if lo != nil && q < hundredths(*lo) {
		d := float64(hundredths(*lo)-q) / 100
		return Fail, fmt.Sprintf("integrated %s LUFS is %s LU below the %s LUFS minimum", near(v, *lo), amount(d), limitNum(*lo))
	}
	if hi != nil && hundredths(*hi)-q < margin {
		return Warn, fmt.Sprintf("integrated %s LUFS is inside the window but within %s LU of its %s LUFS maximum", near(v, *hi), magnitude(float64(margin)/100), limitNum(*hi))
	}
	if lo != nil && q-hundredths(*lo) < margin {
		return Warn, fmt.Sprintf("integrated %s LUFS is inside the window but within %s LU of its %s LUFS minimum", near(v, *lo), magnitude(float64(margin)/100), limitNum(*lo))
	}
	return Pass, fmt.Sprintf("integrated %s LUFS is inside the window", num(v, 1))
}

// checkTruePeak judges the maximum true peak against the ceiling.
func checkTruePeak(j *judge) (Check, bool) {
	return checkMaximum(j.spec.Loudness.MaxTruePeakDBTP, j.m.TruePeakDBTP, maximum{
		id: "true_peak", unit: "dBTP", diffUnit: "dB", what: "true peak", limitName: "ceiling",
		undefined: "there is no true peak: the file is digital silence",
	})
}

// checkMaxShortTerm judges the loudest 3 s window (EBU Tech 3341 S).
func checkMaxShortTerm(j *judge) (Check, bool) {
	return checkMaximum(j.spec.Loudness.MaxShortTermLUFS, j.m.MaxShortTermLUFS, maximum{
		id: "max_short_term", unit: "LUFS", diffUnit: "LU", what: "loudest 3 s window (short-term)",
		limitName: "maximum", undefined: "short-term loudness is undefined (file shorter than 3 s or silent)",
	})
}

// checkMaxMomentary judges the loudest 400 ms window (EBU Tech 3341 M).
func checkMaxMomentary(j *judge) (Check, bool) {
	return checkMaximum(j.spec.Loudness.MaxMomentaryLUFS, j.m.MaxMomentaryLUFS, maximum{
		id: "max_momentary", unit: "LUFS", diffUnit: "LU", what: "loudest 400 ms window (momentary)",
		limitName: "maximum", undefined: "momentary loudness is undefined (file shorter than 400 ms or silent)",
	})
}

// maximum describes a figure that must not exceed a limit.
type maximum struct {
	id, unit, diffUnit, what, limitName string
	undefined                           string // reason when the figure is undefined (a pass)
}

func checkMaximum(limit, value *float64, d maximum) (Check, bool) {
	if limit == nil {
		return Check{}, false
	}
	lim := *limit
	c := Check{ID: d.id, Unit: d.unit, Limit: fmt.Sprintf("≤ %s %s", limitNum(lim), d.unit)}
	if value == nil {
		c.Verdict, c.Reason = Pass, d.undefined
		return c, true
	}
	v := *value
	if notFinite(&c, v, d.what) {
		return c, true
	}
	c.Measured = round2(v)
	diff := float64(hundredths(v)-hundredths(lim)) / 100
	switch {
	case diff > 0:
		c.Verdict = Fail
		c.Reason = fmt.Sprintf("%s %s %s is %s %s above the %s %s %s", d.what, nearSigned(v, lim), d.unit,
			amount(diff), d.diffUnit, limitNum(lim), d.unit, d.limitName)
	case diff == 0:
		c.Verdict = Pass
		c.Reason = fmt.Sprintf("%s %s %s is at the %s %s %s", d.what, signed(v, 1), d.unit, limitNum(lim), d.unit, d.limitName)
	default:
		c.Verdict = Pass
		c.Reason = fmt.Sprintf("%s %s %s is %s %s below the %s %s %s", d.what, nearSigned(v, lim), d.unit,
			amount(-diff), d.diffUnit, limitNum(lim), d.unit, d.limitName)
	}
	return c, true
}

// checkLoudnessRange judges LRA (EBU Tech 3342) against its limits; an
// advisory LRA only warns.
func checkLoudnessRange(j *judge) (Check, bool) {
	l := j.spec.Loudness
	if l.MinLRALU == nil && l.MaxLRALU == nil {
		return Check{}, false
	}
	c := Check{ID: "loudness_range", Unit: "LU", Limit: rangeLimit(l.MinLRALU, l.MaxLRALU, "LU")}
	if l.LRAAdvisory {
		c.Limit += " (recommended)"
	}
	out := Fail
	if l.LRAAdvisory {
		out = Warn
	}
	if j.m.LoudnessRangeLU == nil {
		c.Verdict, c.Reason = Warn, "loudness range is undefined (too little gated short-term loudness to compute it)"
		return c, true
	}
	v := *j.m.LoudnessRangeLU
	if notFinite(&c, v, "loudness range") {
		return c, true
	}
	c.Measured = round2(v)
	c.Verdict, c.Reason = judgeRange(v, l.MinLRALU, l.MaxLRALU, out, rangeWords{
		what: "loudness range", unit: "LU", over: "wider", under: "narrower", limit: limitNum,
	})
	return c, true
}

// rangeWords says how judgeRange talks about one quantity.
type rangeWords struct {
	what, unit  string               // "duration", "s"
	over, under string               // "longer", "shorter"
	limit       func(float64) string // how the limit is written
}

// judgeRange judges v against a range whose sides may be open: out (Fail,
// or Warn for a recommendation) when v lies beyond a side, Pass otherwise,
// with the reason in words.
func judgeRange(v float64, lo, hi *float64, out Verdict, w rangeWords) (Verdict, string) {
	switch {
	case hi != nil && above(v, *hi):
		return out, fmt.Sprintf("%s %s %s is %s than the %s %s maximum", w.what, near(v, *hi), w.unit, w.over, w.limit(*hi), w.unit)
	case lo != nil && below(v, *lo):
		return out, fmt.Sprintf("%s %s %s is %s than the %s %s minimum", w.what, near(v, *lo), w.unit, w.under, w.limit(*lo), w.unit)
	}
	return Pass, fmt.Sprintf("%s %s %s is within %s", w.what, num(v, 1), w.unit, rangeLimit(lo, hi, w.unit))
}

// rangeLimit writes a range whose sides may be open, e.g. "4.0 to 15.0 LU",
// "≤ 15.0 LU", "≥ 4.0 LU".
func rangeLimit(lo, hi *float64, unit string) string {
	switch {
	case lo != nil && hi != nil:
		return fmt.Sprintf("%s to %s %s", magnitude(*lo), magnitude(*hi), unit)
	case lo != nil:
		return fmt.Sprintf("≥ %s %s", magnitude(*lo), unit)
	case hi != nil:
		return fmt.Sprintf("≤ %s %s", magnitude(*hi), unit)
	}
	return ""
}

// checkDownmixIntegrated judges the stereo fold-down of a surround file
// against the same integrated limit as the file (for specs that ask for it,
// e.g. ATSC A/85). Files without a fold-down (mono, stereo) skip it.
func checkDownmixIntegrated(j *judge) (Check, bool) {
	s, m := j.spec, j.m
	if !s.Loudness.CheckDownmix || m.StereoDownmix == nil {
		return Check{}, false
	}
	lo, hi, _, ok := s.integratedWindow(2)
	if !ok {
		return Check{}, false
	}
	c := Check{ID: "downmix_integrated", Unit: "LUFS", Limit: s.integratedLimit(2) + " (stereo fold-down)"}
	if m.StereoDownmix.IntegratedLUFS == nil {
		c.Verdict = Fail
		c.Reason = "the stereo fold-down has no integrated loudness: nothing rose above the -70 LUFS absolute gate"
		return c, true
	}
	v := *m.StereoDownmix.IntegratedLUFS
	if notFinite(&c, v, "the stereo fold-down's integrated loudness") {
		return c, true
	}
	c.Measured = round2(v)
	margin := hundredths(s.Loudness.WarnMarginLU)
	var reason string
	if t := s.targetFor(2); t != nil {
		c.Verdict, reason = judgeTarget(v, *t, s.Loudness.ToleranceLU, margin, false)
	} else {
		c.Verdict, reason = judgeWindow(v, lo, hi, margin)
	}
	c.Reason = "stereo fold-down: " + reason
	return c, true
}
