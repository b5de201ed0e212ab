package flac

import (
	"bytes"
	"fmt"
	"io"
	"math"
	"math/rand/v2"
	"os"
	"os/exec"
	"path/filepath"
	"testing"

	mewflac "github.com/mewkiz/flac"
)

// The differential tests encode synthetic signals with the reference
// encoder (Debian's flac 1.4.2), decode the result with this package and
// with github.com/mewkiz/flac (the test oracle; imported only by tests) and
// require both to give back the encoder's input exactly: FLAC is lossless,
// so the tolerance is 0.

// synth returns frames×channels interleaved samples of the given width: on
// each channel its own tone (so the channels are independent), noise, a
// stretch of digital silence (constant subframes) and a stretch whose low
// bits are zero (wasted bits), seeded so every run is the same.
func synth(seed uint64, frames, channels, bits int) []int32 {
	rng := rand.New(rand.NewPCG(seed, uint64(bits)))
	full := math.Ldexp(1, bits-1)
	out := make([]int32, frames*channels)
	for i := range frames {
		for c := range channels {
			f := 0.013 * float64(c+1)
			v := 0.3*math.Sin(float64(i)*f) + 0.02*(rng.Float64()-0.5)
			s := int64(math.Round(v * full))
			switch part := i * 8 / frames; part {
			case 2:
				s = 0 // silence
			case 5:
				s &^= 0x7 // three wasted bits
				if bits <= 8 {
					s &^= 0x3
				}
			case 6:
				// A loud ramp, of opposite sign on alternate channels, so
				// the side channel needs the extra bit.
				s = int64(float64(i%200-100) / 100 * 0.9 * full)
				if c%2 == 1 {
					s = -s
				}
			}
			s = max(min(s, int64(full)-1), -int64(full))
			out[i*channels+c] = int32(s)
		}
	}
	return out
}

// rawPCM packs samples little-endian in bits/8 bytes each, the raw input
// flac reads with --force-raw-format.
func rawPCM(samples []int32, bits int) []byte {
	w := bits / 8
	out := make([]byte, len(samples)*w)
	for i, v := range samples {
		for j := range w {
			out[i*w+j] = byte(v >> (8 * j))
		}
	}
	return out
}

// encodeFLAC runs the reference encoder on samples and returns the file.
func encodeFLAC(t testing.TB, samples []int32, rate, channels, bits int, opts ...string) []byte {
	t.Helper()
	if _, err := exec.LookPath("flac"); err != nil {
		t.Skip("Debian's flac is not installed (bash .ci/setup installs it)")
	}
	dir := t.TempDir()
	in, out := filepath.Join(dir, "in.raw"), filepath.Join(dir, "out.flac")
	if err := os.WriteFile(in, rawPCM(samples, bits), 0o644); err != nil {
		t.Fatal(err)
	}
	args := append([]string{"--silent", "--force", "--force-raw-format", "--endian=little", "--sign=signed",
		fmt.Sprintf("--channels=%d", channels), fmt.Sprintf("--bps=%d", bits), fmt.Sprintf("--sample-rate=%d", rate)}, opts...)
	args = append(args, in, "-o", out)
	if msg, err := exec.Command("flac", args...).CombinedOutput(); err != nil {
		t.Fatalf("flac %v: %v\n%s", opts, err, msg)
	}
	data, err := os.ReadFile(out)
	if err != nil {
		t.Fatal(err)
	}
	return data
}

// oracleSamples decodes data with mewkiz/flac and returns its samples
// interleaved.
func oracleSamples(t testing.TB, data []byte) []int32 {
	t.Helper()
	stream, err := mewflac.New(bytes.NewReader(data))
	if err != nil {
		t.Fatalf("oracle: %v", err)
	}
	var out []int32
	for {
		f, err := stream.ParseNext()
		if err == io.EOF {
			return out
		}
		if err != nil {
			t.Fatalf("oracle: %v", err)
		}
		for i := range int(f.BlockSize) {
			for _, sub := range f.Subframes {
				out = append(out, sub.Samples[i])
			}
		}
	}
}

// ourSamples decodes data with this package and returns its samples as
// integers (the float samples times 2^(bits-1), which is exact).
func ourSamples(t testing.TB, data []byte, bits int) ([]int32, *Decoder) {
	t.Helper()
	got, err, d := decodeAll(t, data, DefaultOptions(), 4099)
	if err != nil {
		t.Fatalf("decode: %v", err)
	}
	out := make([]int32, len(got))
	for i, v := range got {
		out[i] = int32(math.Ldexp(v, bits-1))
	}
	return out, d
}

func firstDifference(a, b []int32) int {
	for i := range min(len(a), len(b)) {
		if a[i] != b[i] {
			return i
		}
	}
	if len(a) != len(b) {
		return min(len(a), len(b))
	}
	return -1
}

