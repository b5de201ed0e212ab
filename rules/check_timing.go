package rules

import "fmt"

// checkDuration judges the duration against the minimum and maximum.
func checkDuration(j *judge) (Check, bool) {
	t := j.spec.Timing
	if t.MinDurationS == nil && t.MaxDurationS == nil {
		return Check{}, false
	}
	v := j.m.DurationS
	c := Check{ID: "duration", Unit: "s", Measured: round2(v), Limit: rangeLimit(t.MinDurationS, t.MaxDurationS, "s")}
	if notFinite(&c, v, "duration") {
		return c, true
	}
	c.Verdict, c.Reason = judgeRange(v, t.MinDurationS, t.MaxDurationS, Fail, rangeWords{
		what: "duration", unit: "s", over: "longer", under: "shorter", limit: magnitude,
	})
	return c, true
}

// checkLeadingSilence judges the silence before the first sound.
func checkLeadingSilence(j *judge) (Check, bool) {
	return checkSilence("leading_silence", "leading", j.spec.Timing.MaxLeadingSilenceS, j.m.Signal.LeadingSilenceS, j.m.Signal.SilenceThresholdDBFS)
}

// checkTrailingSilence judges the silence after the last sound.
func checkTrailingSilence(j *judge) (Check, bool) {
	return checkSilence("trailing_silence", "trailing", j.spec.Timing.MaxTrailingSilenceS, j.m.Signal.TrailingSilenceS, j.m.Signal.SilenceThresholdDBFS)
}

func checkSilence(id, where string, limit *float64, v, thresholdDBFS float64) (Check, bool) {
	if limit == nil {
		return Check{}, false
	}
	c := Check{ID: id, Unit: "s", Measured: round2(v), Limit: fmt.Sprintf("≤ %s s", magnitude(*limit))}
	if notFinite(&c, v, where+" silence") {
		return c, true
	}
	below := silenceNote(thresholdDBFS)
	if above(v, *limit) {
		c.Verdict = Fail
		c.Reason = fmt.Sprintf("%s silence%s lasts %s s, longer than the %s s maximum", where, below, near(v, *limit), magnitude(*limit))
	} else {
		c.Verdict = Pass
		c.Reason = fmt.Sprintf("%s silence%s lasts %s s, within the %s s maximum", where, below, near(v, *limit), magnitude(*limit))
	}
	return c, true
}

// silenceNote says which level counted as silence, e.g. " (below -60 dBFS)";
// empty when the measurement does not say.
func silenceNote(thresholdDBFS float64) string {
	if thresholdDBFS == 0 {
		return ""
	}
	return fmt.Sprintf(" (below %s dBFS)", num(thresholdDBFS, 0))
}
