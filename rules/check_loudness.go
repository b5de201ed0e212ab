package rules

import (
	"fmt"
	"strings"
)

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
// given channel count, e.g. "-23.0 LUFS ±1.0 LU" or "-20.0 to -16.0 LUFS",
// in the spec's loudness unit.
func (s *Spec) integratedLimit(channels int) string {
	l, u := s.Loudness, s.Unit()
	if t := s.targetFor(channels); t != nil {
		text := fmt.Sprintf("%s %s ±%s LU", limitNum(*t), u, magnitude(l.ToleranceLU))
		if channels == 1 && l.MonoTargetLUFS != nil {
			text += " (mono)"
		}
		return text
	}
	switch {
	case l.MinIntegratedLUFS != nil && l.MaxIntegratedLUFS != nil:
		return fmt.Sprintf("%s to %s %s", limitNum(*l.MinIntegratedLUFS), limitNum(*l.MaxIntegratedLUFS), u)
	case l.MinIntegratedLUFS != nil:
		return fmt.Sprintf("≥ %s %s", limitNum(*l.MinIntegratedLUFS), u)
	case l.MaxIntegratedLUFS != nil:
		return fmt.Sprintf("≤ %s %s", limitNum(*l.MaxIntegratedLUFS), u)
	}
	return ""
}

// integratedShown is an integrated loudness v as the integrated check's
// reason prints it for a file with the given channel count: the text and
// the number that text means. The gain advice starts from the same number,
// so the deviation a reason states and the gain beside it always agree.
// One decimal is used, or two within 0.1 LU of the edge that decides the
// verdict (so that the printed figure never seems to sit on the wrong side
// of it) and when one decimal would print the target itself for a value
// that is not on it.
func (s *Spec) integratedShown(v float64, channels int) (float64, string) {
	lo, hi, _, _ := s.integratedWindow(channels)
	if t := s.targetFor(channels); t != nil {
		dev := hundredths(v) - hundredths(*t)
		if dev == 0 {
			return shown(v, *t)
		}
		x, text := shown(v, *t+signOf(dev)*s.Loudness.ToleranceLU)
		if hundredths(x) == hundredths(*t) {
			return round2(v), num(v, 2)
		}
		return x, text
	}
	edge := v
	switch {
	case hi != nil && lo != nil:
		edge = *lo
		if hundredths(v)*2 > hundredths(*lo)+hundredths(*hi) {
			edge = *hi
		}
	case hi != nil:
		edge = *hi
	case lo != nil:
		edge = *lo
	}
	return shown(v, edge)
}

// checkIntegrated judges integrated loudness against the target and
// tolerance (the mono target for one-channel files) or the window.
func checkIntegrated(j *judge) (Check, bool) {
	s, m := j.spec, j.m
	if _, _, _, ok := s.integratedWindow(m.Channels); !ok {
		return Check{}, false
	}
	c := Check{ID: "integrated", Unit: s.Unit(), Limit: s.integratedLimit(m.Channels)}
	if m.IntegratedLUFS == nil {
		c.Verdict = Fail
		c.Reason = fmt.Sprintf("integrated loudness is undefined: nothing rose above the -70 %s absolute gate (silent or too short)", s.Unit())
		return c, true
	}
	if notFinite(&c, *m.IntegratedLUFS, "integrated loudness") {
		return c, true
	}
	c.Measured = *m.IntegratedLUFS
	c.Verdict, c.Reason = s.judgeIntegrated(*m.IntegratedLUFS, m.Channels, m.Channels == 1 && s.Loudness.MonoTargetLUFS != nil)
	return c, true
}

// judgeIntegrated judges an integrated loudness v against the requirement
// for a file with the given channel count and says why in words.
func (s *Spec) judgeIntegrated(v float64, channels int, mono bool) (Verdict, string) {
	lo, hi, _, _ := s.integratedWindow(channels)
	margin := hundredths(s.Loudness.WarnMarginLU)
	vs, text := s.integratedShown(v, channels)
	if t := s.targetFor(channels); t != nil {
		return judgeTarget(v, vs, text, *t, s.Loudness.ToleranceLU, margin, mono, s.Unit())
	}
	return judgeWindow(v, vs, text, lo, hi, margin, s.Unit())
}

