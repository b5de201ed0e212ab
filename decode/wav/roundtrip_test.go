package wav_test

import (
	"bytes"
	"errors"
	"math"
	"math/rand/v2"
	"slices"
	"testing"

	"github.com/kweigh/kweigh/decode"
	"github.com/kweigh/kweigh/decode/wav"
	"github.com/kweigh/kweigh/internal/audiotest"
)

// open decodes an in-memory file with wav.New.
func open(t testing.TB, file []byte) decode.Decoder {
	t.Helper()
	d, err := wav.New(bytes.NewReader(file), int64(len(file)))
	if err != nil {
		t.Fatalf("New: %v", err)
	}
	return d
}

// testInts returns n samples of the given bit depth: the extremes first,
// then seeded random values.
func testInts(n, bits int) []int32 {
	lo, hi := int32(-1)<<(bits-1), int32(1)<<(bits-1)-1
	v := []int32{lo, hi, 0, -1, 1, lo + 1, hi - 1}
	rng := rand.New(rand.NewPCG(uint64(bits), 3285))
	for len(v) < n {
		v = append(v, lo+int32(rng.Int64N(int64(hi)-int64(lo)+1)))
	}
	return v[:n]
}

// sameBits reports whether two sample slices are identical bit for bit.
func sameBits(t *testing.T, got, want []float64) {
	t.Helper()
	if len(got) != len(want) {
		t.Fatalf("decoded %d samples, want %d", len(got), len(want))
	}
	for i := range want {
		if math.Float64bits(got[i]) != math.Float64bits(want[i]) {
			t.Fatalf("sample %d = %v (%#x), want %v (%#x)", i, got[i], math.Float64bits(got[i]), want[i], math.Float64bits(want[i]))
		}
	}
}

// TestIntegerRoundTrip writes integer PCM with the test writer and checks
// every decoded sample bit for bit. Expected value: sample / 2^(valid
// bits-1), so that negative full scale is exactly -1.0 (common practice,
// no published source; it is the mapping package decode documents). Sample
// layouts per Microsoft "Multiple Channel Audio Data and WAVE Files":
// 8-bit unsigned, wider signed little-endian, left-justified in the
// container.
func TestIntegerRoundTrip(t *testing.T) {
	tests := []struct {
		name                     string
		channels                 int
		containerBits, validBits int
		extensible               bool
		frames                   int
	}{
		{"8-bit unsigned mono", 1, 8, 8, false, 300},
		{"16-bit stereo", 2, 16, 16, false, 40000}, // > one 64 KiB read
		{"20-in-24 extensible stereo", 2, 24, 20, true, 1000},
		{"20-bit plain (3-byte container)", 1, 24, 20, false, 1000},
		{"24-bit stereo", 2, 24, 24, false, 30000},
		{"32-bit int stereo", 2, 32, 32, false, 1000},
		{"16-bit extensible mono", 1, 16, 16, true, 1000},
		{"12-in-16 extensible", 1, 16, 12, true, 1000},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			values := testInts(tt.frames*tt.channels, tt.validBits)
			want := make([]float64, len(values))
			for i, v := range values {
				want[i] = float64(v) / float64(int64(1)<<(tt.validBits-1))
			}
			f := fmtChunk(1, tt.channels, 48000, tt.validBits)
			if tt.extensible {
				f = extensibleChunk(tt.channels, 48000, tt.containerBits, tt.validBits, 0, 1)
			}
			file := wavFile("RIFF", f, chunk("data", encodeInts(values, tt.containerBits, tt.validBits)))
			for _, bufFrames := range []int{1, 7, 4096, tt.frames + 5} {
				d := open(t, file)
				info := d.Info()
				if info.BitsPerSample != tt.validBits || info.SampleFormat != decode.Int || info.Codec != "pcm" ||
					info.Channels != tt.channels || info.SampleRate != 48000 || info.Frames != int64(tt.frames) || info.Container != "wav" {
					t.Fatalf("Info = %+v", info)
				}
				got, err := audiotest.ReadAll(t, d, bufFrames)
				if err != nil {
					t.Fatalf("read with %d-frame buffer: %v", bufFrames, err)
				}
				sameBits(t, got, want)
			}
		})
	}
}

