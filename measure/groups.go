package measure

import (
	"fmt"
	"strconv"
	"strings"

	"github.com/kweigh/kweigh/decode"
	"github.com/kweigh/kweigh/loudness"
	"github.com/kweigh/kweigh/timecode"
)

// Group is a programme carried on some channels of a file: a 5.1 mix on
// channels 1–6 and its stereo version on 7–8 of one 8-channel delivery,
// or one language per discrete mono channel. Each group is measured as a
// programme of its own (its own K-weighting with its own channel weights,
// gating, true peak, hygiene, fold-down and events) in the file's one
// decoding pass.
type Group struct {
	// Name labels the group in reports, e.g. "main" or "stereo".
	Name string
	// Channels are the file's channels in the group, 1-based, in the
	// group's stream order. With Streams set they are counted within the
	// one stream named instead, and nil means every channel of the
	// streams.
	Channels []int
	// Streams names the file's audio streams (1-based, as --stream counts
	// them; see decode.Info.Streams) that carry the group, for containers
	// with several: [2] is the second stream, [1 2] two mono tracks in
	// that order. nil means Channels are the file's channels. A file of
	// one stream is stream 1. Resolved against the file, Channels become
	// the file's channels and Streams stay as the record of the request.
	Streams []int
	// Layout labels the group's channels (e.g. 5.1: L R C LFE Ls Rs);
	// nil means decode.DefaultLayout by the group's channel count.
	Layout []string
	// streamLayout is set when resolution took Layout from the stream.
	streamLayout bool
}

// GroupMeasurement is one group's record: the figures of a Measurement
// of the group's channels alone, with the group's name and channel
// numbers. Its JSON "channels" is the list of the file's channel numbers
// (1-based), not their count.
type GroupMeasurement struct {
	Name     string `json:"name"`
	Channels []int  `json:"channels"`
	// Streams are the audio streams the group was named by, when it was.
	Streams []int `json:"streams,omitempty"`
	Measurement
}

// EachChannel is the --groups value that makes every channel a group.
const EachChannel = "each"

// ParseChannels reads a channel list: 1-based numbers and ranges
// separated by commas or spaces, e.g. "1-6", "7,8", "3".
func ParseChannels(s string) ([]int, error) { return parseNumbers(s, "channel") }

// parseNumbers reads a list of 1-based numbers and ranges of the named
// thing ("channel" or "stream").
func parseNumbers(s, what string) ([]int, error) {
	var out []int
	seen := map[int]bool{}
	fields := strings.FieldsFunc(s, func(r rune) bool { return r == ',' || r == ' ' })
	if len(fields) == 0 {
		return nil, fmt.Errorf("%ss %q: give numbers from 1 or ranges like 1-6", what, s)
	}
	for _, f := range fields {
		lo, hi, isRange := strings.Cut(f, "-")
		a, err1 := strconv.Atoi(lo)
		b := a
		var err2 error
		if isRange {
			b, err2 = strconv.Atoi(hi)
		}
		switch {
		case err1 != nil || err2 != nil:
			return nil, fmt.Errorf("%ss %q: %q is not a number or a range like 1-6", what, s, f)
		case a < 1 || b < 1:
			return nil, fmt.Errorf("%ss %q: %ss are numbered from 1", what, s, what)
		case b < a:
			return nil, fmt.Errorf("%ss %q: range %q runs backwards", what, s, f)
		case b > 1024:
			return nil, fmt.Errorf("%ss %q: %s %d is beyond any file", what, s, what, b)
		}
		for c := a; c <= b; c++ {
			if seen[c] {
				return nil, fmt.Errorf("%ss %q: %s %d is listed twice", what, s, what, c)
			}
			seen[c] = true
			out = append(out, c)
		}
	}
	return out, nil
}