// judgeTarget judges v against target ± tol with a near-edge warning margin
// (in hundredths). The verdict is taken on v at 0.01; the words use vs and
// its text (integratedShown), and the deviation they state is vs − target.
func judgeTarget(v, vs float64, text string, target, tol float64, margin int64, mono bool, unit string) (Verdict, string) {
	what := fmt.Sprintf("the %s %s target", limitNum(target), unit)
	if mono {
		what = fmt.Sprintf("the %s %s mono target", limitNum(target), unit)
	}
	dev := hundredths(v) - hundredths(target)
	if dev == 0 {
		return Pass, fmt.Sprintf("integrated %s %s is on %s", text, unit, what)
	}
	side, absDev := "above", dev
	if dev < 0 {
		side, absDev = "below", -dev
	}
	d := exact(abs(vs - target))
	tolQ := hundredths(tol)
	switch {
	case absDev > tolQ:
		return Fail, fmt.Sprintf("integrated %s %s is %s LU %s %s (tolerance ±%s LU)",
			text, unit, d, side, what, magnitude(tol))
	case tolQ-absDev < margin:
		return Warn, fmt.Sprintf("integrated %s %s is %s LU %s %s: inside ±%s LU but within %s LU of the edge",
			text, unit, d, side, what, magnitude(tol), magnitude(float64(margin)/100))
	}
	return Pass, fmt.Sprintf("integrated %s %s is %s LU %s %s, within ±%s LU",
		text, unit, d, side, what, magnitude(tol))
}

func signOf(q int64) float64 {
	if q < 0 {
		return -1
	}
	return 1
}

// judgeWindow judges v against a window whose sides may be open, with a
// near-edge warning margin (in hundredths); the words use vs and its text
// as judgeTarget does.
func judgeWindow(v, vs float64, text string, lo, hi *float64, margin int64, unit string) (Verdict, string) {
	q := hundredths(v)
	if hi != nil && q > hundredths(*hi) {
		return Fail, fmt.Sprintf("integrated %s %s is %s LU above the %s %s maximum", text, unit, exact(vs-*hi), limitNum(*hi), unit)
	}
	if lo != nil && q < hundredths(*lo) {
		return Fail, fmt.Sprintf("integrated %s %s is %s LU below the %s %s minimum", text, unit, exact(*lo-vs), limitNum(*lo), unit)
	}
	if hi != nil && hundredths(*hi)-q < margin {
		return Warn, fmt.Sprintf("integrated %s %s is inside the window but within %s LU of its %s %s maximum", text, unit, magnitude(float64(margin)/100), limitNum(*hi), unit)
	}
	if lo != nil && q-hundredths(*lo) < margin {
		return Warn, fmt.Sprintf("integrated %s %s is inside the window but within %s LU of its %s %s minimum", text, unit, magnitude(float64(margin)/100), limitNum(*lo), unit)
	}
	return Pass, fmt.Sprintf("integrated %s %s is inside the window", text, unit)
}

// checkTruePeak judges the maximum true peak against the ceiling.
func checkTruePeak(j *judge) (Check, bool) {
	return checkMaximum(j.spec.Loudness.MaxTruePeakDBTP, j.m.TruePeakDBTP, truePeakWords("true peak", "there is no true peak: the file is digital silence"))
}

// truePeakWords describes a true peak for checkMaximum; what names it.
func truePeakWords(what, undefined string) maximum {
	return maximum{id: "true_peak", unit: "dBTP", diffUnit: "dB", what: what, limitName: "ceiling", undefined: undefined, peak: true}
}

// checkMaxShortTerm judges the loudest 3 s window (EBU Tech 3341 S).
func checkMaxShortTerm(j *judge) (Check, bool) {
	u := j.spec.Unit()
	return checkMaximum(j.spec.Loudness.MaxShortTermLUFS, j.m.MaxShortTermLUFS, maximum{
		id: "max_short_term", unit: u, diffUnit: "LU", what: "loudest 3 s window (short-term)",
		limitName: "maximum", undefined: "short-term loudness is undefined (file shorter than 3 s or silent)",
	})
}

