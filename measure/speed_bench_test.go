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
// its stereo fold-down), one file at a time. x-realtime-cpu is seconds of
// audio per second of the process's CPU time (the one-core figure on a
// shared machine; requirements ≥ 2000×, ≥ 1200×, ≥ 700×). For 48 kHz
// stereo each loop also runs `sox FILE -n stats` on the same file, where
// sox is installed, and reports x-sox: sox's CPU time over kweigh's in the
// same run (above 1 when kweigh is faster). Run it on one core:
//
//	go test -run '^$' -bench TenMinutes -benchtime 3x -cpu 1 ./measure
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
			var soxCPU, ownCPU time.Duration
			clock := audiotest.StartRealtime(b)
			for b.Loop() {
				start := audiotest.ProcessCPU()
				if m := measure.File(context.Background(), path, measure.Options{}); m.Error != "" {
					b.Fatal(m.Error)
				}
				ownCPU += audiotest.ProcessCPU() - start
				if c.againstSoxStats && soxErr == nil {
					b.StopTimer()
					cmd := exec.Command(sox, path, "-n", "stats")
					if out, err := cmd.CombinedOutput(); err != nil {
						b.Fatalf("sox: %v\n%s", err, out)
					}
					soxCPU += cmd.ProcessState.UserTime() + cmd.ProcessState.SystemTime()
					b.StartTimer()
				}
			}
			if soxCPU > 0 {
				b.ReportMetric(soxCPU.Seconds()/ownCPU.Seconds(), "x-sox")
			}
			clock.Report(600)
		})
	}
}
