package mp3

import (
	"bytes"
	"testing"

	"github.com/kweigh/kweigh/internal/audiotest"
)

// BenchmarkDecode decodes the 4 s, 48 kHz stereo, 128 kbit/s fixture from
// memory and reports the speed as a multiple of real time, by wall clock
// (x-realtime) and by process CPU time (x-realtime-cpu).
func BenchmarkDecode(b *testing.B) {
	audiotest.RunDecodeBenchmark(b, audiotest.Fixture(b, "music-s48-128.mp3"), New)
}

// BenchmarkJunkTail opens and decodes the 4 s fixture followed by 20 MB of
// 0xFF bytes (issue 8: one read per byte made this take 20 s); the tail
// is scanned for a resumed stream once, in memory.
func BenchmarkJunkTail(b *testing.B) {
	data := junkTail(audiotest.Fixture(b, "music-s48-128.mp3"), 20<<20)
	buf := make([]float64, 4096*2)
	b.SetBytes(int64(len(data)))
	for b.Loop() {
		d, err := New(bytes.NewReader(data), int64(len(data)))
		if err != nil {
			b.Fatal(err)
		}
		if _, err := audiotest.CountFrames(d, buf); err != nil {
			b.Fatal(err)
		}
	}
}
