package flac

import (
	"fmt"
	"path/filepath"
	"testing"

	"github.com/kweigh/kweigh/decode"
	_ "github.com/kweigh/kweigh/decode/wav"
	"github.com/kweigh/kweigh/internal/audiotest"
	"github.com/kweigh/kweigh/loudness"
)

func measure(t *testing.T, samples []float64, rate int, layout []string) loudness.Result {
	t.Helper()
	weights, err := loudness.Weights(layout)
	if err != nil {
		t.Fatal(err)
	}
	m, err := loudness.NewMeter(rate, weights)
	if err != nil {
		t.Fatal(err)
	}
	// Feed in uneven pieces so block boundaries differ from the decoders'.
	for len(samples) > 0 {
		k := min(len(samples), 1237*len(layout))
		m.Write(samples[:k])
		samples = samples[k:]
	}
	return m.Result()
}

// TestMeasurementsEqualWAV decodes each FLAC fixture and the WAV it was
// encoded from with kweigh's own readers (decode/flac, decode/wav), checks
// the samples are identical, and measures both with the loudness engine:
// every figure must be identical too (exactly, not within a tolerance: the
// issue's requirement for a lossless format).
func TestMeasurementsEqualWAV(t *testing.T) {
	for _, tc := range sourceFixtures {
		t.Run(tc.flac, func(t *testing.T) {
			fs, finfo := audiotest.DecodeFile(t, filepath.Join("testdata", tc.flac))
			ws, winfo := audiotest.DecodeFile(t, filepath.Join("testdata", tc.wav))
			if len(fs) != len(ws) {
				t.Fatalf("FLAC %d samples, WAV %d", len(fs), len(ws))
			}
			for i := range fs {
				if fs[i] != ws[i] {
					t.Fatalf("sample %d: FLAC %v, WAV %v", i, fs[i], ws[i])
				}
			}
			layout := finfo.Layout
			wlayout := winfo.Layout
			if wlayout == nil {
				wlayout = decode.DefaultLayout(winfo.Channels)
			}
			if fmt.Sprint(layout) != fmt.Sprint(wlayout) {
				t.Errorf("layouts differ: FLAC %v, WAV %v", layout, wlayout)
			}
			fr := measure(t, fs, finfo.SampleRate, layout)
			wr := measure(t, ws, winfo.SampleRate, wlayout)
			// %#v prints every float in its shortest exact form (and NaN
			// as NaN, which reflect.DeepEqual would call unequal).
			if f, w := fmt.Sprintf("%#v", fr), fmt.Sprintf("%#v", wr); f != w {
				t.Errorf("results differ:\nFLAC %s\nWAV  %s", f, w)
			}
			if !fr.Integrated.Defined {
				t.Logf("integrated loudness undefined for this short fixture: %s", fr.Integrated.Why)
			}
		})
	}
}

func TestSurroundWeights(t *testing.T) {
	// BS.1770-4/5 channel weights (SOURCES.md §1, from memory,
	// surround weight corroborated by EBU Tech 3341 test 6): L, R, C 1.0;
	// LFE excluded; Ls, Rs 1.41. Tolerance 0: the weights are constants.
	_, info := audiotest.DecodeFile(t, filepath.Join("testdata", "surround51-16-44k.flac"))
	weights, err := loudness.Weights(info.Layout)
	if err != nil {
		t.Fatal(err)
	}
	want := []float64{1, 1, 1, 0, 1.41, 1.41}
	if fmt.Sprint(weights) != fmt.Sprint(want) {
		t.Errorf("5.1 FLAC weights %v, want %v", weights, want)
	}
}
