package mp3

import (
	"bytes"
	"io"
	"testing"
)

// BenchmarkDecode decodes the 4 s, 48 kHz stereo, 128 kbit/s fixture from
// memory and reports the speed as a multiple of real time.
func BenchmarkDecode(b *testing.B) {
	data := readFixture(b, "music-s48-128.mp3")
	buf := make([]float64, 4096*2)
	var frames int64
	b.SetBytes(int64(len(data)))
	b.ReportAllocs()
	for b.Loop() {
		d, err := New(bytes.NewReader(data), int64(len(data)))
		if err != nil {
			b.Fatal(err)
		}
		frames = 0
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
	seconds := float64(frames) / 48000
	b.ReportMetric(seconds*float64(b.N)/b.Elapsed().Seconds(), "x-realtime")
}
