package measure_test

import (
	"bytes"
	"context"
	"encoding/binary"
	"fmt"
	"math"
	"math/rand/v2"
	"os"
	"os/exec"
	"path/filepath"
	"testing"
	"time"

	"github.com/kweigh/kweigh/internal/audiotest"
	"github.com/kweigh/kweigh/measure"
)

// programmeOf is programme for any rate and channel count: interleaved
// frames of noise shaped by a slow syllable-rate envelope at broadcast
// level, every channel its own noise.
func programmeOf(sampleRate, channels int, seconds float64, seed uint64) []float64 {
	rng := rand.New(rand.NewPCG(seed, 11))
	n := int(seconds * float64(sampleRate))
	out := make([]float64, channels*n)
	lp := make([]float64, channels)
	r := float64(sampleRate)
	for i := 0; i < n; i++ {
		env := 0.05 + 0.1*(1+math.Sin(2*math.Pi*3.1*float64(i)/r))*(1+math.Sin(2*math.Pi*0.23*float64(i)/r))
		for c := range channels {
			lp[c] += 0.3 * (rng.NormFloat64() - lp[c])
			out[channels*i+c] = env * lp[c]
		}
	}
	return out
}

// longWAV writes a 24-bit WAV of minutes minutes into dir: one minute of
// programmeOf repeated (a shorter period would let the true-peak search
// see the same few blocks again and again; a minute is 600 blocks). mask
// is the WAVE channel mask (0 for none).
func longWAV(tb testing.TB, dir string, sampleRate, channels int, mask uint32, minutes int) string {
	tb.Helper()
	one := wavBytesAt(sampleRate, channels, 24, mask, programmeOf(sampleRate, channels, 60, uint64(channels)))
	at := bytes.Index(one, []byte("data"))
	if at < 0 {
		tb.Fatal("no data chunk")
	}
	header, data := append([]byte(nil), one[:at+8]...), one[at+8:]
	total := len(data) * minutes
	binary.LittleEndian.PutUint32(header[4:], uint32(len(header)-8+total))
	binary.LittleEndian.PutUint32(header[at+4:], uint32(total))
	path := filepath.Join(dir, fmt.Sprintf("programme-%dk-%dch-%dmin.wav", sampleRate/1000, channels, minutes))
	f, err := os.Create(path)
	if err != nil {
		tb.Fatal(err)
	}
	defer f.Close()
	if _, err := f.Write(header); err != nil {
		tb.Fatal(err)
	}
	for range minutes {
		if _, err := f.Write(data); err != nil {
			tb.Fatal(err)
		}
	}
	return path
}

// wavBytesAt is wavBytes at any sample rate.
func wavBytesAt(sampleRate, channels, bits int, mask uint32, frames []float64) []byte {
	b := wavBytes(channels, bits, false, mask, frames)
	binary.LittleEndian.PutUint32(b[24:], uint32(sampleRate))
	binary.LittleEndian.PutUint32(b[28:], uint32(sampleRate*channels*bits/8))
	return b
}

// BenchmarkTenMinutes is the full measurement a `kweigh measure` run does
// of a 10-minute 24-bit WAV (48 kHz stereo, 96 kHz stereo, 48 kHz 5.1 with
// its stereo fold-down), one file at a time, each loop measuring the file
// once on one core and once on two (Options.Cores, the file cut into
// sections). Metrics:
//
//   - x-realtime-cpu: seconds of audio per second of the process's CPU time
//     for the one-core measurement (the one-core figure on a shared
//     machine; requirements ≥ 2000×, ≥ 1200×, ≥ 700×);
//   - x-realtime-1core, x-realtime-2cores: the same per second of wall time;
//   - speedup-2cores: one-core wall time over two-core wall time in the same
//     loop (requirement ≥ 1.8; it needs two idle cores);
//   - cores-busy-2cores: CPU time over wall time of the two-core
//     measurement, near 2 when the sections really ran at once;
//   - x-sox (48 kHz stereo, where sox is installed): the CPU time of
//     `sox FILE -n stats` on the same file in the same loop over kweigh's
//     one-core CPU time, above 1 when kweigh is faster.
//
// Run it with two cores available to Go:
//
//	go test -run '^$' -bench TenMinutes -benchtime 3x -cpu 2 ./measure
func BenchmarkTenMinutes(b *testing.B) {
	dir := b.TempDir()
	for _, c := range []struct {
		name            string
		rate, channels  int
		mask            uint32
		againstSoxStats bool
	}{
		{"48k-stereo", 48000, 2, 0, true},
		{"96k-stereo", 96000, 2, 0, false},
		{"48k-5.1", 48000, 6, 0x3F, false},
	} {
		b.Run(c.name, func(b *testing.B) {
			path := longWAV(b, dir, c.rate, c.channels, c.mask, 10)
			sox, soxErr := exec.LookPath("sox")
			var soxCPU, oneCPU, oneWall, twoCPU, twoWall time.Duration
			b.ResetTimer()
			for b.Loop() {
				start, cpu := time.Now(), audiotest.ProcessCPU()
				if m := measure.File(context.Background(), path, measure.Options{}); m.Error != "" {
					b.Fatal(m.Error)
				}
				oneCPU += audiotest.ProcessCPU() - cpu
				oneWall += time.Since(start)
				start, cpu = time.Now(), audiotest.ProcessCPU()
				if m := measure.File(context.Background(), path, measure.Options{Cores: measure.NewCores(2)}); m.Error != "" {
					b.Fatal(m.Error)
				}
				twoWall += time.Since(start)
				twoCPU += audiotest.ProcessCPU() - cpu
				if c.againstSoxStats && soxErr == nil {
					cmd := exec.Command(sox, path, "-n", "stats")
					if out, err := cmd.CombinedOutput(); err != nil {
						b.Fatalf("sox: %v\n%s", err, out)
					}
					soxCPU += cmd.ProcessState.UserTime() + cmd.ProcessState.SystemTime()
				}
			}
			audio := 600 * float64(b.N)
			b.ReportMetric(audio/oneCPU.Seconds(), "x-realtime-cpu")
			b.ReportMetric(audio/oneWall.Seconds(), "x-realtime-1core")
			b.ReportMetric(audio/twoWall.Seconds(), "x-realtime-2cores")
			b.ReportMetric(oneWall.Seconds()/twoWall.Seconds(), "speedup-2cores")
			b.ReportMetric(twoCPU.Seconds()/twoWall.Seconds(), "cores-busy-2cores")
			if soxCPU > 0 {
				b.ReportMetric(soxCPU.Seconds()/oneCPU.Seconds(), "x-sox")
			}
		})
	}
}
