package audiotest_test

import (
	"os"
	"path/filepath"
	"strings"
	"testing"

	gawav "github.com/go-audio/wav"

	"github.com/kweigh/kweigh/internal/audiotest"
)

// Fixtures of other packages, made by sox from their make-fixtures.sh; the
// expected format of each is the parameters the script gave sox.
var wavFixtures = []struct {
	path                 string
	rate, channels, bits int
	frames               int
}{
	{"../../decode/aiff/testdata/stereo16-44k.wav", 44100, 2, 16, 8820},       // 0.2 s
	{"../../decode/aiff/testdata/mono24-48k.wav", 48000, 1, 24, 9600},         // 0.2 s
	{"../../decode/flac/testdata/mono8-8k.wav", 8000, 1, 8, 4000},             // 0.5 s
	{"../../decode/flac/testdata/stereo24-48k.wav", 48000, 2, 24, 28800},      // 0.6 s
	{"../../decode/flac/testdata/surround51-16-44k.wav", 44100, 6, 16, 22050}, // 0.5 s, WAVE_FORMAT_EXTENSIBLE
}

// TestReadSourceWAVAgreesWithGoAudio cross-checks ReadSourceWAV against
// github.com/go-audio/wav, a general-purpose WAV reader, on real files:
// every integer sample must be identical (tolerance 0). go-audio/wav
// returns 8-bit samples unsigned, as the file stores them (Microsoft RIFF:
// 8-bit PCM is unsigned, 128 is silence), so they are compared less 128.
func TestReadSourceWAVAgreesWithGoAudio(t *testing.T) {
	for _, tc := range wavFixtures {
		t.Run(filepath.Base(tc.path), func(t *testing.T) {
			got, err := audiotest.ReadSourceWAV(tc.path)
			if err != nil {
				t.Fatal(err)
			}
			if got.Rate != tc.rate || got.Channels != tc.channels || got.Bits != tc.bits || len(got.Samples) != tc.frames*tc.channels {
				t.Errorf("%d Hz, %d ch, %d bits, %d samples; want %d, %d, %d, %d",
					got.Rate, got.Channels, got.Bits, len(got.Samples), tc.rate, tc.channels, tc.bits, tc.frames*tc.channels)
			}
			f, err := os.Open(tc.path)
			if err != nil {
				t.Fatal(err)
			}
			defer f.Close()
			ref, err := gawav.NewDecoder(f).FullPCMBuffer()
			if err != nil {
				t.Fatalf("go-audio/wav: %v", err)
			}
			if len(ref.Data) != len(got.Samples) {
				t.Fatalf("%d samples, go-audio/wav %d", len(got.Samples), len(ref.Data))
			}
			offset := 0
			if tc.bits == 8 {
				offset = 128
			}
			for i, v := range ref.Data {
				if int(got.Samples[i]) != v-offset {
					t.Fatalf("sample %d = %d, go-audio/wav %d", i, got.Samples[i], v-offset)
				}
			}
		})
	}
}

func TestScaled(t *testing.T) {
	// value / 2^(bits-1): integer full scale maps to ±1.0, the convention
	// package decode documents for every decoder (decode/decode.go).
	for _, tc := range []struct {
		bits    int
		samples []int32
		want    []float64
	}{
		{8, []int32{-128, 0, 64, 127}, []float64{-1, 0, 0.5, 127.0 / 128}},
		{16, []int32{-32768, 16384, 32767}, []float64{-1, 0.5, 32767.0 / 32768}},
		{24, []int32{-8388608, -4194304}, []float64{-1, -0.5}},
	} {
		w := audiotest.SourceWAV{Bits: tc.bits, Samples: tc.samples}
		got := w.Scaled()
		for i := range tc.want {
			if got[i] != tc.want[i] { // tolerance 0: powers of two are exact
				t.Errorf("%d-bit %d scaled to %v, want %v", tc.bits, tc.samples[i], got[i], tc.want[i])
			}
		}
	}
}

func TestReadSourceWAVBadInput(t *testing.T) {
	dir := t.TempDir()
	fmtChunk := "fmt \x10\x00\x00\x00\x01\x00\x01\x00\x40\x1f\x00\x00\x80\x3e\x00\x00\x02\x00\x10\x00"
	for _, tc := range []struct{ name, content, says string }{
		{"empty", "", "not RIFF/WAVE"},
		{"aiff", "FORM\x00\x00\x00\x04AIFF", "not RIFF/WAVE"},
		{"short fmt", "RIFF\x00\x00\x00\x00WAVEfmt \x04\x00\x00\x00\x01\x00\x01\x00", "fmt chunk of 4 bytes"},
		{"data before fmt", "RIFF\x00\x00\x00\x00WAVEdata\x02\x00\x00\x00\x01\x02", "no fmt chunk before it"},
		{"no data", "RIFF\x00\x00\x00\x00WAVE" + fmtChunk, "no data chunk"},
	} {
		path := filepath.Join(dir, tc.name+".wav")
		if err := os.WriteFile(path, []byte(tc.content), 0o644); err != nil {
			t.Fatal(err)
		}
		_, err := audiotest.ReadSourceWAV(path)
		if err == nil || !strings.Contains(err.Error(), path) || !strings.Contains(err.Error(), tc.says) {
			t.Errorf("%s: err = %v, want one naming the file and saying %q", tc.name, err, tc.says)
		}
	}
}
