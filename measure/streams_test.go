package measure_test

import (
	"context"
	"os"
	"os/exec"
	"path/filepath"
	"slices"
	"strconv"
	"strings"
	"testing"

	_ "github.com/kweigh/kweigh/decode/formats"
	"github.com/kweigh/kweigh/measure"
)

// remux runs ffmpeg (as a muxer only: codecs and maps, never a filter) to
// put the given WAV files into one container, each as its own audio
// stream of 24-bit PCM. .ci/setup installs ffmpeg.
func remux(t *testing.T, out string, inputs ...string) string {
	t.Helper()
	ffmpeg, err := exec.LookPath("ffmpeg")
	if err != nil {
		t.Fatalf("this test needs ffmpeg (run bash .ci/setup): %v", err)
	}
	args := []string{"-nostdin", "-hide_banner", "-v", "error", "-y"}
	for _, in := range inputs {
		args = append(args, "-i", in)
	}
	for i := range inputs {
		args = append(args, "-map", strconv.Itoa(i)+":a")
	}
	args = append(args, "-c:a", "pcm_s24le", out)
	if b, err := exec.Command(ffmpeg, args...).CombinedOutput(); err != nil {
		t.Fatalf("ffmpeg %v: %v\n%s", args, err, b)
	}
	return out
}

func writeFile(t *testing.T, path string, data []byte) {
	t.Helper()
	if err := os.WriteFile(path, data, 0o644); err != nil {
		t.Fatal(err)
	}
}