// ParseGroups reads the --groups syntax: comma-separated NAME=CHANNELS or
// NAME=CHANNELS:LAYOUT, e.g. "main=1-6:5.1,stereo=7-8:stereo" (CHANNELS as
// in ParseChannels but with '+' between parts, since ',' separates groups:
// "dialogue=1+3"). CHANNELS may instead name audio streams: "s2" is all of
// stream 2, "s1-2" (or "s1+2") streams 1 and 2 in that order, and "s2/1-2"
// channels 1–2 counted within stream 2; e.g.
// "main=s1:5.1,stereo=s2:stereo". "each" is returned as nil groups and
// each true.
func ParseGroups(s string) (groups []Group, each bool, err error) {
	s = strings.TrimSpace(s)
	if s == EachChannel {
		return nil, true, nil
	}
	names := map[string]bool{}
	for _, part := range strings.Split(s, ",") {
		name, rest, ok := strings.Cut(strings.TrimSpace(part), "=")
		name = strings.TrimSpace(name)
		if !ok || name == "" {
			return nil, false, fmt.Errorf("--groups %q: %q: want NAME=CHANNELS[:LAYOUT], e.g. main=1-6:5.1", s, part)
		}
		if names[name] {
			return nil, false, fmt.Errorf("--groups %q: group %q is named twice", s, name)
		}
		names[name] = true
		chans, layout, _ := strings.Cut(rest, ":")
		g := Group{Name: name}
		chans = strings.TrimSpace(chans)
		if st, ok := strings.CutPrefix(chans, "s"); ok {
			st, within, hasWithin := strings.Cut(st, "/")
			if g.Streams, err = ParseStreams(strings.ReplaceAll(st, "+", ",")); err != nil {
				return nil, false, fmt.Errorf("--groups: group %q: %w", name, err)
			}
			if hasWithin {
				if g.Channels, err = ParseChannels(strings.ReplaceAll(within, "+", ",")); err != nil {
					return nil, false, fmt.Errorf("--groups: group %q: stream %s: %w", name, st, err)
				}
			}
		} else if g.Channels, err = ParseChannels(strings.ReplaceAll(chans, "+", ",")); err != nil {
			return nil, false, fmt.Errorf("--groups: group %q: %w", name, err)
		}
		if layout != "" {
			if g.Layout, err = decode.ParseLayout(layout); err != nil {
				return nil, false, fmt.Errorf("--groups: group %q: %w", name, err)
			}
		}
		if err := g.Check(); err != nil {
			return nil, false, fmt.Errorf("--groups: %w", err)
		}
		groups = append(groups, g)
	}
	return groups, false, nil
}

// ParseStreams reads a list of audio stream numbers: 1-based numbers and
// ranges as in ParseChannels, e.g. "2", "1-2", "3,5".
func ParseStreams(s string) ([]int, error) { return parseNumbers(s, "stream") }

// Check reports a group whose layout does not fit its channels, or that
// counts channels within more than one stream.
func (g Group) Check() error {
	if len(g.Streams) > 1 && g.Channels != nil {
		return fmt.Errorf("group %q counts channels within streams %v: channels within a stream need exactly one stream", g.Name, g.Streams)
	}
	if g.Streams == nil && len(g.Channels) == 0 {
		return fmt.Errorf("group %q names no channels", g.Name)
	}
	if g.Streams != nil && g.Channels == nil {
		return nil // the count is known once the file's streams are
	}
	if g.Layout != nil && len(g.Layout) != len(g.Channels) {
		return fmt.Errorf("group %q has %d channels but its layout %s names %d", g.Name, len(g.Channels), strings.Join(g.Layout, ","), len(g.Layout))
	}
	return nil
}

// programme meters one group's channels during the file's pass.
type programme struct {
	group  Group
	layout []string
	pick   []int // 0-based file channels
	buf    []float64
	meter  *loudness.Meter
	hyg    *hygiene
	fold   *downmixer
	ev     *events
	rate   int
}

// groupsFor resolves the groups of the options against a file: "each"
// becomes one mono group per channel, named by its label; a group naming
// a channel the file lacks is an error.
func groupsFor(opt Options, info decode.Info, layout []string) ([]Group, error) {
	groups := opt.Groups
	if opt.EachChannel {
		groups = make([]Group, info.Channels)
		for c := range groups {
			name := fmt.Sprintf("%d", c+1)
			if c < len(layout) {
				name += " " + layout[c]
			}
			groups[c] = Group{Name: name, Channels: []int{c + 1}, Layout: []string{"M"}}
		}
	}
	out := make([]Group, 0, len(groups))
	for _, g := range groups {
		if g.Streams != nil {
			r, err := resolveStreams(g, info)
			if err != nil {
				return nil, err
			}
			g = r
		}
		for _, c := range g.Channels {
			if c > info.Channels {
				return nil, fmt.Errorf("group %q names channel %d but the file has %d channels", g.Name, c, info.Channels)
			}
		}
		resolved := g
		resolved.Streams = nil // Channels are the file's now
		if err := resolved.Check(); err != nil {
			return nil, err
		}
		out = append(out, g)
	}
	return out, nil
}

// resolveStreams turns a group named by streams into the file's
// channels. A file that describes no streams is one stream of all its
// channels. Without a layout of its own, a group that is one whole stream
// takes that stream's layout.
func resolveStreams(g Group, info decode.Info) (Group, error) {
	streams := info.Streams
	if streams == nil {
		streams = []decode.StreamInfo{{Index: 1, FirstChannel: 1, Channels: info.Channels, Layout: info.Layout}}
	}
	find := func(n int) (decode.StreamInfo, bool) {
		for _, s := range streams {
			if s.Index == n {
				return s, true
			}
		}
		return decode.StreamInfo{}, false
	}
	var chans []int
	for _, n := range g.Streams {
		s, ok := find(n)
		if !ok {
			have := make([]string, len(streams))
			for i, s := range streams {
				have[i] = strconv.Itoa(s.Index)
			}
			return g, fmt.Errorf("group %q names audio stream %d but the file has %d audio stream(s) (%s)", g.Name, n, len(streams), strings.Join(have, ", "))
		}
		if g.Channels == nil {
			for c := range s.Channels {
				chans = append(chans, s.FirstChannel+c)
			}
			if g.Layout == nil && len(g.Streams) == 1 && s.Layout != nil && len(s.Layout) == s.Channels {
				g.Layout, g.streamLayout = append([]string(nil), s.Layout...), true
			}
			continue
		}
		for _, c := range g.Channels {
			if c > s.Channels {
				return g, fmt.Errorf("group %q names channel %d of audio stream %d but that stream has %d channel(s)", g.Name, c, n, s.Channels)
			}
			chans = append(chans, s.FirstChannel+c-1)
		}
	}
	g.Channels = chans
	return g, nil
}

