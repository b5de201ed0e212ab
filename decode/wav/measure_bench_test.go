package wav_test

import (
	"context"
	"encoding/binary"
	"math"
	"math/rand/v2"
	"os"
	"path/filepath"
	"testing"
	"time"

	"github.com/kweigh/kweigh/decode"
	"github.com/kweigh/kweigh/decode/wav"
	"github.com/kweigh/kweigh/measure"
)

// programmeMinute is one minute of 24-bit programme-like audio: every
// channel its own low-passed noise under a slow envelope at broadcast
// level (not full-scale noise, whose true-peak search would hide what
// reading costs).
func programmeMinute(rate, channels int) []byte {
	rng := rand.New(rand.NewPCG(uint64(rate), uint64(channels)))
	lp := make([]float64, channels)
	v := make([]int32, 0, 60*rate*channels)
	for i := range 60 * rate {
		t := float64(i) / float64(rate)
		env := 0.05 + 0.1*(1+math.Sin(2*math.Pi*3.1*t))*(1+math.Sin(2*math.Pi*0.23*t))
		for c := range lp {
			lp[c] += 0.3 * (rng.NormFloat64() - lp[c])
			v = append(v, int32(math.Round(env*lp[c]*(1<<23-1))))
		}
	}
	return encodeInts(v, 24, 24)
}

// BenchmarkMeasureMapped is the full measurement (package measure, one
// core) of a 10-minute 24-bit WAV read through read calls and converted
// from a mapping, both in each loop, so that a busy machine slows both
// alike. Metrics: x-realtime-cpu-read and x-realtime-cpu-mapped, seconds
// of audio per second of the process's CPU time; mapped/read, their
// ratio; sys-ms-read and sys-ms-mapped, system time per file.
//
//	go test -run '^$' -bench MeasureMapped -benchtime 4x -cpu 1 ./decode/wav
func BenchmarkMeasureMapped(b *testing.B) {
	for _, c := range []struct {
		name           string
		rate, channels int
	}{
		{"96k-stereo", 96000, 2},
		{"48k-5.1", 48000, 6},
	} {
		b.Run(c.name, func(b *testing.B) {
			const minutes = 10
			minute := programmeMinute(c.rate, c.channels)
			head := wavFile("RIFF", fmtChunk(1, c.channels, c.rate, 24), chunk("data", nil))
			binary.LittleEndian.PutUint32(head[4:], uint32(len(head)-8+minutes*len(minute)))
			binary.LittleEndian.PutUint32(head[len(head)-4:], uint32(minutes*len(minute)))
			path := filepath.Join(b.TempDir(), c.name+".wav")
			f, err := os.Create(path)
			if err != nil {
				b.Fatal(err)
			}
			if _, err := f.Write(head); err != nil {
				b.Fatal(err)
			}
			for range minutes {
				if _, err := f.Write(minute); err != nil {
					b.Fatal(err)
				}
			}
			if err := f.Close(); err != nil {
				b.Fatal(err)
			}
			var cpu, sys [2]time.Duration
			b.ResetTimer()
			for b.Loop() {
				for i, mapped := range []bool{false, true} {
					user0, sys0, _ := usage()
					f, err := os.Open(path)
					if err != nil {
						b.Fatal(err)
					}
					var src decode.Source = f
					if !mapped {
						src = &countingFile{File: f}
					}
					d, err := wav.New(src, int64(len(head)+minutes*len(minute)))
					if err != nil {
						b.Fatal(err)
					}
					if mapped && !wav.Mapped(d) {
						b.Skip("files are not mapped on this system")
					}
					if m := measure.Stream(context.Background(), path, d, measure.Options{}); m.Error != "" {
						b.Fatal(m.Error)
					}
					f.Close()
					user1, sys1, _ := usage()
					cpu[i] += user1 - user0 + sys1 - sys0
					sys[i] += sys1 - sys0
				}
			}
			audio := 60 * minutes * float64(b.N)
			if cpu[0] > 0 && cpu[1] > 0 {
				b.ReportMetric(audio/cpu[0].Seconds(), "x-realtime-cpu-read")
				b.ReportMetric(audio/cpu[1].Seconds(), "x-realtime-cpu-mapped")
				b.ReportMetric(cpu[0].Seconds()/cpu[1].Seconds(), "mapped/read")
				b.ReportMetric(float64(sys[0].Milliseconds())/float64(b.N), "sys-ms-read")
				b.ReportMetric(float64(sys[1].Milliseconds())/float64(b.N), "sys-ms-mapped")
			}
		})
	}
}
