package rules

import (
	"fmt"
	"slices"
	"strconv"
	"strings"

	"github.com/kweigh/kweigh/measure"
)

// checkContainer judges the container against the accepted list.
func checkContainer(j *judge) (Check, bool) {
	return checkOneOf("container", "container", j.m.Format, j.spec.Format.Containers, "")
}

// checkSampleFormat judges int versus float sample coding.
func checkSampleFormat(j *judge) (Check, bool) {
	return checkOneOf("sample_format", "sample format", j.m.SampleFormat, j.spec.Format.SampleFormats, "")
}

// checkSampleRate judges the sample rate against the accepted list.
func checkSampleRate(j *judge) (Check, bool) {
	return checkOneOfInt("sample_rate", "sample rate", j.m.SampleRateHz, j.spec.Format.SampleRatesHz, "Hz")
}

// checkBitDepth judges the bits per sample against the accepted list. A
// lossy file has no bit depth, which no list of depths accepts.
func checkBitDepth(j *judge) (Check, bool) {
	if j.m.BitsPerSample == 0 && len(j.spec.Format.BitDepths) > 0 {
		return Check{ID: "bit_depth", Unit: "bits", Verdict: Fail, Limit: "one of " + joinInts(j.spec.Format.BitDepths) + " bits",
			Reason: fmt.Sprintf("%s has no bit depth (lossy coding); the spec asks for %s bits", j.m.Format, joinInts(j.spec.Format.BitDepths))}, true
	}
	return checkOneOfInt("bit_depth", "bit depth", int(j.m.BitsPerSample), j.spec.Format.BitDepths, "bits")
}

// checkBitRate judges the average coded bit rate of a compressed file.
// Uncompressed files have no coded bit rate and are not judged; a
// compressed file whose rate the decoder could not tell warns.
func checkBitRate(j *judge) (Check, bool) {
	f, m := j.spec.Format, j.m
	if f.MinBitRateKbps == nil && f.MaxBitRateKbps == nil {
		return Check{}, false
	}
	c := Check{ID: "bit_rate", Unit: "kbps", Limit: rangeLimit(f.MinBitRateKbps, f.MaxBitRateKbps, "kbps")}
	if m.BitRateKbps <= 0 {
		if !lossy(m) {
			return Check{}, false
		}
		c.Verdict, c.Reason = Warn, fmt.Sprintf("the %s decoder could not tell the bit rate", m.Format)
		return c, true
	}
	c.Measured = m.BitRateKbps
	c.Verdict, c.Reason = judgeRange(m.BitRateKbps, f.MinBitRateKbps, f.MaxBitRateKbps, Fail, rangeWords{
		what: "bit rate", unit: "kbps", over: "higher", under: "lower", limit: magnitude,
	})
	return c, true
}

// checkBitRateMode judges CBR, VBR or ABR against the accepted modes.
func checkBitRateMode(j *judge) (Check, bool) {
	allowed, m := j.spec.Format.BitRateModes, j.m
	if len(allowed) == 0 {
		return Check{}, false
	}
	if m.BitRateMode == "" {
		if !lossy(m) {
			return Check{}, false
		}
		return Check{ID: "bit_rate_mode", Verdict: Warn, Limit: "one of " + strings.Join(allowed, ", "),
			Reason: fmt.Sprintf("the %s decoder could not tell whether the bit rate is constant or variable", m.Format)}, true
	}
	return checkOneOf("bit_rate_mode", "bit rate mode", m.BitRateMode, allowed, "")
}

// lossy reports whether m is a lossy (perceptually coded) file.
func lossy(m *measure.Measurement) bool { return m.Format == "mp3" }

// checkChannels judges the channel count against the accepted list.
func checkChannels(j *judge) (Check, bool) {
	return checkOneOfInt("channels", "channel count", j.m.Channels, j.spec.Format.Channels, "channels")
}

// checkChannelLayout judges the channel layout against the accepted
// layouts, saying when the file did not declare its layout.
func checkChannelLayout(j *judge) (Check, bool) {
	allowed := j.spec.Format.Layouts
	if len(allowed) == 0 {
		return Check{}, false
	}
	names := make([]string, len(allowed))
	for i, l := range allowed {
		names[i] = strings.Join(l, ",")
	}
	got := strings.Join(j.m.ChannelLayout, ",")
	c := Check{ID: "channel_layout", Measured: got, Limit: "one of " + strings.Join(names, " | ")}
	assumed := ""
	if j.m.LayoutSource == "default" {
		assumed = " (assumed from the channel count; the file does not declare it)"
	}
	if slices.Contains(names, got) {
		c.Verdict, c.Reason = Pass, fmt.Sprintf("channel layout %s is accepted%s", got, assumed)
	} else {
		c.Verdict, c.Reason = Fail, fmt.Sprintf("channel layout %s is not accepted (accepted: %s)%s", got, strings.Join(names, " | "), assumed)
	}
	return c, true
}

func checkOneOf(id, what, got string, allowed []string, unit string) (Check, bool) {
	if len(allowed) == 0 {
		return Check{}, false
	}
	c := Check{ID: id, Measured: got, Unit: unit, Limit: "one of " + strings.Join(allowed, ", ")}
	if slices.Contains(allowed, got) {
		c.Verdict, c.Reason = Pass, fmt.Sprintf("%s %s is accepted", what, got)
	} else {
		c.Verdict, c.Reason = Fail, fmt.Sprintf("%s %s is not accepted (accepted: %s)", what, got, strings.Join(allowed, ", "))
	}
	return c, true
}

func checkOneOfInt(id, what string, got int, allowed []int, unit string) (Check, bool) {
	if len(allowed) == 0 {
		return Check{}, false
	}
	list := make([]string, len(allowed))
	for i, a := range allowed {
		list[i] = strconv.Itoa(a)
	}
	c := Check{ID: id, Measured: float64(got), Unit: unit, Limit: fmt.Sprintf("one of %s %s", strings.Join(list, ", "), unit)}
	if slices.Contains(allowed, got) {
		c.Verdict, c.Reason = Pass, fmt.Sprintf("%s %d %s is accepted", what, got, unit)
	} else {
		c.Verdict, c.Reason = Fail, fmt.Sprintf("%s %d %s is not accepted (accepted: %s %s)", what, got, unit, strings.Join(list, ", "), unit)
	}
	return c, true
}
