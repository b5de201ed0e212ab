package measure_test

import (
	"context"
	"math"
	"math/rand/v2"
	"slices"
	"testing"

	"github.com/kweigh/kweigh/measure"
)

// programmeAudio is n frames of band-limited noise bursts per channel
// (a different level and rhythm in each), so loudness, range and peaks
// all differ between channels.
func programmeAudio(seconds float64, channels int, seed uint64) []float64 {
	rng := rand.New(rand.NewPCG(seed, 7))
	n := int(seconds * rate)
	out := make([]float64, n*channels)
	for c := 0; c < channels; c++ {
		amp := dbfs(-12 - float64(c%3))
		levels := []float64{1, 0.1, 0.5, 0.03}
		var lp float64
		for i := 0; i < n; i++ {
			lp += 0.2 * (rng.NormFloat64()*0.3 - lp)
			g := levels[(i/(rate*3/2)+c)%len(levels)]
			out[i*channels+c] = amp * g * lp * 3
		}
	}
	return out
}

// pickChannels copies channels [from, to) of interleaved frames.
func pickChannels(v []float64, nc, from, to int) []float64 {
	frames := len(v) / nc
	out := make([]float64, 0, frames*(to-from))
	for f := 0; f < frames; f++ {
		out = append(out, v[f*nc+from:f*nc+to]...)
	}
	return out
}

func same(a, b *float64, tol float64) bool {
	if a == nil || b == nil {
		return a == b
	}
	return math.Abs(*a-*b) <= tol
}

// TestGroupsReadLikeSeparateFiles: an 8-channel delivery with a 5.1 mix
// on channels 1–6 and a stereo mix on 7–8, measured with groups, gives
// for each group the figures of the same audio in a file of its own (a
// 5.1 WAV with mask 0x3F, a stereo WAV), to 0.001 LU / dB: each group has
// its own K-weighting, gating, true peak and fold-down. (The expected
// values are the separate files' measurements: the same engine run on
// the same samples, so the only admissible difference is none; 0.001 is
// the tolerance.)
func TestGroupsReadLikeSeparateFiles(t *testing.T) {
	v := programmeAudio(12, 8, 1)
	eight := writeTemp(t, "eight.wav", wavBytes(8, 24, false, 0, v))
	surround := writeTemp(t, "main.wav", wavBytes(6, 24, false, 0x3F, pickChannels(v, 8, 0, 6)))
	stereo := writeTemp(t, "stereo.wav", wavBytes(2, 24, false, 0, pickChannels(v, 8, 6, 8)))

	groups, each, err := measure.ParseGroups("main=1-6:5.1,stereo=7-8:stereo")
	if err != nil || each {
		t.Fatal(err)
	}
	ctx := context.Background()
	m := measure.File(ctx, eight, measure.Options{Groups: groups})
	if m.Error != "" || len(m.Groups) != 2 {
		t.Fatalf("error %q, %d groups", m.Error, len(m.Groups))
	}
	for i, path := range []string{surround, stereo} {
		want := measure.File(ctx, path, measure.Options{})
		got := m.Groups[i]
		t.Logf("%s: %.3f LUFS, LRA %.3f, TP %.3f", got.Name, *got.IntegratedLUFS, *got.LoudnessRangeLU, *got.TruePeakDBTP)
		const tol = 0.001
		if !same(got.IntegratedLUFS, want.IntegratedLUFS, tol) || !same(got.LoudnessRangeLU, want.LoudnessRangeLU, tol) ||
			!same(got.TruePeakDBTP, want.TruePeakDBTP, tol) || !same(got.MaxMomentaryLUFS, want.MaxMomentaryLUFS, tol) ||
			!same(got.MaxShortTermLUFS, want.MaxShortTermLUFS, tol) || !same(got.SamplePeakDBFS, want.SamplePeakDBFS, tol) {
			t.Errorf("group %s: %+v\nseparate file: %+v", got.Name, got.Measurement, *want)
		}
		if (got.StereoDownmix == nil) != (want.StereoDownmix == nil) ||
			got.StereoDownmix != nil && !same(got.StereoDownmix.IntegratedLUFS, want.StereoDownmix.IntegratedLUFS, tol) {
			t.Errorf("group %s: fold-down %+v, separate file %+v", got.Name, got.StereoDownmix, want.StereoDownmix)
		}
		if !slices.Equal(got.ChannelLayout, want.ChannelLayout) || got.Measurement.Channels != want.Channels {
			t.Errorf("group %s: layout %v, want %v", got.Name, got.ChannelLayout, want.ChannelLayout)
		}
	}
	if got := m.Groups[1].Channels; !slices.Equal(got, []int{7, 8}) {
		t.Errorf("stereo group channels %v", got)
	}
	// The whole file measured as 7.1 gives a third, different figure.
	if same(m.IntegratedLUFS, m.Groups[0].IntegratedLUFS, 0.1) {
		t.Errorf("the 8-channel figure %.2f equals the 5.1 group's", *m.IntegratedLUFS)
	}

	// --groups each: every channel measured as mono.
	m = measure.File(ctx, stereo, measure.Options{EachChannel: true})
	if len(m.Groups) != 2 || m.Groups[0].Name != "1 L" || m.Groups[1].Name != "2 R" {
		t.Fatalf("each: %d groups", len(m.Groups))
	}
	for c, g := range m.Groups {
		mono := measure.File(ctx, writeTemp(t, "mono.wav", wavBytes(1, 24, false, 0, pickChannels(v, 8, 6+c, 7+c))), measure.Options{})
		if !same(g.IntegratedLUFS, mono.IntegratedLUFS, 0.001) || !same(g.TruePeakDBTP, mono.TruePeakDBTP, 0.001) {
			t.Errorf("each: channel %d reads %v, mono file %v", c+1, *g.IntegratedLUFS, *mono.IntegratedLUFS)
		}
	}

	// A group beyond the file's channels is the file's error.
	bad, _, _ := measure.ParseGroups("x=3-4")
	if m := measure.File(ctx, stereo, measure.Options{Groups: bad}); m.Error == "" {
		t.Error("group on channels 3-4 of a stereo file accepted")
	}
}

