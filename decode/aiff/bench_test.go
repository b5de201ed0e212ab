package aiff

import (
	"math/rand"
	"testing"

	"github.com/kweigh/kweigh/decode"
	"github.com/kweigh/kweigh/internal/audiotest"
)

// benchmarkDecode decodes 10 s of 48 kHz stereo in the given coding from
// memory and reports throughput as multiples of real time, by wall clock
// (x-realtime) and by process CPU time (x-realtime-cpu).
func benchmarkDecode(b *testing.B, spec aiffSpec) {
	const frames = 10 * 48000
	r := rand.New(rand.NewSource(1))
	spec.channels, spec.rate, spec.commFrames, spec.formSize = 2, 48000, -1, -1
	if spec.floats == nil {
		spec.ints = make([]int32, frames*2)
		for i := range spec.ints {
			spec.ints[i] = int32(r.Intn(1<<spec.bits) - 1<<(spec.bits-1))
		}
	}
	audiotest.RunDecodeBenchmark(b, buildAIFF(spec), func(src decode.Source, size int64) (*Decoder, error) {
		return NewDecoder(src, size)
	})
}

func BenchmarkDecode48kStereo24(b *testing.B) { benchmarkDecode(b, aiffSpec{bits: 24}) }
func BenchmarkDecode48kStereo16(b *testing.B) { benchmarkDecode(b, aiffSpec{bits: 16}) }
func BenchmarkDecode48kStereo24Sowt(b *testing.B) {
	benchmarkDecode(b, aiffSpec{aifc: true, compression: "sowt", bits: 24})
}
func BenchmarkDecode48kStereoFloat32(b *testing.B) {
	benchmarkDecode(b, aiffSpec{aifc: true, compression: "fl32", bits: 32, floats: make([]float64, 10*48000*2)})
}