// TestFloatRoundTrip checks IEEE float 32 and 64, plain and extensible:
// float32 widens to float64 exactly (IEEE 754 §5.4.2 formatOf conversions
// of a narrower format are exact), values beyond full scale and
// non-finite values are delivered as stored.
func TestFloatRoundTrip(t *testing.T) {
	rng := rand.New(rand.NewPCG(32, 64))
	f32 := []float32{1, -1, 0, 1.5, -3.25, float32(math.Inf(1)), float32(math.Inf(-1)), float32(math.NaN()), math.SmallestNonzeroFloat32}
	for len(f32) < 2000 {
		f32 = append(f32, float32(rng.NormFloat64()))
	}
	f64 := []float64{1, -1, 0, 2.5, math.Inf(1), math.Inf(-1), math.NaN(), math.SmallestNonzeroFloat64}
	for len(f64) < 2000 {
		f64 = append(f64, rng.NormFloat64())
	}
	want32 := make([]float64, len(f32))
	for i, v := range f32 {
		want32[i] = float64(v)
	}
	tests := []struct {
		name string
		fmt  testChunk
		data []byte
		want []float64
	}{
		{"float32 stereo", fmtChunk(3, 2, 48000, 32), encodeFloat32(f32), want32},
		{"float64 stereo", fmtChunk(3, 2, 48000, 64), encodeFloat64(f64), f64},
		{"float32 extensible", extensibleChunk(2, 96000, 32, 32, 0x3, 3), encodeFloat32(f32), want32},
		{"float64 extensible", extensibleChunk(2, 96000, 64, 64, 0x3, 3), encodeFloat64(f64), f64},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			d := open(t, wavFile("RIFF", tt.fmt, chunk("data", tt.data)))
			if info := d.Info(); info.SampleFormat != decode.Float || info.Codec != "ieee-float" || info.Frames != 1000 {
				t.Fatalf("Info = %+v", info)
			}
			got, err := audiotest.ReadAll(t, d, 333)
			if err != nil {
				t.Fatal(err)
			}
			sameBits(t, got, tt.want)
			if !math.IsNaN(got[7]) && !math.IsNaN(got[6]) {
				t.Errorf("NaN sample not passed through")
			}
		})
	}
}

// TestExtensibleLayouts checks that the channel mask becomes the layout.
// Masks from Microsoft's KSAUDIO_SPEAKER_* definitions (ksmedia.h;
// "Multiple Channel Audio Data and WAVE Files"): 5.1 = FL FR FC LFE BL BR
// = 0x3F, 7.1 surround = 5.1 + SL SR = 0x63F; channels are interleaved in
// ascending bit order.
func TestExtensibleLayouts(t *testing.T) {
	tests := []struct {
		mask     uint32
		channels int
		want     []string
	}{
		{0x3F, 6, []string{"L", "R", "C", "LFE", "Ls", "Rs"}},
		{0x63F, 8, []string{"L", "R", "C", "LFE", "Lb", "Rb", "Ls", "Rs"}},
		{0x4, 1, []string{"C"}},
		{0x0, 2, nil}, // no mask: the file says nothing
	}
	for _, tt := range tests {
		values := testInts(10*tt.channels, 24)
		want := make([]float64, len(values))
		for i, v := range values {
			want[i] = float64(v) / (1 << 23)
		}
		d := open(t, wavFile("RIFF", extensibleChunk(tt.channels, 48000, 24, 24, tt.mask, 1), chunk("data", encodeInts(values, 24, 24))))
		info := d.Info()
		if !slices.Equal(info.Layout, tt.want) || info.ChannelMask != tt.mask {
			t.Errorf("mask %#x: Layout %v ChannelMask %#x, want %v", tt.mask, info.Layout, info.ChannelMask, tt.want)
		}
		got, err := audiotest.ReadAll(t, d, 3)
		if err != nil {
			t.Fatal(err)
		}
		sameBits(t, got, want)
	}
}

// TestViaRegistry checks that importing the package registers it with
// decode.New, which detects the format from its content.
func TestViaRegistry(t *testing.T) {
	file := wavFile("RIFF", fmtChunk(1, 1, 8000, 16), chunk("data", encodeInts([]int32{-32768, 16384}, 16, 16)))
	d, err := decode.New(bytes.NewReader(file))
	if err != nil {
		t.Fatal(err)
	}
	got, err := audiotest.ReadAll(t, d, 16)
	if err != nil {
		t.Fatal(err)
	}
	sameBits(t, got, []float64{-1, 0.5}) // -32768/2^15, 16384/2^15
	if !slices.Contains(decode.Formats(), "wav") {
		t.Errorf("Formats() = %v, want it to include wav", decode.Formats())
	}
	if _, err := decode.New(bytes.NewReader([]byte("RIFF\x04\x00\x00\x00AVI "))); !errors.Is(err, decode.ErrUnknownFormat) {
		t.Errorf("RIFF AVI: err = %v, want ErrUnknownFormat", err)
	}
}
