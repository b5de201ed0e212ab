package flac

import (
	"testing"

	"github.com/kweigh/kweigh/decode"
	"github.com/kweigh/kweigh/internal/audiotest"
)

// benchmarkDecode decodes the 0.6 s, 48 kHz, stereo, 24-bit fixture from
// memory b.N times and reports throughput as multiples of real time, by
// wall clock (x-realtime) and by process CPU time (x-realtime-cpu).
func benchmarkDecode(b *testing.B, opts Options) {
	data := audiotest.Fixture(b, "stereo24-48k.flac")
	audiotest.RunDecodeBenchmark(b, data, func(src decode.Source, size int64) (*Decoder, error) {
		return NewDecoder(src, size, opts)
	})
}

func BenchmarkDecode48kStereo24(b *testing.B)      { benchmarkDecode(b, DefaultOptions()) }
func BenchmarkDecode48kStereo24NoMD5(b *testing.B) { benchmarkDecode(b, Options{VerifyMD5: false}) }
