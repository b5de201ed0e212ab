package flac

import (
	"bytes"
	"context"
	"math"
	"math/rand/v2"
	"os"
	"os/exec"
	"path/filepath"
	"runtime"
	"testing"
	"time"

	"github.com/kweigh/kweigh/decode"
	"github.com/kweigh/kweigh/internal/audiotest"
	kmeasure "github.com/kweigh/kweigh/measure"
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

// programme synthesises seconds of audio standing in for a mix: on each
// channel its own chord of three slowly beating tones (so the channels are
// independent and mid/side coding gains little) at about -20 dBFS plus
// low-passed noise at about -50 dBFS, seeded so every run codes the same.
func programme(seconds, rate, channels, bits int) []int32 {
	rng := rand.New(rand.NewPCG(2026, 12))
	full := math.Ldexp(1, bits-1)
	n := seconds * rate
	out := make([]int32, n*channels)
	noise := make([]float64, channels)
	for c := range channels {
		f := [3]float64{110 * float64(c+2), 165 * float64(c+2) * 1.01, 220 * float64(c+2) * 0.99}
		var ph [3]float64
		for i := range n {
			t := float64(i) / float64(rate)
			var v float64
			for k := range f {
				ph[k] += 2 * math.Pi * f[k] / float64(rate)
				v += math.Sin(ph[k]) * (0.5 + 0.5*math.Sin(2*math.Pi*t*(0.1+0.07*float64(k))))
			}
			noise[c] = 0.9*noise[c] + 0.1*(rng.Float64()-0.5)
			out[i*channels+c] = int32(math.Round((0.03*v + 0.02*noise[c]) * full))
		}
	}
	return out
}

// benchFile writes a FLAC file of synthesised programme made by the
// reference encoder with flac's options into a temp dir and returns its
// path and duration in seconds.
func benchFile(b *testing.B, seconds, rate, channels, bits int, opts ...string) (string, float64) {
	b.Helper()
	data := encodeFLAC(b, programme(seconds, rate, channels, bits), rate, channels, bits, opts...)
	path := filepath.Join(b.TempDir(), "programme.flac")
	if err := os.WriteFile(path, data, 0o644); err != nil {
		b.Fatal(err)
	}
	return path, float64(seconds)
}

// BenchmarkMeasureVsReferenceDecoder times, in the same run and on the
// same 10-minute 48 kHz stereo 24-bit file (flac -5, independent
// channels), a full measurement (measure.File: decoding, MD5, loudness,
// true peak, loudness range, signal hygiene) against the reference decoder
// writing a WAV to /dev/null (flac -d -c FILE > /dev/null), alternating the
// two. It reports the ratios of their wall times (x-vs-flac-wall) and CPU
// times (x-vs-flac-cpu; the child's CPU from its rusage), the issue's
// requirement being at most 1.5. Each round also measures the file on two
// cores (measure.Options{Cores: NewCores(2)}, sections): x2cores-vs-flac-wall
// is its wall time over flac -d's (issue 14: below 1, run without -cpu 1
// so two cores are there), 2core-speedup the one-core wall time over it.
func BenchmarkMeasureVsReferenceDecoder(b *testing.B) {
	if _, err := exec.LookPath("flac"); err != nil {
		b.Skip("Debian's flac is not installed")
	}
	path, seconds := benchFile(b, 600, 48000, 2, 24, "-5")
	null, err := os.OpenFile(os.DevNull, os.O_WRONLY, 0)
	if err != nil {
		b.Fatal(err)
	}
	defer null.Close()
	var oursWall, oursCPU, refWall, refCPU, twoWall time.Duration
	b.ResetTimer()
	for b.Loop() {
		cmd := exec.Command("flac", "-d", "-c", "--silent", path)
		cmd.Stdout = null
		start := time.Now()
		if err := cmd.Run(); err != nil {
			b.Fatal(err)
		}
		refWall += time.Since(start)
		refCPU += cmd.ProcessState.UserTime() + cmd.ProcessState.SystemTime()

		cpu0, start := audiotest.ProcessCPU(), time.Now()
		m := kmeasure.File(context.Background(), path, kmeasure.Options{})
		oursWall += time.Since(start)
		oursCPU += audiotest.ProcessCPU() - cpu0
		if m.Err != nil || m.Damaged != "" || m.DurationS != seconds {
			b.Fatalf("measure: %v %s, %.1f s", m.Err, m.Damaged, m.DurationS)
		}

		// The same file on two cores (sections, issue 14): its wall time
		// against flac -d's.
		start = time.Now()
		m2 := kmeasure.File(context.Background(), path, kmeasure.Options{Cores: kmeasure.NewCores(2)})
		twoWall += time.Since(start)
		if m2.Err != nil || m2.Damaged != "" || m2.DurationS != seconds || m2.IntegratedLUFS == nil || *m2.IntegratedLUFS != *m.IntegratedLUFS {
			b.Fatalf("measure on 2 cores: %v %s, %.1f s", m2.Err, m2.Damaged, m2.DurationS)
		}
	}
	b.StopTimer()
	n := float64(b.N)
	b.ReportMetric(twoWall.Seconds()/refWall.Seconds(), "x2cores-vs-flac-wall")
	b.ReportMetric(oursWall.Seconds()/twoWall.Seconds(), "2core-speedup")
	b.ReportMetric(oursWall.Seconds()/refWall.Seconds(), "x-vs-flac-wall")
	b.ReportMetric(oursCPU.Seconds()/refCPU.Seconds(), "x-vs-flac-cpu")
	b.ReportMetric(seconds*n/oursCPU.Seconds(), "x-realtime-cpu")
	b.ReportMetric(seconds*n/refCPU.Seconds(), "flac-x-realtime-cpu")
}

// BenchmarkDecodeProgramme decodes 60 s of synthesised programme in
// several formats from memory and reports the speed (x-realtime,
// x-realtime-cpu), the bytes allocated once per file (B-setup: the input
// buffer, the frame and MD5 buffers sized on the first frame) and the
// bytes allocated after that per second of audio (B-alloc/audio-s).
func BenchmarkDecodeProgramme(b *testing.B) {
	for _, tc := range []struct {
		name                 string
		rate, channels, bits int
		md5                  bool
	}{
		{"48k-stereo-24", 48000, 2, 24, true},
		{"48k-stereo-24-noMD5", 48000, 2, 24, false},
		{"44k-stereo-16", 44100, 2, 16, true},
		{"48k-5.1-24", 48000, 6, 24, true},
	} {
		b.Run(tc.name, func(b *testing.B) {
			path, seconds := benchFile(b, 60, tc.rate, tc.channels, tc.bits, "-5", "--channel-map=none")
			data, err := os.ReadFile(path)
			if err != nil {
				b.Fatal(err)
			}
			frames := audiotest.RunDecodeBenchmark(b, data, func(src decode.Source, size int64) (*Decoder, error) {
				return NewDecoder(src, size, Options{VerifyMD5: tc.md5})
			})
			if frames != int64(seconds)*int64(tc.rate) {
				b.Fatalf("decoded %d frames", frames)
			}
			setup, perSecond := decodeAllocations(b, data, tc.md5, seconds)
			b.ReportMetric(setup, "B-setup")
			b.ReportMetric(perSecond, "B-alloc/audio-s")
		})
	}
}

// decodeAllocations decodes data once and returns the bytes allocated by
// NewDecoder and the first ReadFrames call (which sizes the frame buffers
// to the stream's block size), and, per second of audio, by the ReadFrames
// calls after it.
func decodeAllocations(b *testing.B, data []byte, md5 bool, seconds float64) (setup, perSecond float64) {
	var m0, m1, m2 runtime.MemStats
	runtime.GC()
	runtime.ReadMemStats(&m0)
	d, err := NewDecoder(bytes.NewReader(data), int64(len(data)), Options{VerifyMD5: md5})
	if err != nil {
		b.Fatal(err)
	}
	buf := make([]float64, 4096*d.Info().Channels)
	if _, err := d.ReadFrames(buf); err != nil {
		b.Fatal(err)
	}
	runtime.ReadMemStats(&m1)
	if _, err := audiotest.CountFrames(d, buf); err != nil {
		b.Fatal(err)
	}
	runtime.ReadMemStats(&m2)
	return float64(m1.TotalAlloc - m0.TotalAlloc), float64(m2.TotalAlloc-m1.TotalAlloc) / seconds
}
