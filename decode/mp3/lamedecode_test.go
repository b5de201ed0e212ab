package mp3

import (
	"encoding/binary"
	"fmt"
	"math"
	"math/rand/v2"
	"os"
	"os/exec"
	"path/filepath"
	"testing"

	"github.com/kweigh/kweigh/decode"
)

// lameDecode decodes the MP3 at path with Debian's `lame --decode` (an
// independent decoder; it writes 16-bit PCM and, for files with a LAME
// Info frame, trims the encoder delay and padding like this package) and
// returns its samples scaled to ±1, channels interleaved.
func lameDecode(t testing.TB, path string) (samples []float64, channels int) {
	t.Helper()
	out := path + ".dec.wav"
	if msg, err := exec.Command(lamePath(t), "--quiet", "--decode", "-t", path, out).CombinedOutput(); err != nil {
		t.Fatalf("lame --decode %s: %v\n%s", path, err, msg)
	}
	b, err := os.ReadFile(out)
	if err != nil {
		t.Fatal(err)
	}
	// -t writes headerless little-endian 16-bit PCM.
	samples = make([]float64, len(b)/2)
	for i := range samples {
		samples[i] = float64(int16(binary.LittleEndian.Uint16(b[2*i:]))) / 32768
	}
	return samples, 0
}

// richSignal is seconds of tones, moving noise and transients at rate Hz,
// peaking near −3 dBFS (so that neither decoder clips).
func richSignal(rate, channels int, seconds float64, seed uint64) []float64 {
	rng := rand.New(rand.NewPCG(seed, 5))
	n := int(seconds * float64(rate))
	out := make([]float64, n*channels)
	for i := range n {
		tt := float64(i) / float64(rate)
		env := 0.5 + 0.4*math.Sin(2*math.Pi*0.9*tt)
		burst := 0.0
		if math.Mod(tt, 0.7) < 0.05 {
			burst = 0.4 * (rng.Float64() - 0.5)
		}
		for c := range channels {
			f := 220 * (1 + 0.3*float64(c))
			v := 0.4*math.Sin(2*math.Pi*f*tt) + 0.2*math.Sin(2*math.Pi*3.1*f*tt+math.Sin(3*tt))
			out[i*channels+c] = env*(v+0.1*(rng.Float64()-0.5)) + burst
		}
	}
	return out
}

func TestAgainstLameDecoder(t *testing.T) {
	// Our decoder against `lame --decode` on lame encodes of one signal
	// in every MPEG version, CBR, VBR and ABR, mono, stereo and joint
	// stereo, 8 to 48 kHz (MPEG-2.5 included). lame rounds to 16 bits, so
	// the samples agree within 1.5 steps of 2⁻¹⁵ (half a step of rounding,
	// up to one more where lame scales full scale to 32767 rather than
	// 32768, and float differences; common practice, no published
	// source), and
	// the integrated loudness within 0.01 LU (the requirement of issue 13).
	dir := t.TempDir()
	tests := []struct {
		rate, channels int
		opts           []string
	}{
		{48000, 2, []string{"-b", "192"}},
		{48000, 2, []string{"-V", "2"}},
		{44100, 2, []string{"--abr", "128", "-m", "j"}},
		{44100, 1, []string{"-b", "128"}},
		{32000, 2, []string{"-b", "96", "-m", "s"}},
		{24000, 2, []string{"-V", "4"}},
		{22050, 1, []string{"-b", "64"}},
		{16000, 2, []string{"-b", "48", "-m", "j"}},
		{12000, 1, []string{"-V", "6"}},
		{11025, 2, []string{"-b", "32", "-m", "j"}},
		{8000, 1, []string{"-b", "16"}},
	}
	for k, tt := range tests {
		name := fmt.Sprintf("l%d-%d-%d.mp3", k, tt.rate, tt.channels)
		t.Run(name, func(t *testing.T) {
			src := filepath.Join(dir, name+".wav")
			writeWAV16(t, src, tt.rate, tt.channels, richSignal(tt.rate, tt.channels, 4, uint64(k)))
			b := lameEncode(t, src, name, tt.opts...)
			got := decodeBytes(t, b)
			if got.err != nil {
				t.Fatalf("decoding: %v", got.err)
			}
			if got.channels != tt.channels || got.rate != tt.rate {
				t.Fatalf("%d channels at %d Hz, want %d at %d", got.channels, got.rate, tt.channels, tt.rate)
			}
			ref, _ := lameDecode(t, filepath.Join(dir, name))
			if len(got.samples) == len(ref)+SynthesisDelay*tt.channels {
				// No Info frame (lame writes none into frames too short
				// for it, as at 8 kHz and 16 kbit/s): this package keeps
				// the stream untrimmed and says so, lame --decode drops
				// the decoder delay alone.
				got.samples = got.samples[SynthesisDelay*tt.channels:]
			}
			if len(ref) != len(got.samples) {
				t.Errorf("%d samples, lame --decode gives %d", len(got.samples), len(ref))
			}
			worst := 0.0
			for i := range min(len(ref), len(got.samples)) {
				worst = max(worst, math.Abs(got.samples[i]-ref[i])*32768)
			}
			layout := decode.DefaultLayout(tt.channels)
			lu := integrated(t, got.pcm, layout) - integrated(t, pcm{samples: ref, rate: tt.rate, channels: tt.channels}, layout)
			t.Logf("%s %v: %d samples, largest difference %.3f steps of 2⁻¹⁵, loudness %+.4f LU", name, tt.opts, len(got.samples), worst, lu)
			if worst > 1.5 {
				t.Errorf("largest difference %.3f steps, bound 1.5", worst)
			}
			if math.Abs(lu) > 0.01 {
				t.Errorf("loudness differs by %+.4f LU, bound 0.01", lu)
			}
		})
	}
}