func newProgramme(g Group, info decode.Info, silence float64, clipRun int, lim EventLimits) (*programme, error) {
	layout := g.Layout
	if layout == nil {
		layout = decode.DefaultLayout(len(g.Channels))
	}
	weights, err := loudness.Weights(layout)
	if err != nil {
		return nil, fmt.Errorf("group %q: %w", g.Name, err)
	}
	meter, err := loudness.NewMeter(info.SampleRate, weights)
	if err != nil {
		return nil, fmt.Errorf("group %q: %w", g.Name, err)
	}
	p := &programme{group: g, layout: layout, rate: info.SampleRate, meter: meter, fold: newDownmixer(layout, info.SampleRate), ev: newEvents(lim),
		hyg: newHygiene(len(g.Channels), info.SampleRate, info.BitsPerSample, info.SampleFormat == decode.Float, layout, silence, clipRun)}
	for _, c := range g.Channels {
		p.pick = append(p.pick, c-1)
	}
	pair := "L/R"
	p.hyg.onWindow = func(k int64, c float64) { p.ev.phaseWindow(k, c, &pair) }
	return p, nil
}

// write meters the group's channels of a block of the file's interleaved
// frames, the first of which is frame at.
func (p *programme) write(block []float64, nc int, at int64) error {
	n := len(block) / nc
	gc := len(p.pick)
	if cap(p.buf) < n*gc {
		p.buf = make([]float64, n*gc)
	}
	buf := p.buf[:n*gc]
	for f := 0; f < n; f++ {
		src := block[f*nc : f*nc+nc]
		dst := buf[f*gc : f*gc+gc]
		for i, c := range p.pick {
			dst[i] = src[c]
		}
	}
	clips := p.ev.markClips(p.hyg)
	f := -1
	if p.fold != nil {
		f = p.fold.writeBeside(p.meter, buf, p.hyg)
	} else {
		p.meter.Write(buf)
		p.hyg.write(buf)
	}
	p.ev.afterBlock(p.hyg, clips, at, n, p.rate)
	if f >= 0 { // only a fold-down rejects a frame here
		return fmt.Errorf("group %q: frame %d folds down to a stereo sample beyond ±%s: far beyond full scale, cannot be measured",
			p.group.Name, at+int64(f), sci(loudness.MaxMagnitude))
	}
	return nil
}

// finish makes the group's record from the file's: the same container
// facts, the group's own figures. The bext loudness fields describe the
// whole file, so a group carries no bext.
func (p *programme) finish(file *Measurement, frames int64, rate int, silence float64, start timecode.Start, tc timecode.Rate, keepSeries bool) *GroupMeasurement {
	g := &GroupMeasurement{Name: p.group.Name, Channels: append([]int(nil), p.group.Channels...), Streams: append([]int(nil), p.group.Streams...)}
	m := &g.Measurement
	*m = Measurement{
		Path: file.Path, Format: file.Format, Codec: file.Codec, SampleRateHz: file.SampleRateHz,
		Channels: len(p.pick), ChannelLayout: p.layout, LayoutSource: "group",
		BitsPerSample: file.BitsPerSample, SampleFormat: file.SampleFormat, Mode: file.Mode,
		BitRateKbps: file.BitRateKbps, BitRateMode: file.BitRateMode,
		DurationS: float64(frames) / float64(rate), Damaged: file.Damaged, Notes: []string{},
	}
	switch {
	case p.group.Layout == nil:
		m.LayoutSource = "default"
	case p.group.streamLayout:
		m.LayoutSource = "file" // the stream's own, as the container declares it
	}
	r := p.meter.Result()
	fillLoudness(m, r)
	if p.fold != nil {
		m.StereoDownmix = p.fold.result()
	}
	m.Signal = p.hyg.finish(rate, p.layout, r.SamplePeak, silence)
	p.ev.fromSeries(&r.Series, m.DurationS, m.Signal.SilenceThresholdDBFS)
	m.Events, m.EventsOmitted = p.ev.finish(start)
	m.setTimecode(start, tc)
	if keepSeries {
		s := r.Series
		m.Series = &s
	}
	return g
}
