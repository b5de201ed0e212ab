package reports

import (
	"fmt"
	"io"
	"strings"

	"github.com/kweigh/kweigh/decode"
	"github.com/kweigh/kweigh/measure"
)

// measureText writes one labelled block per file and a summary line.
type measureText struct {
	sink
	opts  Options
	files int
}

func newMeasureText(w io.Writer, opts Options) *measureText {
	return &measureText{sink: newSink(w, Text), opts: opts}
}

// labelWidth aligns the figures of a block.
const labelWidth = 16

// line writes one labelled line of a block.
func (t *measureText) line(label, text string) {
	t.printf("  %-*s%s\n", labelWidth, label, text)
}

// figure writes a figure line: value right-aligned so that decimals line up,
// then its unit and any detail.
func (t *measureText) figure(label, value, unit, detail string) {
	text := fmt.Sprintf("%7s", value)
	if value != NotAvailable {
		text += " " + unit
	}
	if detail != "" {
		text += "   " + detail
	}
	t.line(label, text)
}

func (t *measureText) Write(m *measure.Measurement) error {
	if err := t.ready(); err != nil {
		return err
	}
	if m == nil {
		return t.fail(errNilRecord)
	}
	if t.files > 0 {
		t.print("\n")
	}
	t.files++
	t.print(Printable(m.Path) + "\n")
	if m.Error != "" {
		t.line("ERROR", "could not be measured: "+Printable(m.Error))
		t.notes(m.Notes)
		return t.flush()
	}
	if m.Damaged != "" {
		t.line("DAMAGED", m.Damaged+"; the figures cover only the audio that could be decoded")
	}
	t.line("stream", streamText(m))
	t.line("layout", layoutText(m))
	t.line("duration", fmt.Sprintf("%s (%s s)", Duration(m.DurationS), Fixed(m.DurationS, 3)))
	t.figure("integrated", Loudness(m.IntegratedLUFS), "LUFS", "")
	t.figure("loudness range", Loudness(m.LoudnessRangeLU), "LU", "")
	t.figure("true peak", Peak(m.TruePeakDBTP), "dBTP", perChannel(m.ChannelLayout, m.ChannelTruePeakDBTP))
	t.figure("sample peak", Peak(m.SamplePeakDBFS), "dBFS", perChannel(m.ChannelLayout, m.ChannelSamplePeakDBFS))
	t.figure("max momentary", Loudness(m.MaxMomentaryLUFS), "LUFS", "")
	t.figure("max short-term", Loudness(m.MaxShortTermLUFS), "LUFS", "")
	if d := m.StereoDownmix; d != nil {
		t.line("stereo downmix", fmt.Sprintf("integrated %s LUFS, true peak %s dBTP (Lo/Ro fold-down)", Loudness(d.IntegratedLUFS), Peak(d.TruePeakDBTP)))
	}
	t.signal(m.Signal, m.ChannelLayout)
	if m.Bext != nil {
		t.line(fmt.Sprintf("bext v%d", m.Bext.Version), bextOrigin(m.Bext))
		t.line("bext declares", bextLoudness(m.Bext))
	}
	t.notes(m.Notes)
	return t.flush()
}

func (t *measureText) notes(notes []string) {
	for _, n := range notes {
		t.line("note", n)
	}
}

// signal writes the hygiene findings.
func (t *measureText) signal(s measure.Signal, layout []string) {
	t.line("silence", fmt.Sprintf("leading %s s, trailing %s s (below %s dBFS)",
		Fixed(s.LeadingSilenceS, 1), Fixed(s.TrailingSilenceS, 1), Fixed(s.SilenceThresholdDBFS, 0)))
	if s.ClippedSamples == 0 {
		t.line("clipping", "none")
	} else {
		t.line("clipping", fmt.Sprintf("%d samples at full scale; %d runs of %d or more, longest %d",
			s.ClippedSamples, s.ClipRuns, s.ClipRunMinSamples, s.LongestClipRun))
	}
	if len(s.DCOffset) > 0 {
		parts := make([]string, len(s.DCOffset))
		for i, dc := range s.DCOffset {
			parts[i] = channelLabel(layout, i) + " " + Fixed(dc*100, 3) + " %"
		}
		t.line("dc offset", strings.Join(parts, ", "))
	}
	if Defined(s.Correlation) {
		text := "L/R " + Fixed(*s.Correlation, 2)
		if Defined(s.MinWindowCorrelation) {
			text += ", lowest 3 s window " + Fixed(*s.MinWindowCorrelation, 2)
		}
		t.line("correlation", text)
	}
	if s.DualMono {
		t.line("dual mono", "both channels carry the same signal")
	}
	if len(s.SilentChannels) > 0 {
		t.line("silent channels", strings.Join(s.SilentChannels, " "))
	}
}

