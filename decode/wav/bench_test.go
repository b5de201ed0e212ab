package wav_test

import (
	"encoding/binary"
	"math"
	"os"
	"path/filepath"
	"testing"

	"github.com/kweigh/kweigh/decode"
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

// BenchmarkReadFile decodes the one-minute 24-bit file of BenchmarkReadFrames
// from a real file (from the page cache after the first loop: not the
// disk), with the 4 096-frame requests kweigh's measurement makes, two
// ways in the same run: "read" through read calls (the file hidden behind
// a wrapper, as any Source that is not an *os.File is read) and "mapped"
// from a mapping of the file (what decode.Open does for a regular file).
// x-realtime-cpu is the figure on a shared machine. Metrics: reads/s-audio,
// read calls per second of audio; minflt/s-audio, minor page faults of the
// process per second of audio (Linux).
//
//	go test -run '^$' -bench ReadFile -benchtime 20x -cpu 1 ./decode/wav
func BenchmarkReadFile(b *testing.B) {
	path := filepath.Join(b.TempDir(), "programme.wav")
	if err := os.WriteFile(path, benchFile(1, 24), 0o644); err != nil {
		b.Fatal(err)
	}
	for _, mapped := range []bool{false, true} {
		name := "read"
		if mapped {
			name = "mapped"
		}
		b.Run(name, func(b *testing.B) {
			buf := make([]float64, 4096*2)
			var frames int64
			counter := &countingFile{}
			faults := minorFaults()
			clock := audiotest.StartRealtime(b)
			for b.Loop() {
				f, err := os.Open(path)
				if err != nil {
					b.Fatal(err)
				}
				st, _ := f.Stat()
				var src decode.Source = f
				if !mapped {
					counter.File = f
					src = counter
				}
				d, err := wav.New(src, st.Size())
				if err != nil {
					b.Fatal(err)
				}
				if frames, err = audiotest.CountFrames(d, buf); err != nil {
					b.Fatal(err)
				}
				f.Close()
			}
			clock.Report(float64(frames) / 48000)
			audio := float64(b.N) * float64(frames) / 48000
			if !mapped {
				b.ReportMetric(float64(counter.reads)/audio, "reads/s-audio")
			}
			if faults >= 0 {
				b.ReportMetric(float64(minorFaults()-faults)/audio, "minflt/s-audio")
			}
		})
	}
}

// BenchmarkReadLongFile is BenchmarkReadFile on 345 MB, more than the
// CPU's caches hold (20 minutes of 48 kHz stereo 24-bit: the bytes of a
// 10-minute 96 kHz file), so that both ways read the page cache from
// memory, as the measurement of a long file does; "read" and "mapped" in
// the same run. Metrics per file read: user-ms and sys-ms, the process's
// user and system CPU time, and minflt, its minor page faults (Linux).
//
//	go test -run '^$' -bench ReadLongFile -benchtime 3x -cpu 1 ./decode/wav
func BenchmarkReadLongFile(b *testing.B) {
	const minutes = 20
	one := benchFile(1, 24)
	header, data := one[:44], one[44:]
	le := binary.LittleEndian
	le.PutUint32(header[4:], uint32(36+minutes*len(data)))
	le.PutUint32(header[40:], uint32(minutes*len(data)))
	path := filepath.Join(b.TempDir(), "long-programme.wav")
	f, err := os.Create(path)
	if err != nil {
		b.Fatal(err)
	}
	if _, err := f.Write(header); err != nil {
		b.Fatal(err)
	}
	for range minutes {
		if _, err := f.Write(data); err != nil {
			b.Fatal(err)
		}
	}
	if err := f.Close(); err != nil {
		b.Fatal(err)
	}
	for _, mapped := range []bool{false, true} {
		name := "read"
		if mapped {
			name = "mapped"
		}
		b.Run(name, func(b *testing.B) {
			buf := make([]float64, 4096*2)
			var frames int64
			user, sys, faults := usage()
			clock := audiotest.StartRealtime(b)
			for b.Loop() {
				f, err := os.Open(path)
				if err != nil {
					b.Fatal(err)
				}
				st, _ := f.Stat()
				var src decode.Source = f
				if !mapped {
					src = &countingFile{File: f}
				}
				d, err := wav.New(src, st.Size())
				if err != nil {
					b.Fatal(err)
				}
				if frames, err = audiotest.CountFrames(d, buf); err != nil {
					b.Fatal(err)
				}
				f.Close()
			}
			clock.Report(float64(frames) / 48000)
			user2, sys2, faults2 := usage()
			if faults >= 0 {
				n := float64(b.N)
				b.ReportMetric(float64(user2-user)/1e6/n, "user-ms")
				b.ReportMetric(float64(sys2-sys)/1e6/n, "sys-ms")
				b.ReportMetric(float64(faults2-faults)/n, "minflt")
			}
		})
	}
}

// countingFile counts the ReadAt calls on a file.
type countingFile struct {
	*os.File
	reads int
}

func (c *countingFile) ReadAt(p []byte, off int64) (int, error) {
	c.reads++
	return c.File.ReadAt(p, off)
}
