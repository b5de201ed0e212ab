package decode_test

import (
	"testing"

	"github.com/kweigh/kweigh/decode"
	_ "github.com/kweigh/kweigh/decode/formats"
)

// TestHasAudioExtension: the delivery extensions of the registered formats
// (issue 8's list: wav, bwf, rf64, w64, flac, mp3, aif, aiff, aifc), in any
// case; other names are not deliveries.
func TestHasAudioExtension(t *testing.T) {
	for _, name := range []string{"a.wav", "b.BWF", "c.rf64", "d.bw64", "e.w64", "f.flac", "g.Mp3", "h.aif", "i.aiff", "j.AIFC", "dir.d/k.wav",
		// issue 16: Opus natively, the rest through ffmpeg
		"l.opus", "m.m4a", "n.MP4", "o.mov", "p.mxf", "q.aac", "r.ac3", "s.ec3", "t.ogg", "u.mka", "v.webm"} {
		if !decode.HasAudioExtension(name) {
			t.Errorf("%s: want an audio name", name)
		}
	}
	for _, name := range []string{"notes.txt", "wav", "a.wav.txt", "cue", ".wav.d/readme", "kweigh.toml", "x.svg"} {
		if decode.HasAudioExtension(name) {
			t.Errorf("%s: not an audio name", name)
		}
	}
}