func (t *measureText) Close(s Summary) error {
	if t.closed {
		return ErrClosed
	}
	if t.files > 0 {
		t.print("\n")
	}
	t.print(s.MeasureString() + "\n")
	return t.close()
}

// streamText describes the stream: "wav, pcm, 24-bit int, 48000 Hz, 2 channels".
func streamText(m *measure.Measurement) string {
	parts := []string{m.Format}
	if m.Codec != "" {
		parts = append(parts, m.Codec)
	}
	if m.BitsPerSample > 0 {
		parts = append(parts, fmt.Sprintf("%d-bit %s", m.BitsPerSample, m.SampleFormat))
	} else {
		// A lossy format has no bit depth.
		parts = append(parts, "— bits")
	}
	if m.BitRateKbps > 0 {
		rate := Fixed(m.BitRateKbps, 0) + " kbps"
		if m.BitRateMode != "" {
			rate += " " + strings.ToUpper(m.BitRateMode)
		}
		parts = append(parts, rate)
	}
	if m.Mode != "" {
		parts = append(parts, m.Mode)
	}
	parts = append(parts, fmt.Sprintf("%d Hz", m.SampleRateHz), plural(m.Channels, "channel"))
	if len(m.Tags) > 0 {
		parts = append(parts, "tags "+strings.Join(m.Tags, " "))
	}
	return strings.Join(parts, ", ")
}

// layoutText lists the channel labels and where they came from.
func layoutText(m *measure.Measurement) string {
	if len(m.ChannelLayout) == 0 {
		return NotAvailable
	}
	text := strings.Join(m.ChannelLayout, " ")
	switch m.LayoutSource {
	case "file":
		text += " (from the file)"
	case "default":
		text += " (default for the channel count)"
	case "user":
		text += " (given with --layout)"
	}
	return text
}

// perChannel lists per-channel peaks under their labels: "L -1.62  R -2.05".
// Nothing for a single channel, whose figure is the overall one.
func perChannel(layout []string, peaks []*float64) string {
	if len(peaks) < 2 {
		return ""
	}
	parts := make([]string, len(peaks))
	for i, p := range peaks {
		parts[i] = channelLabel(layout, i) + " " + Peak(p)
	}
	return strings.Join(parts, "  ")
}

// channelLabel is the layout's label for channel i, or its number.
func channelLabel(layout []string, i int) string {
	if i < len(layout) && layout[i] != "" {
		return layout[i]
	}
	return fmt.Sprintf("Ch%d", i+1) // as decode.DefaultLayout names unlabelled channels
}

// bextOrigin says who made the file and when, as the bext chunk records.
func bextOrigin(b *decode.Bext) string {
	parts := []string{}
	for _, p := range []string{b.Originator, b.OriginatorReference, strings.TrimSpace(b.OriginationDate + " " + b.OriginationTime)} {
		if p != "" {
			parts = append(parts, p)
		}
	}
	if len(parts) == 0 {
		return "no originator recorded"
	}
	return strings.Join(parts, ", ")
}

// bextLoudness lists the loudness the bext chunk declares (version 2 and
// later, EBU Tech 3285 v2), for comparison with the measured figures above.
func bextLoudness(b *decode.Bext) string {
	declared := []struct {
		name, unit string
		value      *float64
		decimals   int
	}{
		{"integrated", "LUFS", b.LoudnessValue, 1},
		{"range", "LU", b.LoudnessRange, 1},
		{"true peak", "dBTP", b.MaxTruePeakLevel, 2},
		{"max momentary", "LUFS", b.MaxMomentaryLoudness, 1},
		{"max short-term", "LUFS", b.MaxShortTermLoudness, 1},
	}
	var parts []string
	for _, d := range declared {
		if Defined(d.value) {
			parts = append(parts, fmt.Sprintf("%s %s %s", d.name, Fixed(*d.value, d.decimals), d.unit))
		}
	}
	if len(parts) == 0 {
		return "no loudness (a bext chunk before version 2 has no loudness fields)"
	}
	return strings.Join(parts, ", ")
}