func TestAgainstReferenceEncoderAndOracle(t *testing.T) {
	tests := []struct {
		name                         string
		rate, channels, bits, frames int
		opts                         []string
		oracle                       bool // mewkiz/flac can decode it (it cannot read 32-bit)
	}{
		{"16-bit 44.1 kHz stereo -5", 44100, 2, 16, 44100, []string{"-5"}, true},
		{"16-bit 44.1 kHz mono -0", 44100, 1, 16, 30000, []string{"-0"}, true},
		{"16-bit 44.1 kHz stereo -1", 44100, 2, 16, 20000, []string{"-1"}, true},
		{"16-bit 44.1 kHz stereo -2", 44100, 2, 16, 20000, []string{"-2"}, true},
		{"16-bit 44.1 kHz stereo -3", 44100, 2, 16, 20000, []string{"-3"}, true},
		{"16-bit 44.1 kHz stereo -4", 44100, 2, 16, 20000, []string{"-4"}, true},
		{"16-bit 44.1 kHz stereo -6", 44100, 2, 16, 20000, []string{"-6"}, true},
		{"16-bit 44.1 kHz stereo -7", 44100, 2, 16, 20000, []string{"-7"}, true},
		{"24-bit 48 kHz stereo -8", 48000, 2, 24, 48000, []string{"-8"}, true},
		{"24-bit 96 kHz stereo -5", 96000, 2, 24, 48000, []string{"-5"}, true},
		{"24-bit 48 kHz stereo, independent channels", 48000, 2, 24, 30000, []string{"-5", "--no-mid-side"}, true},
		{"8-bit 48 kHz mono -5", 48000, 1, 8, 20000, []string{"-5"}, true},
		{"24-bit 48 kHz 5.1 -5", 48000, 6, 24, 20000, []string{"-5", "--channel-map=none"}, true},
		{"16-bit 48 kHz 8 channels -8", 48000, 8, 16, 10000, []string{"-8", "--channel-map=none"}, true},
		{"16-bit 44.1 kHz stereo, order 32, 4608 blocks", 44100, 2, 16, 30000, []string{"--lax", "-l", "32", "-b", "4608"}, true},
		{"24-bit 48 kHz stereo, order 32, -p", 48000, 2, 24, 20000, []string{"--lax", "-l", "32", "-p", "-r", "8"}, true},
		{"16-bit 48 kHz stereo, 192 blocks", 48000, 2, 16, 10000, []string{"-b", "192"}, true},
		{"16-bit 48 kHz stereo, 16 blocks", 48000, 2, 16, 3000, []string{"--lax", "-b", "16"}, true},
		{"24-bit 48 kHz stereo, 65535 blocks", 48000, 2, 24, 140000, []string{"--lax", "-b", "65535"}, true},
		{"16-bit 22.05 kHz mono, odd blocks", 22050, 1, 16, 10000, []string{"--lax", "-b", "1001"}, true},
		{"32-bit 48 kHz mono -5", 48000, 1, 32, 20000, []string{"-5"}, false},
		{"32-bit 48 kHz stereo -8", 48000, 2, 32, 20000, []string{"-8"}, false},
		{"32-bit 96 kHz stereo -0", 96000, 2, 32, 10000, []string{"-0"}, false},
	}
	for i, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			want := synth(uint64(i), tc.frames, tc.channels, tc.bits)
			data := encodeFLAC(t, want, tc.rate, tc.channels, tc.bits, tc.opts...)
			got, d := ourSamples(t, data, tc.bits)
			if !d.MD5Verified() {
				t.Error("MD5 not verified")
			}
			if info := d.Info(); info.SampleRate != tc.rate || info.Channels != tc.channels || info.BitsPerSample != tc.bits || info.Frames != int64(tc.frames) {
				t.Errorf("info %+v", info)
			}
			if i := firstDifference(got, want); i >= 0 {
				t.Fatalf("%d samples, encoder input %d; first difference at %d (frame %d, channel %d)", len(got), len(want), i, i/tc.channels, i%tc.channels)
			}
			if tc.oracle {
				if i := firstDifference(got, oracleSamples(t, data)); i >= 0 {
					t.Fatalf("differs from mewkiz/flac at sample %d", i)
				}
			}
		})
	}
}

// TestFixturesAgainstOracle compares every committed fixture mewkiz/flac
// can read, sample for sample.
func TestFixturesAgainstOracle(t *testing.T) {
	for _, tc := range sourceFixtures {
		data, err := os.ReadFile(filepath.Join("testdata", tc.flac))
		if err != nil {
			t.Fatal(err)
		}
		got, _ := ourSamples(t, data, tc.bits)
		if i := firstDifference(got, oracleSamples(t, data)); i >= 0 {
			t.Errorf("%s: differs from mewkiz/flac at sample %d", tc.flac, i)
		}
	}
}
