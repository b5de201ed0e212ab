package rules

import (
	"fmt"
	"slices"
	"strconv"
	"strings"
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

// checkBitDepth judges the bits per sample against the accepted list.
func checkBitDepth(j *judge) (Check, bool) {
	return checkOneOfInt("bit_depth", "bit depth", j.m.BitsPerSample, j.spec.Format.BitDepths, "bits")
}

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