// TestParseGroups: the --groups syntax and its errors.
func TestParseGroups(t *testing.T) {
	g, each, err := measure.ParseGroups("main=1-6:5.1, stereo=7-8:stereo ,me=9+11")
	if err != nil || each || len(g) != 3 || !slices.Equal(g[0].Channels, []int{1, 2, 3, 4, 5, 6}) ||
		!slices.Equal(g[2].Channels, []int{9, 11}) || g[2].Layout != nil || len(g[1].Layout) != 2 {
		t.Fatalf("%+v %v %v", g, each, err)
	}
	if _, each, err := measure.ParseGroups("each"); !each || err != nil {
		t.Error("each")
	}
	for _, bad := range []string{"", "main", "=1-2", "a=0-2", "a=3-1", "a=1-2,a=3-4", "a=1-2:5.1", "a=x", "a=1-2:bogus", "a=1,1"} {
		if _, _, err := measure.ParseGroups(bad); err == nil {
			t.Errorf("ParseGroups(%q) accepted", bad)
		}
	}
}

// TestParseStreamGroups: the stream forms of the --groups syntax (sN,
// sA-B, sA+B, sN/CHANNELS) and their errors, beside the channel forms.
// Expected values: the syntax as ParseGroups documents it.
func TestParseStreamGroups(t *testing.T) {
	for _, c := range []struct {
		in       string
		streams  []int
		channels []int
		layout   int
	}{
		{"main=s1:5.1", []int{1}, nil, 6},
		{"stereo=s1-2:stereo", []int{1, 2}, nil, 2},
		{"pair=s3+5", []int{3, 5}, nil, 0},
		{"lr=s2/1-2:stereo", []int{2}, []int{1, 2}, 2},
		{"dx=s4/1+3", []int{4}, []int{1, 3}, 0},
		{" ch = 7-8 ", nil, []int{7, 8}, 0},
	} {
		g, _, err := measure.ParseGroups(c.in)
		if err != nil || len(g) != 1 || !slices.Equal(g[0].Streams, c.streams) || !slices.Equal(g[0].Channels, c.channels) || len(g[0].Layout) != c.layout {
			t.Errorf("ParseGroups(%q) = %+v, %v", c.in, g, err)
		}
	}
	g, _, err := measure.ParseGroups("main=s1:5.1,stereo=s2:stereo,me=9-10")
	if err != nil || len(g) != 3 || g[2].Streams != nil {
		t.Errorf("mixed: %+v %v", g, err)
	}
	for _, bad := range []string{"a=s", "a=s0", "a=sx", "a=s2-1", "a=s1+1", "a=s1-2/1", "a=s2/", "a=s2/0", "a=s2/1-2:5.1", "a=s/1"} {
		if _, _, err := measure.ParseGroups(bad); err == nil {
			t.Errorf("ParseGroups(%q) accepted", bad)
		}
	}
}

// FuzzParseGroups: no input panics; accepted groups have channels (or
// streams) from 1, layouts that fit, and channels within a stream only
// for one stream.
func FuzzParseGroups(f *testing.F) {
	for _, s := range []string{"main=1-6:5.1,stereo=7-8:stereo", "each", "a=1+3", "x=1-2:L,R", "=,", "a=9999999999999999999",
		"main=s1:5.1,stereo=s2:stereo", "a=s1-2", "b=s2/1+3:stereo", "c=s/", "d=s1-2/1"} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, s string) {
		groups, _, err := measure.ParseGroups(s)
		if err != nil {
			return
		}
		for _, g := range groups {
			if g.Streams == nil && len(g.Channels) == 0 || g.Channels != nil && g.Layout != nil && len(g.Layout) != len(g.Channels) ||
				len(g.Streams) > 1 && g.Channels != nil {
				t.Fatalf("%q: %+v", s, g)
			}
			for _, c := range append(slices.Clone(g.Channels), g.Streams...) {
				if c < 1 {
					t.Fatalf("%q: channel or stream %d", s, c)
				}
			}
		}
	})
}
