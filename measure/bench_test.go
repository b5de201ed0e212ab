package measure_test

import (
	"context"
	"encoding/binary"
	"errors"
	"io"
	"math"
	"math/rand/v2"
	"os"
	"runtime"
	"runtime/debug"
	"strconv"
	"strings"
	"testing"

	"github.com/kweigh/kweigh/decode"
	"github.com/kweigh/kweigh/internal/audiotest"
	"github.com/kweigh/kweigh/measure"
)

// programme returns interleaved stereo frames of a programme-like signal:
// noise shaped by a slow syllable-rate envelope at broadcast level, so the
// true-peak search sees a realistic crest factor.
func programme(seconds float64, seed uint64) []float64 {
	rng := rand.New(rand.NewPCG(seed, 11))
	n := int(seconds * rate)
	out := make([]float64, 2*n)
	lp := [2]float64{}
	for i := 0; i < n; i++ {
		env := 0.05 + 0.1*(1+math.Sin(2*math.Pi*3.1*float64(i)/rate))*(1+math.Sin(2*math.Pi*0.23*float64(i)/rate))
		for c := 0; c < 2; c++ {
			lp[c] += 0.3 * (rng.NormFloat64() - lp[c])
			out[2*i+c] = env * lp[c]
		}
	}
	return out
}

// BenchmarkFile48kStereo24 is the full measurement a `kweigh measure` run
// does — WAV decoding, K-weighting, gating, momentary/short-term, loudness
// range, 4× true peak, sample peak and the signal-hygiene probes — of a
// 60 s 48 kHz stereo 24-bit file on one goroutine. x-realtime is seconds of
// audio measured per second of wall time (requirement: ≥ 500);
// x-realtime-cpu the same per second of the process's CPU time, the
// one-core figure on a machine shared with other work.
func BenchmarkFile48kStereo24(b *testing.B) {
	dir := b.TempDir()
	path := dir + "/programme.wav"
	if err := os.WriteFile(path, wavBytes(2, 24, false, 0, programme(60, 1)), 0o644); err != nil {
		b.Fatal(err)
	}
	b.SetBytes(60 * rate * 2 * 3)
	clock := audiotest.StartRealtime(b)
	for b.Loop() {
		if m := measure.File(context.Background(), path, measure.Options{}); m.Error != "" {
			b.Fatal(m.Error)
		}
	}
	clock.Report(60)
}

// synthWAV is a PCM WAV file of any length that exists only as a formula:
// its header is real and its samples are computed from their offset, so a
// multi-hour file can be decoded by the real WAV reader without gigabytes
// of disk.
type synthWAV struct {
	header []byte
	size   int64
	pos    int64
	width  int64 // bytes per sample
}

// newSynthWAV is a 48 kHz stereo 24-bit synthWAV.
func newSynthWAV(seconds int) *synthWAV { return newSynthWAVOf(rate, 2, 24, seconds) }

// newSynthWAVOf is a synthWAV of the given rate, channel count and bit
// depth (16 or 24).
func newSynthWAVOf(sampleRate, channels, bits, seconds int) *synthWAV {
	width := bits / 8
	frame := channels * width
	data := int64(seconds) * int64(sampleRate*frame)
	h := []byte("RIFF\x00\x00\x00\x00WAVEfmt \x10\x00\x00\x00\x01\x00")
	h = binary.LittleEndian.AppendUint16(h, uint16(channels))
	h = binary.LittleEndian.AppendUint32(h, uint32(sampleRate))
	h = binary.LittleEndian.AppendUint32(h, uint32(sampleRate*frame))
	h = binary.LittleEndian.AppendUint16(h, uint16(frame))
	h = binary.LittleEndian.AppendUint16(h, uint16(bits))
	h = append(h, "data"...)
	h = binary.LittleEndian.AppendUint32(h, uint32(data))
	binary.LittleEndian.PutUint32(h[4:], uint32(int64(len(h))+data-8))
	return &synthWAV{header: h, size: int64(len(h)) + data, width: int64(width)}
}

func (s *synthWAV) ReadAt(p []byte, off int64) (int, error) {
	if off >= s.size {
		return 0, io.EOF
	}
	n := 0
	for n < len(p) && off < s.size {
		if off < int64(len(s.header)) {
			p[n] = s.header[off]
		} else {
			// A cheap hash of the byte offset: noise at about -12 dBFS
			// (the top byte of each 3-byte sample kept small).
			k := off - int64(len(s.header))
			v := uint64(k) * 0x9E3779B97F4A7C15
			b := byte(v >> 56)
			if k%s.width == s.width-1 {
				b = byte(int8(b) / 4)
			}
			p[n] = b
		}
		n++
		off++
	}
	if n < len(p) {
		return n, io.EOF
	}
	return n, nil
}

