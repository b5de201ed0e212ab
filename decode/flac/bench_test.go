package flac

import (
	"bytes"
	"io"
	"testing"
)

// benchmarkDecode decodes the 0.6 s, 48 kHz, stereo, 24-bit fixture from
// memory b.N times and reports throughput as multiples of real time, by
// wall clock (x-realtime) and by process CPU time (x-realtime-cpu).
func benchmarkDecode(b *testing.B, opts Options) {
	data := fixture(b, "stereo24-48k.flac")
	buf := make([]float64, 4096*2)
	var frames int64
	b.SetBytes(int64(len(data)))
	b.ReportAllocs()
	b.ResetTimer()
	cpuBefore := processCPU()
	for range b.N {
		d, err := NewDecoder(bytes.NewReader(data), int64(len(data)), opts)
		if err != nil {
			b.Fatal(err)
		}
		for {
			n, err := d.ReadFrames(buf)
			frames += int64(n)
			if err == io.EOF {
				break
			}
			if err != nil {
				b.Fatal(err)
			}
		}
	}
	audio := float64(frames) / 48000
	b.ReportMetric(audio/b.Elapsed().Seconds(), "x-realtime")
	if cpu := processCPU() - cpuBefore; cpuBefore > 0 && cpu > 0 {
		b.ReportMetric(audio/cpu.Seconds(), "x-realtime-cpu")
	}
}

func BenchmarkDecode48kStereo24(b *testing.B)      { benchmarkDecode(b, DefaultOptions()) }
func BenchmarkDecode48kStereo24NoMD5(b *testing.B) { benchmarkDecode(b, Options{VerifyMD5: false}) }
