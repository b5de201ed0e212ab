package aiff

import (
	"path/filepath"
	"reflect"
	"strings"
	"testing"

	"github.com/kweigh/kweigh/decode"
	"github.com/kweigh/kweigh/internal/audiotest"
)

func TestSoxFixtures(t *testing.T) {
	// Each file was converted by sox from the WAV named beside it
	// (testdata/make-fixtures.sh); decoding must give the WAV's samples
	// exactly (tolerance 0). Rates, bits and lengths are the script's
	// parameters (0.2 s at 44.1 kHz = 8820 frames, at 48 kHz = 9600).
	tests := []struct {
		file, wav, container, codec string
		rate, channels, bits        int
		frames                      int64
	}{
		{"stereo16-44k.aiff", "stereo16-44k.wav", "aiff", "pcm", 44100, 2, 16, 8820},
		{"stereo16-44k.aifc", "stereo16-44k.wav", "aifc", "pcm", 44100, 2, 16, 8820},
		{"stereo16-44k-fl32.aifc", "stereo16-44k.wav", "aifc", "ieee-float", 44100, 2, 32, 8820},
		{"mono24-48k.aiff", "mono24-48k.wav", "aiff", "pcm", 48000, 1, 24, 9600},
	}
	for _, tc := range tests {
		t.Run(tc.file, func(t *testing.T) {
			got, err, d := decodeAll(t, audiotest.Fixture(t, tc.file), 1000)
			if err != nil {
				t.Fatal(err)
			}
			info := d.Info()
			if info.Container != tc.container || info.Codec != tc.codec || info.SampleRate != tc.rate ||
				info.Channels != tc.channels || info.BitsPerSample != tc.bits || info.Frames != tc.frames || info.Layout != nil {
				t.Errorf("info = %+v", info)
			}
			want := audiotest.FixtureWAV(t, tc.wav).Scaled()
			if !reflect.DeepEqual(got, want) {
				t.Errorf("samples differ from %s (%d vs %d samples)", tc.wav, len(got), len(want))
			}
		})
	}
}

func TestVariantsEqualWAV(t *testing.T) {
	// Every coding the package supports, written by buildAIFF from the
	// integer samples of a source WAV; each must decode to the WAV's
	// samples exactly (tolerance 0).
	st := audiotest.FixtureWAV(t, "stereo16-44k.wav")
	mono := audiotest.FixtureWAV(t, "mono24-48k.wav")
	shift := func(v []int32, by uint) []int32 {
		out := make([]int32, len(v))
		for i, x := range v {
			out[i] = x << by
		}
		return out
	}
	asFloat := func(w *audiotest.SourceWAV) []float64 { return w.Scaled() }
	to8 := make([]int32, len(st.Samples)) // 16-bit samples with the low byte dropped
	want8 := make([]float64, len(st.Samples))
	for i, v := range st.Samples {
		to8[i] = v >> 8
		want8[i] = float64(v>>8) / 128
	}
	// 12-bit samples, left-justified in 16 (AIFF 1.3, "Sample Points").
	left12 := make([]int32, len(st.Samples))
	want12 := make([]float64, len(st.Samples))
	for i, v := range st.Samples {
		left12[i] = v &^ 0xF
		want12[i] = float64(v>>4) / (1 << 11) // value / 2^(bits-1)
	}
	tests := []struct {
		name string
		spec aiffSpec
		want []float64
	}{
		{"AIFF 16", aiffSpec{channels: 2, bits: 16, rate: 44100, ints: st.Samples}, st.Scaled()},
		{"AIFF 24", aiffSpec{channels: 1, bits: 24, rate: 48000, ints: mono.Samples}, mono.Scaled()},
		{"AIFF 32", aiffSpec{channels: 1, bits: 32, rate: 48000, ints: shift(mono.Samples, 8)}, mono.Scaled()},
		{"AIFF 8", aiffSpec{channels: 2, bits: 8, rate: 44100, ints: to8}, want8},
		{"AIFF 12 left-justified", aiffSpec{channels: 2, bits: 12, rate: 44100, ints: left12}, want12},
		{"AIFC NONE 16", aiffSpec{aifc: true, channels: 2, bits: 16, rate: 44100, ints: st.Samples}, st.Scaled()},
		{"AIFC twos 24", aiffSpec{aifc: true, compression: "twos", channels: 1, bits: 24, rate: 48000, ints: mono.Samples}, mono.Scaled()},
		{"AIFC sowt 16", aiffSpec{aifc: true, compression: "sowt", channels: 2, bits: 16, rate: 44100, ints: st.Samples}, st.Scaled()},
		{"AIFC sowt 24", aiffSpec{aifc: true, compression: "sowt", channels: 1, bits: 24, rate: 48000, ints: mono.Samples}, mono.Scaled()},
		{"AIFC sowt 32", aiffSpec{aifc: true, compression: "sowt", channels: 1, bits: 32, rate: 48000, ints: shift(mono.Samples, 8)}, mono.Scaled()},
		{"AIFC sowt 8", aiffSpec{aifc: true, compression: "sowt", channels: 2, bits: 8, rate: 44100, ints: to8}, want8},
		{"AIFC fl32", aiffSpec{aifc: true, compression: "fl32", channels: 2, bits: 32, rate: 44100, floats: asFloat(st)}, st.Scaled()},
		{"AIFC FL32", aiffSpec{aifc: true, compression: "FL32", channels: 1, bits: 32, rate: 48000, floats: asFloat(mono)}, mono.Scaled()},
		{"AIFC fl64", aiffSpec{aifc: true, compression: "fl64", channels: 1, bits: 64, rate: 48000, floats: asFloat(mono)}, mono.Scaled()},
		{"AIFC FL64", aiffSpec{aifc: true, compression: "FL64", channels: 2, bits: 64, rate: 44100, floats: asFloat(st)}, st.Scaled()},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			tc.spec.commFrames, tc.spec.formSize = -1, -1
			got, err, d := decodeAll(t, buildAIFF(tc.spec), 777)
			if err != nil {
				t.Fatal(err)
			}
			if len(got) != len(tc.want) {
				t.Fatalf("%d samples, want %d", len(got), len(tc.want))
			}
			for i := range got {
				if got[i] != tc.want[i] {
					t.Fatalf("sample %d = %v, want %v", i, got[i], tc.want[i])
				}
			}
			if d.Info().BitsPerSample != tc.spec.bits {
				t.Errorf("BitsPerSample = %d, want %d", d.Info().BitsPerSample, tc.spec.bits)
			}
		})
	}
}

