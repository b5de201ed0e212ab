package flac

import (
	"bytes"
	"path/filepath"
	"reflect"
	"testing"

	"github.com/kweigh/kweigh/decode"
	"github.com/kweigh/kweigh/internal/audiotest"
)

// The expected stream properties are the parameters make-fixtures.sh gave
// sox (rate, bits, channels, seconds × rate); the expected samples are the
// source WAV's, read by audiotest.ReadSourceWAV.
var sourceFixtures = []struct {
	flac, wav            string
	rate, channels, bits int
	frames               int64
	layout               []string
}{
	{"mono16-44k.flac", "mono16-44k.wav", 44100, 1, 16, 66150, []string{"M"}},
	{"stereo24-48k.flac", "stereo24-48k.wav", 48000, 2, 24, 28800, []string{"L", "R"}},
	{"surround51-16-44k.flac", "surround51-16-44k.wav", 44100, 6, 16, 22050, []string{"L", "R", "C", "LFE", "Ls", "Rs"}},
	{"mono8-8k.flac", "mono8-8k.wav", 8000, 1, 8, 4000, []string{"M"}},
	{"mono16-24k.flac", "mono16-24k.wav", 24000, 1, 16, 4800, []string{"M"}},
}

func TestDecodeEqualsSourceWAV(t *testing.T) {
	for _, tc := range sourceFixtures {
		t.Run(tc.flac, func(t *testing.T) {
			src := audiotest.FixtureWAV(t, tc.wav)
			data := audiotest.Fixture(t, tc.flac)
			// 4097 frames: not a multiple of any FLAC block size, so
			// deliveries straddle frame boundaries.
			got, err, d := decodeAll(t, data, DefaultOptions(), 4097)
			if err != nil {
				t.Fatalf("decode: %v", err)
			}
			info := d.Info()
			if info.SampleRate != tc.rate || info.Channels != tc.channels || info.BitsPerSample != tc.bits || info.Frames != tc.frames {
				t.Errorf("info = %d Hz, %d ch, %d bits, %d frames; want %d, %d, %d, %d",
					info.SampleRate, info.Channels, info.BitsPerSample, info.Frames, tc.rate, tc.channels, tc.bits, tc.frames)
			}
			if info.Container != "flac" || info.Codec != "flac" || info.SampleFormat != decode.Int {
				t.Errorf("container/codec/format = %q/%q/%q", info.Container, info.Codec, info.SampleFormat)
			}
			if !reflect.DeepEqual(info.Layout, tc.layout) {
				t.Errorf("layout = %v, want %v", info.Layout, tc.layout)
			}
			// Average bit rate: file size × 8 / duration (tolerance ±1
			// for rounding).
			wantRate := float64(len(data)*8) / (float64(tc.frames) / float64(tc.rate))
			if diff := float64(info.BitRate) - wantRate; diff > 1 || diff < -1 {
				t.Errorf("bit rate = %d, want %.1f", info.BitRate, wantRate)
			}
			if !d.MD5Verified() {
				t.Error("MD5 not verified on a clean file")
			}
			want := src.Scaled()
			if len(got) != len(want) {
				t.Fatalf("decoded %d samples, source WAV has %d", len(got), len(want))
			}
			// Exact equality, tolerance 0: FLAC is lossless.
			for i := range want {
				if got[i] != want[i] {
					t.Fatalf("sample %d (frame %d, channel %d) = %v, source WAV %v", i, i/tc.channels, i%tc.channels, got[i], want[i])
				}
			}
		})
	}
}

func TestReadSizesAgree(t *testing.T) {
	data := audiotest.Fixture(t, "stereo24-48k.flac")
	whole, err, _ := decodeAll(t, data, DefaultOptions(), 1<<16)
	if err != nil {
		t.Fatal(err)
	}
	for _, block := range []int{1, 2, 4095, 4096, 4097} {
		got, err, _ := decodeAll(t, data, DefaultOptions(), block)
		if err != nil {
			t.Fatalf("block %d: %v", block, err)
		}
		if !reflect.DeepEqual(got, whole) {
			t.Errorf("reading %d frames at a time gives different samples", block)
		}
	}
}

func TestDetectedThroughRegistry(t *testing.T) {
	for _, name := range []string{"mono16-44k.flac", "surround51-16-44k.flac"} {
		f, err := decode.Open(filepath.Join("testdata", name))
		if err != nil {
			t.Fatalf("%s: %v", name, err)
		}
		if c := f.Info().Container; c != "flac" {
			t.Errorf("%s: container %q", name, c)
		}
		f.Close()
	}
}

func TestID3v2Prefix(t *testing.T) {
	data := audiotest.Fixture(t, "mono8-8k.flac")
	// ID3v2.4 header (ID3v2.4 structure, section 3.1): "ID3", version 4.0,
	// flags 0, synchsafe size 20, then 20 bytes of padding.
	tag := append([]byte{'I', 'D', '3', 4, 0, 0, 0, 0, 0, 20}, make([]byte, 20)...)
	tagged := append(tag, data...)
	want, err, _ := decodeAll(t, data, DefaultOptions(), 1000)
	if err != nil {
		t.Fatal(err)
	}
	d, err := decode.New(bytes.NewReader(tagged))
	if err != nil {
		t.Fatalf("tagged file not detected: %v", err)
	}
	got := make([]float64, len(want)+10)
	n, _ := d.ReadFrames(got)
	if n != len(want) || !reflect.DeepEqual(got[:n], want) {
		t.Errorf("tagged file decodes to %d frames, want the %d of the untagged file", n, len(want))
	}
}

func TestMatch(t *testing.T) {
	tests := []struct {
		name string
		data []byte
		want bool
	}{
		{"flac", audiotest.Fixture(t, "mono8-8k.flac"), true},
		{"wav", audiotest.Fixture(t, "mono8-8k.wav"), false},
		{"empty", nil, false},
		{"short", []byte("fLa"), false},
		{"id3 without flac", append([]byte{'I', 'D', '3', 4, 0, 0, 0, 0, 0, 4}, "RIFFxxxxWAVE"...), false},
		{"id3 size past end", []byte{'I', 'D', '3', 4, 0, 0, 0x7f, 0x7f, 0x7f, 0x7f}, false},
	}
	for _, tc := range tests {
		if got := match(bytes.NewReader(tc.data), int64(len(tc.data))); got != tc.want {
			t.Errorf("%s: match = %v, want %v", tc.name, got, tc.want)
		}
	}
}

func TestThirtyTwoBitFixture(t *testing.T) {
	// mono32-48k.flac was written by flac 1.4.2 from a 32-bit WAV
	// (make-fixtures.sh); the MD5 in its STREAMINFO is the encoder's MD5 of
	// that WAV's samples, so a verified MD5 proves every sample exact.
	got, err, d := decodeAll(t, audiotest.Fixture(t, "mono32-48k.flac"), DefaultOptions(), 1000)
	if err != nil {
		t.Fatal(err)
	}
	if info := d.Info(); info.BitsPerSample != 32 || info.Frames != 2400 || len(got) != 2400 {
		t.Fatalf("info %+v, %d samples; want 32 bits, 2400 frames (0.05 s at 48 kHz)", info, len(got))
	}
	if !d.MD5Verified() {
		t.Error("MD5 not verified")
	}
}

func TestNotFLAC(t *testing.T) {
	data := audiotest.Fixture(t, "mono8-8k.wav")
	_, err := NewDecoder(bytes.NewReader(data), int64(len(data)), DefaultOptions())
	if !isFormat(err) {
		t.Fatalf("err = %v, want *decode.FormatError", err)
	}
}
