package rules

import (
	"fmt"
	"math"
	"strings"

	"github.com/kweigh/kweigh/decode"
)

// qcSuffix marks the limit of a check run with kweigh's QC default rather
// than a limit the spec sets.
const qcSuffix = " (QC default, warn only)"

// limitOrDefault returns the spec's limit with the Fail verdict, or kweigh's
// QC default with the Warn verdict when the spec sets none.
func limitOrDefault(limit *float64, qcDefault float64) (float64, Verdict, string) {
	if limit != nil {
		return *limit, Fail, ""
	}
	return qcDefault, Warn, qcSuffix
}

// checkClipping counts runs of consecutive full-scale samples.
func checkClipping(j *judge) (Check, bool) {
	sig := j.m.Signal
	allowed, out, suffix := int64(QCDefaultMaxClipRuns), Warn, qcSuffix
	if j.spec.Signal.MaxClipRuns != nil {
		allowed, out, suffix = *j.spec.Signal.MaxClipRuns, Fail, ""
	}
	run := "runs of consecutive full-scale samples"
	if sig.ClipRunMinSamples > 0 {
		run = fmt.Sprintf("runs of %d or more consecutive full-scale samples", sig.ClipRunMinSamples)
	}
	c := Check{ID: "clipping", Unit: "runs", Measured: float64(sig.ClipRuns),
		Limit: fmt.Sprintf("≤ %d %s%s", allowed, run, suffix)}
	switch {
	case sig.ClipRuns > allowed:
		c.Verdict = out
		c.Reason = fmt.Sprintf("%d %s (longest %d samples, %d full-scale samples in all): the audio is probably clipped; %d allowed",
			sig.ClipRuns, run, sig.LongestClipRun, sig.ClippedSamples, allowed)
	case sig.ClippedSamples > 0:
		c.Verdict = Pass
		c.Reason = fmt.Sprintf("%d %s, within the %d allowed (%d full-scale samples in all)", sig.ClipRuns, run, allowed, sig.ClippedSamples)
	default:
		c.Verdict = Pass
		c.Reason = "no full-scale samples"
	}
	return c, true
}

// checkDCOffset judges the largest per-channel mean sample value in dBFS.
func checkDCOffset(j *judge) (Check, bool) {
	dc := j.m.Signal.DCOffset
	if len(dc) == 0 {
		return Check{}, false
	}
	limit, out, suffix := limitOrDefault(j.spec.Signal.MaxDCOffsetDBFS, QCDefaultMaxDCOffsetDBFS)
	c := Check{ID: "dc_offset", Unit: "dBFS", Limit: fmt.Sprintf("≤ %s dBFS%s", limitNum(limit), suffix)}
	worst, at := 0.0, 0
	for i, x := range dc {
		if notFinite(&c, x, "DC offset of channel "+channelLabel(j.m.ChannelLayout, i)) {
			return c, true
		}
		if math.Abs(x) > worst {
			worst, at = math.Abs(x), i
		}
	}
	if worst == 0 {
		c.Verdict, c.Reason = Pass, "no DC offset"
		return c, true
	}
	db := 20 * math.Log10(worst)
	c.Measured = round2(db)
	ch := channelLabel(j.m.ChannelLayout, at)
	if above(db, limit) {
		c.Verdict = out
		c.Reason = fmt.Sprintf("DC offset %s dBFS (%s %% of full scale) on channel %s is above the %s dBFS limit",
			near(db, limit), num(100*worst, 2), ch, limitNum(limit))
	} else {
		c.Verdict = Pass
		c.Reason = fmt.Sprintf("largest DC offset %s dBFS (channel %s) is within the %s dBFS limit", near(db, limit), ch, limitNum(limit))
	}
	return c, true
}

// channelLabel returns the label of channel i, or its 1-based number.
func channelLabel(layout []string, i int) string {
	if i < len(layout) && layout[i] != "" {
		return layout[i]
	}
	return fmt.Sprintf("%d", i+1)
}

