package wav_test

import (
	"math"
	"testing"

	"github.com/kweigh/kweigh/decode/wav"
	"github.com/kweigh/kweigh/internal/audiotest"
)

// benchSeconds is the length of the benchmark files: one minute of audio.
const benchSeconds = 60

// benchFile builds benchSeconds of 48 kHz stereo noise in the given format.
func benchFile(tag uint16, bits int) []byte {
	const rate, channels = 48000, 2
	n := rate * channels * benchSeconds
	var data []byte
	if tag == 3 {
		f := make([]float32, n)
		for i := range f {
			f[i] = float32(math.Sin(float64(i) * 0.001))
		}
		data = encodeFloat32(f)
	} else {
		data = encodeInts(testInts(n, bits), bits, bits)
	}
	return wavFile("RIFF", fmtChunk(tag, channels, rate, bits), chunk("data", data))
}

// BenchmarkReadFrames decodes one minute of 48 kHz stereo from memory with
// a 4096-frame buffer and reports the speed in multiples of real time, by
// wall clock (x-realtime) and by the process's CPU time (x-realtime-cpu).
func BenchmarkReadFrames(b *testing.B) {
	for _, bc := range []struct {
		name string
		tag  uint16
		bits int
	}{
		{"int24", 1, 24},
		{"int16", 1, 16},
		{"float32", 3, 32},
	} {
		b.Run(bc.name, func(b *testing.B) {
			frames := audiotest.RunDecodeBenchmark(b, benchFile(bc.tag, bc.bits), wav.New)
			if frames != 48000*benchSeconds {
				b.Fatalf("decoded %d frames", frames)
			}
		})
	}
}
