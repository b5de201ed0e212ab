package rules

import "github.com/kweigh/kweigh/measure"

// judge is one Evaluate call: a spec and the measurement it judges.
type judge struct {
	spec *Spec
	m    *measure.Measurement
}

// checkRun judges one requirement; ok is false when the check does not apply
// (the spec sets no limit and kweigh has no QC default, or the file lacks
// what the check looks at).
type checkRun func(j *judge) (c Check, ok bool)

// checkOrder is the order in which checks appear in a Result.
var checkOrder = []checkRun{
	checkIntegrity,
	checkIntegrated, checkTruePeak, checkMaxShortTerm, checkMaxMomentary, checkLoudnessRange,
	checkDownmixIntegrated, checkDownmixTruePeak,
	checkContainer, checkSampleRate, checkBitDepth, checkBitRate, checkBitRateMode, checkSampleFormat, checkChannels, checkChannelLayout,
	checkDuration, checkLeadingSilence, checkTrailingSilence,
	checkClipping, checkDCOffset, checkPhase, checkPhaseWindow, checkDualMono, checkSilentChannels,
	checkBextLoudness,
}

// CheckIDs lists the IDs of every check Evaluate can produce, in the order
// they appear in a Result.
var CheckIDs = []string{
	"integrity",
	"integrated", "true_peak", "max_short_term", "max_momentary", "loudness_range",
	"downmix_integrated", "downmix_true_peak",
	"container", "sample_rate", "bit_depth", "bit_rate", "bit_rate_mode", "sample_format", "channels", "channel_layout",
	"duration", "leading_silence", "trailing_silence",
	"clipping", "dc_offset", "phase", "phase_window", "dual_mono", "silent_channels",
	"bext_loudness",
}

// Evaluate judges m against spec and returns the Result: the checks in a
// fixed order (see CheckIDs; checks that do not apply are left out), the
// overall verdict (the worst of the checks), and for loudness or true-peak
// failures the gain and limiter advice. A file that could not be measured
// (m nil or m.Error set) gets the Error verdict and a single "integrity"
// check. spec must not be nil. Evaluate does not modify spec or m and is safe
// for concurrent use.
func Evaluate(spec *Spec, m *measure.Measurement) Result {
	r := Result{Measurement: m, Spec: spec.ID, LoudnessUnit: spec.Unit(), Checks: []Check{}}
	if m == nil || m.Error != "" {
		reason := "the file could not be measured"
		if m != nil {
			reason += ": " + m.Error
		}
		r.Verdict = Error
		r.Checks = append(r.Checks, Check{ID: "integrity", Verdict: Error, Limit: "file decodes", Reason: reason})
		r.Advice = "Check that the file is a complete audio file in a supported format and deliver it again."
		return r
	}
	j := &judge{spec: spec, m: m}
	for _, run := range checkOrder {
		if c, ok := run(j); ok {
			r.Checks = append(r.Checks, c)
		}
	}
	r.Verdict = Worst(r.Checks)
	r.SuggestedGainDB, r.LimiterReductionDB, r.Advice = advise(spec, m)
	return r
}

// Worst returns the worst verdict among checks (Pass for none): Error is
// worse than Fail, Fail than Warn, Warn than Pass.
func Worst(checks []Check) Verdict {
	v := Pass
	for _, c := range checks {
		if c.Verdict.rank() > v.rank() {
			v = c.Verdict
		}
	}
	return v
}

func (v Verdict) rank() int {
	switch v {
	case Warn:
		return 1
	case Fail:
		return 2
	case Error:
		return 3
	}
	return 0
}

// undeclaredFailS is how much undeclared audio-like data fails a file's
// integrity check rather than warning: one 100 ms block, the engine's unit.
// A header that declares less than the file holds makes players disagree
// about what the programme is (some stop where the header says, others
// play on), and the figures describe only the declared part, so a loud
// second half could hide behind a passing verdict: that is a failed
// delivery. Less than one block cannot hold a programme; it is more likely
// a writer's padding or a cut tag, so it only warns.
const undeclaredFailS = 0.1

// checkIntegrity fails damaged audio: a corrupt delivery whatever its
// figures say; and a file holding data beyond what its header declares.
func checkIntegrity(j *judge) (Check, bool) {
	c := Check{ID: "integrity", Limit: "audio decodes without damage", Measured: "intact"}
	if j.m.Damaged != "" {
		c.Verdict = Fail
		c.Measured = "damaged"
		c.Reason = "corrupt delivery: " + j.m.Damaged + "; the figures cover only the audio that could be decoded"
		return c, true
	}
	if u := j.m.Undeclared; u != nil {
		c.Verdict, c.Measured = Warn, "undeclared data"
		c.Limit = "audio decodes without damage; the header declares all of it"
		if u.Seconds >= undeclaredFailS {
			c.Verdict = Fail
		}
		c.Reason = measure.UndeclaredText(j.m.DurationS, u) + ": players may stop where the header ends or play on; the figures cover only the declared audio"
		return c, true
	}
	c.Verdict = Pass
	c.Reason = "the audio decoded without damage"
	return c, true
}
