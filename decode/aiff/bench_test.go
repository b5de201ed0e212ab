package aiff

import (
	"bytes"
	"io"
	"math/rand"
	"testing"
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
	data := buildAIFF(spec)
	buf := make([]float64, 4096*2)
	var decoded int64
	b.SetBytes(int64(len(data)))
	b.ReportAllocs()
	b.ResetTimer()
	cpuBefore := processCPU()
	for range b.N {
		d, err := NewDecoder(bytes.NewReader(data), int64(len(data)))
		if err != nil {
			b.Fatal(err)
		}
		for {
			n, err := d.ReadFrames(buf)
			decoded += int64(n)
			if err == io.EOF {
				break
			}
			if err != nil {
				b.Fatal(err)
			}
		}
	}
	audio := float64(decoded) / 48000
	b.ReportMetric(audio/b.Elapsed().Seconds(), "x-realtime")
	if cpu := processCPU() - cpuBefore; cpuBefore > 0 && cpu > 0 {
		b.ReportMetric(audio/cpu.Seconds(), "x-realtime-cpu")
	}
}

func BenchmarkDecode48kStereo24(b *testing.B) { benchmarkDecode(b, aiffSpec{bits: 24}) }
func BenchmarkDecode48kStereo16(b *testing.B) { benchmarkDecode(b, aiffSpec{bits: 16}) }
func BenchmarkDecode48kStereo24Sowt(b *testing.B) {
	benchmarkDecode(b, aiffSpec{aifc: true, compression: "sowt", bits: 24})
}
func BenchmarkDecode48kStereoFloat32(b *testing.B) {
	benchmarkDecode(b, aiffSpec{aifc: true, compression: "fl32", bits: 32, floats: make([]float64, 10*48000*2)})
}