func TestStructureVariants(t *testing.T) {
	// Legal layouts a reader must accept (AIFF 1.3: chunks in any order,
	// padded to even length, unknown chunks skipped, SSND offset/blockSize,
	// FORM size of a file still being written).
	st := audiotest.FixtureWAV(t, "stereo16-44k.wav")
	base := func() aiffSpec {
		return aiffSpec{aifc: true, channels: 2, bits: 16, rate: 44100, ints: st.Samples, commFrames: -1, formSize: -1}
	}
	tests := []struct {
		name   string
		edit   func(*aiffSpec)
		frames int64 // Info.Frames
		n      int   // frames delivered
		note   string
	}{
		{"plain", func(*aiffSpec) {}, 8820, 8820, ""},
		{"SSND offset and block size", func(s *aiffSpec) { s.ssndOffset, s.blockSize = 13, 4096 }, 8820, 8820, ""},
		{"odd-sized unknown chunks first", func(s *aiffSpec) {
			s.chunksFirst = []rawChunk{{"NAME", []byte("odd")}, {"(c) ", []byte("Copperleaf Sound")}, {"APPL", nil}}
		}, 8820, 8820, ""},
		{"SSND before COMM", func(s *aiffSpec) { s.ssndFirst = true }, 8820, 8820, ""},
		{"FORM size larger than the file", func(s *aiffSpec) { s.formSize = 0x7FFFFFF0 }, 8820, 8820, ""},
		{"COMM declares fewer frames", func(s *aiffSpec) { s.commFrames = 8000 }, 8000, 8000, ""},
		{"COMM declares 0 frames", func(s *aiffSpec) { s.commFrames = 0 }, -1, 8820, "declares 0 sample frames"},
		{"rate 44100.5", func(s *aiffSpec) { s.rate = 44100.5 }, 8820, 8820, "rounded"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			s := base()
			tc.edit(&s)
			got, err, d := decodeAll(t, buildAIFF(s), 1024)
			if err != nil {
				t.Fatal(err)
			}
			if d.Info().Frames != tc.frames || len(got) != tc.n*2 {
				t.Errorf("Frames %d, delivered %d; want %d, %d", d.Info().Frames, len(got)/2, tc.frames, tc.n)
			}
			if !reflect.DeepEqual(got, st.Scaled()[:len(got)]) {
				t.Error("samples differ from the source")
			}
			notes := strings.Join(d.Notes(), "\n")
			if (tc.note == "") != (notes == "") || !strings.Contains(notes, tc.note) {
				t.Errorf("notes %q, want %q", notes, tc.note)
			}
		})
	}
}

func TestRegistry(t *testing.T) {
	for _, name := range []string{"stereo16-44k.aiff", "stereo16-44k.aifc"} {
		f, err := decode.Open(filepath.Join("testdata", name))
		if err != nil {
			t.Fatalf("%s: %v", name, err)
		}
		if c := f.Info().Container; c != strings.TrimPrefix(filepath.Ext(name), ".") {
			t.Errorf("%s: container %q", name, c)
		}
		f.Close()
	}
	wav := audiotest.Fixture(t, "stereo16-44k.wav")
	if match(strings.NewReader(string(wav)), int64(len(wav))) {
		t.Error("a WAV file matched as AIFF")
	}
}

func TestFORMSizeTooSmall(t *testing.T) {
	// A FORM size of 4 (only the form type) from a writer that never
	// updated it: the chunks after it are still found.
	st := audiotest.FixtureWAV(t, "stereo16-44k.wav")
	data := buildAIFF(aiffSpec{channels: 2, bits: 16, rate: 44100, ints: st.Samples, commFrames: -1, formSize: 4})
	got, err, _ := decodeAll(t, data, 1000)
	if err != nil || len(got) != len(st.Samples) {
		t.Fatalf("err %v, %d samples; want the %d of the file", err, len(got), len(st.Samples))
	}
}