// checkMaxMomentary judges the loudest 400 ms window (EBU Tech 3341 M).
func checkMaxMomentary(j *judge) (Check, bool) {
	u := j.spec.Unit()
	return checkMaximum(j.spec.Loudness.MaxMomentaryLUFS, j.m.MaxMomentaryLUFS, maximum{
		id: "max_momentary", unit: u, diffUnit: "LU", what: "loudest 400 ms window (momentary)",
		limitName: "maximum", undefined: "momentary loudness is undefined (file shorter than 400 ms or silent)",
	})
}

// maximum describes a figure that must not exceed a limit.
type maximum struct {
	id, unit, diffUnit, what, limitName string
	undefined                           string // reason when the figure is undefined (a pass)
	// peak makes the figure print with two decimals, as every report
	// prints peaks; other figures print as maximumShown says.
	peak bool
}

// maximumShown is a value judged against a maximum as the reason prints it:
// two decimals for peaks; for loudness one decimal, or two when it has a
// hundredths digit and exceeds the limit, so that the excess the reason
// states is the one the advice asks to remove. Returns the text and the
// number it means.
func maximumShown(v, limit float64, peak bool) (float64, string) {
	if peak || (above(v, limit) && hundredths(v)%10 != 0) {
		return round2(v), num(v, 2)
	}
	if above(v, limit) {
		return round2(v), num(v, 1)
	}
	return shown(v, limit)
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
	c.Measured = v
	vs, text := maximumShown(v, lim, d.peak)
	if vs > 0 && !strings.HasPrefix(text, "+") {
		text = "+" + text
	}
	diff := float64(hundredths(v)-hundredths(lim)) / 100
	switch {
	case diff > 0:
		c.Verdict = Fail
		c.Reason = fmt.Sprintf("%s %s %s is %s %s above the %s %s %s", d.what, text, d.unit,
			exact(vs-lim), d.diffUnit, limitNum(lim), d.unit, d.limitName)
	case diff == 0:
		c.Verdict = Pass
		c.Reason = fmt.Sprintf("%s %s %s is at the %s %s %s", d.what, text, d.unit, limitNum(lim), d.unit, d.limitName)
	default:
		c.Verdict = Pass
		c.Reason = fmt.Sprintf("%s %s %s is %s %s below the %s %s %s", d.what, text, d.unit,
			exact(lim-vs), d.diffUnit, limitNum(lim), d.unit, d.limitName)
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
	c.Measured = v
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
	if _, _, _, ok := s.integratedWindow(2); !ok {
		return Check{}, false
	}
	c := Check{ID: "downmix_integrated", Unit: s.Unit(), Limit: s.integratedLimit(2) + " (stereo fold-down)"}
	if m.StereoDownmix.IntegratedLUFS == nil {
		c.Verdict = Fail
		c.Reason = fmt.Sprintf("the stereo fold-down has no integrated loudness: nothing rose above the -70 %s absolute gate", s.Unit())
		return c, true
	}
	v := *m.StereoDownmix.IntegratedLUFS
	if notFinite(&c, v, "the stereo fold-down's integrated loudness") {
		return c, true
	}
	c.Measured = v
	var reason string
	c.Verdict, reason = s.judgeIntegrated(v, 2, false)
	c.Reason = "stereo fold-down: " + reason
	return c, true
}

// checkDownmixTruePeak judges the true peak of a surround file's stereo
// fold-down against the ceiling, for specs that judge the fold-down: the
// fold-down adds channels together, so it can peak higher than any one of
// them.
func checkDownmixTruePeak(j *judge) (Check, bool) {
	s, m := j.spec, j.m
	if !s.Loudness.CheckDownmix || m.StereoDownmix == nil || s.Loudness.MaxTruePeakDBTP == nil {
		return Check{}, false
	}
	w := truePeakWords("stereo fold-down true peak", "the stereo fold-down has no true peak: it is digital silence")
	w.id = "downmix_true_peak"
	c, ok := checkMaximum(s.Loudness.MaxTruePeakDBTP, m.StereoDownmix.TruePeakDBTP, w)
	c.Limit += " (stereo fold-down)"
	return c, ok
}