// TestStreamGroupsReadLikeSeparateFiles: a MOV and a Matroska file
// carrying a 5.1 stream and a stereo stream, measured with groups named
// by stream, give for each group the figures of the same audio in a WAV
// of its own, to 0.001 LU / dB. The expected values are those separate
// files measured by the same engine (24-bit PCM re-wrapped losslessly, so
// the samples are the same and the only admissible difference is none;
// 0.001 is the tolerance).
func TestStreamGroupsReadLikeSeparateFiles(t *testing.T) {
	dir := t.TempDir()
	v := programmeAudio(8, 8, 5)
	surround := filepath.Join(dir, "main.wav")
	stereo := filepath.Join(dir, "stereo.wav")
	writeFile(t, surround, wavBytes(6, 24, false, 0x3F, pickChannels(v, 8, 0, 6)))
	writeFile(t, stereo, wavBytes(2, 24, false, 0x3, pickChannels(v, 8, 6, 8)))
	mono := filepath.Join(dir, "right.wav")
	writeFile(t, mono, wavBytes(1, 24, false, 0, pickChannels(v, 8, 7, 8)))
	ctx := context.Background()
	want := map[string]*measure.Measurement{
		"main": measure.File(ctx, surround, measure.Options{}), "stereo": measure.File(ctx, stereo, measure.Options{}),
		"right": measure.File(ctx, mono, measure.Options{}),
	}
	const tol = 0.001
	for _, container := range []string{"mov", "mkv"} {
		path := remux(t, filepath.Join(dir, "delivery."+container), surround, stereo)
		for _, spec := range []string{"main=s1:5.1,stereo=s2:stereo,right=s2/2:M", "main=s1,stereo=s2,right=s2/2"} {
			groups, _, err := measure.ParseGroups(spec)
			if err != nil {
				t.Fatal(err)
			}
			m := measure.File(ctx, path, measure.Options{Groups: groups})
			if m.Error != "" || len(m.Groups) != 3 {
				t.Fatalf("%s %s: error %q, %d groups", container, spec, m.Error, len(m.Groups))
			}
			for _, g := range m.Groups {
				w := want[g.Name]
				if !same(g.IntegratedLUFS, w.IntegratedLUFS, tol) || !same(g.LoudnessRangeLU, w.LoudnessRangeLU, tol) ||
					!same(g.TruePeakDBTP, w.TruePeakDBTP, tol) || !same(g.MaxMomentaryLUFS, w.MaxMomentaryLUFS, tol) ||
					!same(g.MaxShortTermLUFS, w.MaxShortTermLUFS, tol) || !same(g.SamplePeakDBFS, w.SamplePeakDBFS, tol) {
					t.Errorf("%s %s: group %s: %+v\nseparate file: %+v", container, spec, g.Name, g.Measurement, *w)
				}
				if !slices.Equal(g.ChannelLayout, w.ChannelLayout) {
					t.Errorf("%s %s: group %s: layout %v, separate file %v", container, spec, g.Name, g.ChannelLayout, w.ChannelLayout)
				}
				if (g.StereoDownmix == nil) != (w.StereoDownmix == nil) ||
					g.StereoDownmix != nil && !same(g.StereoDownmix.IntegratedLUFS, w.StereoDownmix.IntegratedLUFS, tol) {
					t.Errorf("%s: group %s: fold-down %+v, separate file %+v", container, g.Name, g.StereoDownmix, w.StereoDownmix)
				}
			}
			// Without a group layout, a whole stream takes the stream's own
			// where the container declares one (MOV does; Matroska's PCM
			// tracks do not, so the layout goes by channel count).
			wantSource := "group"
			if !strings.Contains(spec, ":") {
				wantSource = map[string]string{"mov": "file", "mkv": "default"}[container]
			}
			if m.Groups[0].LayoutSource != wantSource {
				t.Errorf("%s %s: main's layout source %q, want %q", container, spec, m.Groups[0].LayoutSource, wantSource)
			}
			if !slices.Equal(m.Groups[1].Channels, []int{7, 8}) || !slices.Equal(m.Groups[1].Streams, []int{2}) ||
				!slices.Equal(m.Groups[2].Channels, []int{8}) {
				t.Errorf("%s: stereo group on channels %v (streams %v), right on %v", container, m.Groups[1].Channels, m.Groups[1].Streams, m.Groups[2].Channels)
			}
		}

		// No groups: today's behaviour, both streams as the 8 channels of
		// one measurement.
		m := measure.File(ctx, path, measure.Options{})
		if m.Error != "" || m.Channels != 8 || len(m.Groups) != 0 {
			t.Errorf("%s without groups: error %q, %d channels, %d groups", container, m.Error, m.Channels, len(m.Groups))
		}

		// A stream or a channel the file lacks is the file's error, naming
		// the file and the stream.
		for _, bad := range []struct{ groups, want string }{
			{"x=s3", "names audio stream 3 but the file has 2 audio stream(s)"},
			{"x=s2/3", "names channel 3 of audio stream 2 but that stream has 2 channel(s)"},
			{"x=s1-2:5.1", "has 8 channels but its layout"},
		} {
			groups, _, err := measure.ParseGroups(bad.groups)
			if err != nil {
				t.Fatal(err)
			}
			m := measure.File(ctx, path, measure.Options{Groups: groups})
			if !strings.Contains(m.Error, bad.want) || !strings.Contains(m.Error, path) {
				t.Errorf("%s %s: error %q, want the file and %q", container, bad.groups, m.Error, bad.want)
			}
		}
	}

	// A file of one stream is stream 1: the group is the whole file.
	groups, _, _ := measure.ParseGroups("all=s1")
	m := measure.File(ctx, surround, measure.Options{Groups: groups})
	if m.Error != "" || len(m.Groups) != 1 || !same(m.Groups[0].IntegratedLUFS, want["main"].IntegratedLUFS, tol) ||
		!slices.Equal(m.Groups[0].ChannelLayout, want["main"].ChannelLayout) {
		t.Errorf("WAV as stream 1: %q %+v", m.Error, m.Groups)
	}
	groups, _, _ = measure.ParseGroups("x=s2")
	if m := measure.File(ctx, surround, measure.Options{Groups: groups}); !strings.Contains(m.Error, "has 1 audio stream(s)") {
		t.Errorf("WAV with stream 2: %q", m.Error)
	}
}