// checkPhase judges the whole-file correlation of the front L/R pair.
func checkPhase(j *judge) (Check, bool) {
	return checkCorrelation("phase", "L/R correlation over the whole file", j.m.Signal.Correlation,
		j.spec.Signal.MinCorrelation, QCDefaultMinCorrelation)
}

// checkPhaseWindow judges the lowest correlation over 3 s windows.
func checkPhaseWindow(j *judge) (Check, bool) {
	return checkCorrelation("phase_window", "lowest L/R correlation over 3 s windows", j.m.Signal.MinWindowCorrelation,
		j.spec.Signal.MinWindowCorrelation, QCDefaultMinWindowCorrelation)
}

func checkCorrelation(id, what string, value, limitPtr *float64, qcDefault float64) (Check, bool) {
	if value == nil {
		return Check{}, false
	}
	limit, out, suffix := limitOrDefault(limitPtr, qcDefault)
	v := *value
	c := Check{ID: id, Measured: round2(v), Limit: fmt.Sprintf("≥ %s%s", num(limit, 2), suffix)}
	if notFinite(&c, v, what) {
		return c, true
	}
	if below(v, limit) {
		c.Verdict = out
		c.Reason = fmt.Sprintf("%s is %s, below %s: the channels partly cancel when folded down to mono (is one channel phase-inverted?)",
			what, num(v, 2), num(limit, 2))
	} else {
		c.Verdict = Pass
		c.Reason = fmt.Sprintf("%s is %s, not below %s", what, num(v, 2), num(limit, 2))
	}
	return c, true
}

// checkDualMono flags a two-channel file carrying one signal twice.
func checkDualMono(j *judge) (Check, bool) {
	p := policyOrWarn(j.spec.Signal.DualMono)
	if p == PolicyAllow || j.m.Channels != 2 {
		return Check{}, false
	}
	c := Check{ID: "dual_mono", Measured: "no", Limit: "two different channels" + policySuffix(j.spec.Signal.DualMono)}
	if j.m.Signal.DualMono {
		c.Measured = "yes"
		c.Verdict = policyVerdict(p)
		c.Reason = "both channels carry the same signal: a mono source delivered as stereo, measured 3.01 dB louder than the same audio as a mono file"
		return c, true
	}
	c.Verdict, c.Reason = Pass, "the two channels carry different signals"
	return c, true
}

// checkSilentChannels flags channels that hold silence throughout. A silent
// LFE is normal and is not counted.
func checkSilentChannels(j *judge) (Check, bool) {
	p := policyOrWarn(j.spec.Signal.SilentChannels)
	if p == PolicyAllow {
		return Check{}, false
	}
	var silent []string
	for _, ch := range j.m.Signal.SilentChannels {
		if ch != decode.LowFrequency {
			silent = append(silent, ch)
		}
	}
	c := Check{ID: "silent_channels", Measured: "none", Limit: "no silent channel (LFE excepted)" + policySuffix(j.spec.Signal.SilentChannels)}
	if len(silent) == 0 {
		c.Verdict, c.Reason = Pass, "every channel carries signal"
		return c, true
	}
	c.Measured = strings.Join(silent, ",")
	c.Verdict = policyVerdict(p)
	noun := "channel"
	if len(silent) > 1 {
		noun = "channels"
	}
	verb := "is"
	if len(silent) > 1 {
		verb = "are"
	}
	c.Reason = fmt.Sprintf("%s %s %s silent throughout%s", noun, strings.Join(silent, ", "), verb,
		silenceNote(j.m.Signal.SilenceThresholdDBFS))
	return c, true
}

// policySuffix marks a limit that applies kweigh's default policy.
func policySuffix(p Policy) string {
	if p == "" {
		return qcSuffix
	}
	return ""
}

// policyVerdict is the verdict a finding gets under p.
func policyVerdict(p Policy) Verdict {
	if p == PolicyFail {
		return Fail
	}
	return Warn
}
