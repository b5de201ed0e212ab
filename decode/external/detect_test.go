package external_test

import (
	"bytes"
	"os"
	"testing"

	"github.com/kweigh/kweigh/decode/external"
)

// TestDetect: every container the bridge reads is recognised from its
// content (fixtures encoded by ffmpeg), and what kweigh decodes itself, or
// nothing at all, is not claimed.
func TestDetect(t *testing.T) {
	f := fixtures(t)
	cases := []struct {
		file string
		want external.Kind
	}{
		{f.make(t, "alac.m4a", "-i", f.stereo, "-c:a", "alac"), external.MP4},
		{f.make(t, "fast.m4a", "-i", f.stereo, "-c:a", "aac", "-aac_pns", "0", "-movflags", "+faststart"), external.MP4},
		{f.make(t, "pcm.mov", "-i", f.stereo, "-c:a", "pcm_s24le"), external.MOV},
		{f.mxf8(t), external.MXF},
		{f.make(t, "aac.aac", "-i", f.stereo, "-c:a", "aac", "-aac_pns", "0", "-b:a", "192k"), external.ADTS},
		{f.make(t, "six.ac3", "-i", f.six, "-c:a", "ac3", "-b:a", "448k"), external.AC3},
		{f.make(t, "six.eac3", "-i", f.six, "-c:a", "eac3"), external.EAC3},
		{f.make(t, "vorbis.ogg", "-i", f.stereo, "-c:a", "libvorbis", "-q:a", "6"), external.Vorbis},
		{f.make(t, "six.mka", "-i", f.six, "-c:a", "flac"), external.Matroska},
		{f.make(t, "opus.ogg", "-i", f.stereo, "-c:a", "libopus"), ""}, // decode/opus reads it
		{f.make(t, "s.flac", "-i", f.stereo, "-c:a", "flac"), ""},
		{f.make(t, "s.mp3", "-i", f.stereo, "-c:a", "libmp3lame"), ""},
		{f.stereo, ""},
	}
	for _, tc := range cases {
		b, err := os.ReadFile(tc.file)
		if err != nil {
			t.Fatal(err)
		}
		if got := external.Detect(bytes.NewReader(b), int64(len(b))); got != tc.want {
			t.Errorf("%s: detected %q, want %q", tc.file, got, tc.want)
		}
	}
	for _, b := range [][]byte{nil, []byte("OggS"), bytes.Repeat([]byte{0x0B, 0x77}, 3), {0xFF, 0xF1, 0x50, 0x80, 0x00, 0x1F, 0xFC}, make([]byte, 70000)} {
		if got := external.Detect(bytes.NewReader(b), int64(len(b))); got != "" {
			t.Errorf("% x…: detected %q", b[:min(len(b), 8)], got)
		}
	}
}
