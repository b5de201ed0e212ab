package aiff

import (
	"fmt"
	"path/filepath"
	"testing"

	"github.com/kweigh/kweigh/decode"
	_ "github.com/kweigh/kweigh/decode/wav"
	"github.com/kweigh/kweigh/internal/audiotest"
	"github.com/kweigh/kweigh/loudness"
)

// TestEqualToWAVReader decodes each sox-made AIFF/AIFF-C fixture and its
// source WAV with kweigh's own readers (decode/aiff, decode/wav): the
// samples and every loudness figure must be identical (tolerance 0).
func TestEqualToWAVReader(t *testing.T) {
	for _, tc := range []struct{ aiff, wav string }{
		{"stereo16-44k.aiff", "stereo16-44k.wav"},
		{"stereo16-44k.aifc", "stereo16-44k.wav"},
		{"stereo16-44k-fl32.aifc", "stereo16-44k.wav"},
		{"mono24-48k.aiff", "mono24-48k.wav"},
	} {
		t.Run(tc.aiff, func(t *testing.T) {
			as, ainfo := audiotest.DecodeFile(t, filepath.Join("testdata", tc.aiff))
			ws, winfo := audiotest.DecodeFile(t, filepath.Join("testdata", tc.wav))
			if fmt.Sprint(as) != fmt.Sprint(ws) {
				t.Fatalf("samples differ (%d vs %d)", len(as), len(ws))
			}
			if ainfo.SampleRate != winfo.SampleRate || ainfo.Channels != winfo.Channels {
				t.Fatalf("AIFF %d Hz %d ch, WAV %d Hz %d ch", ainfo.SampleRate, ainfo.Channels, winfo.SampleRate, winfo.Channels)
			}
			layout := decode.DefaultLayout(ainfo.Channels)
			weights, err := loudness.Weights(layout)
			if err != nil {
				t.Fatal(err)
			}
			var results [2]string
			for i, s := range [][]float64{as, ws} {
				m, err := loudness.NewMeter(ainfo.SampleRate, weights)
				if err != nil {
					t.Fatal(err)
				}
				m.Write(s)
				results[i] = fmt.Sprintf("%#v", m.Result())
			}
			if results[0] != results[1] {
				t.Errorf("results differ:\nAIFF %s\nWAV  %s", results[0], results[1])
			}
		})
	}
}