func (s *synthWAV) Read(p []byte) (int, error) {
	n, err := s.ReadAt(p, s.pos)
	s.pos += int64(n)
	return n, err
}

func (s *synthWAV) Seek(off int64, whence int) (int64, error) {
	switch whence {
	case io.SeekStart:
		s.pos = off
	case io.SeekCurrent:
		s.pos += off
	case io.SeekEnd:
		s.pos = s.size + off
	}
	if s.pos < 0 {
		return 0, errors.New("negative position")
	}
	return s.pos, nil
}

// BenchmarkTwoHourMemory measures a 2-hour 48 kHz stereo 24-bit stream
// through the real WAV reader and reports the process's peak resident set
// (Linux VmHWM) and the Go heap in use at the end. Requirement: resident
// memory under 64 MB. Run it alone:
//
//	go test -run '^$' -bench TwoHourMemory -benchtime 1x ./measure
func BenchmarkTwoHourMemory(b *testing.B) {
	for b.Loop() {
		src := newSynthWAV(2 * 3600)
		d, err := decode.New(src)
		if err != nil {
			b.Fatal(err)
		}
		m := measure.Stream(context.Background(), "two-hours.wav", d, measure.Options{KeepSeries: true})
		if m.Error != "" || m.DurationS != 7200 {
			b.Fatalf("error %q, duration %v", m.Error, m.DurationS)
		}
	}
	var ms runtime.MemStats
	runtime.ReadMemStats(&ms)
	b.ReportMetric(float64(ms.HeapInuse)/(1<<20), "heap-MB")
	if hwm, ok := peakRSS(); ok {
		b.ReportMetric(hwm, "peak-RSS-MB")
	}
}

// peakRSS reads the process's peak resident set size in MiB (Linux).
func peakRSS() (float64, bool) {
	data, err := os.ReadFile("/proc/self/status")
	if err != nil {
		return 0, false
	}
	for _, line := range strings.Split(string(data), "\n") {
		if f := strings.Fields(line); len(f) >= 2 && f[0] == "VmHWM:" {
			kb, err := strconv.ParseFloat(f[1], 64)
			return kb / 1024, err == nil
		}
	}
	return 0, false
}

// BenchmarkDayMemory measures a 24-hour stream (864 000 blocks of 100 ms,
// the engine's unit of state) through the real WAV reader with the series
// kept for plots, as --report does, and reports the process's peak resident
// set (Linux VmHWM) for it and for a 10-minute stream of the same kind
// measured first in the same run: rss-ratio is 24 h over 10 min, 1.0 when
// memory does not grow with length. The stream is 8 kHz mono 16-bit, so a
// day of blocks takes seconds, not an hour (the engine's per-block state
// does not depend on rate or channels). Requirement: peak RSS under 64 MB.
// Run it alone:
//
//	go test -run '^$' -bench DayMemory -benchtime 1x ./measure
func BenchmarkDayMemory(b *testing.B) {
	run := func(seconds int) float64 {
		debug.FreeOSMemory()
		resetPeakRSS()
		d, err := decode.New(newSynthWAVOf(8000, 1, 16, seconds))
		if err != nil {
			b.Fatal(err)
		}
		m := measure.Stream(context.Background(), "day.wav", d, measure.Options{KeepSeries: true})
		if m.Error != "" || m.DurationS != float64(seconds) || m.IntegratedLUFS == nil || m.Series == nil {
			b.Fatalf("error %q, duration %v", m.Error, m.DurationS)
		}
		hwm, ok := peakRSS()
		if !ok {
			b.Skip("no /proc/self/status: peak RSS unknown on this system")
		}
		return hwm
	}
	var short, day float64
	for b.Loop() {
		short = run(600)
		day = run(24 * 3600)
	}
	b.ReportMetric(day, "peak-RSS-MB")
	b.ReportMetric(day/short, "rss-ratio")
}

// resetPeakRSS sets the process's peak resident set back to its current
// resident set (Linux: 5 written to /proc/self/clear_refs); elsewhere it
// does nothing.
func resetPeakRSS() {
	_ = os.WriteFile("/proc/self/clear_refs", []byte("5"), 0)
}
