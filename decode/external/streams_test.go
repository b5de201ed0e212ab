package external_test

import (
	"fmt"
	"testing"

	"github.com/kweigh/kweigh/decode"
)

// TestInfoStreams: the bridge describes each audio stream it delivers
// (number, first channel, channel count, layout, codec) in Info.Streams, in
// the order of the measurement's channels; with --stream N the one stream
// keeps its number N. Expected values: the streams the fixtures were muxed
// with (ffmpeg -map, one stream per input).
func TestInfoStreams(t *testing.T) {
	f := fixtures(t)
	surroundStereo := f.make(t, "six-stereo.mkv", "-i", f.six, "-i", f.stereo, "-map", "0:a", "-map", "1:a", "-c:a", "pcm_s24le")
	movSurroundStereo := f.make(t, "six-stereo.mov", "-i", f.six, "-i", f.stereo, "-map", "0:a", "-map", "1:a", "-c:a", "pcm_s24le")
	var eight []string
	for i := range 8 {
		eight = append(eight, fmt.Sprintf("%d@%d×1 M pcm_s24le", i+1, i+1))
	}
	for _, c := range []struct {
		name, file string
		stream     int
		want       []string
	}{
		// Matroska's PCM tracks carry no channel layout (ffprobe names
		// none), so the streams' layouts are unknown ([]).
		{"5.1 + stereo in Matroska", surroundStereo, 0, []string{"1@1×6 [] pcm_s24le", "2@7×2 [] pcm_s24le"}},
		{"--stream 2 of it", surroundStereo, 2, []string{"2@1×2 [] pcm_s24le"}},
		{"5.1 + stereo in MOV", movSurroundStereo, 0, []string{"1@1×6 [L R C LFE Ls Rs] pcm_s24le", "2@7×2 [L R] pcm_s24le"}},
		{"--stream 1 of it", movSurroundStereo, 1, []string{"1@1×6 [L R C LFE Ls Rs] pcm_s24le"}},
		{"8 mono tracks in MXF", f.mxf8(t), 0, eight},
		{"one stream in MOV", f.make(t, "pcm.mov", "-i", f.stereo, "-c:a", "pcm_s24le"), 0, []string{"1@1×2 [L R] pcm_s24le"}},
	} {
		t.Run(c.name, func(t *testing.T) {
			info, _, err := readAll(t, c.file, decode.Options{Stream: c.stream})
			if err != nil {
				t.Fatal(err)
			}
			var got []string
			for _, s := range info.Streams {
				l := fmt.Sprint(s.Layout)
				if len(s.Layout) == 1 {
					l = s.Layout[0]
				}
				got = append(got, fmt.Sprintf("%d@%d×%d %s %s", s.Index, s.FirstChannel, s.Channels, l, s.Codec))
			}
			if fmt.Sprint(got) != fmt.Sprint(c.want) {
				t.Errorf("streams %q, want %q", got, c.want)
			}
		})
	}
	noChildren(t)
}
