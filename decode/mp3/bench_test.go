package mp3

import (
	"testing"

	"github.com/kweigh/kweigh/internal/audiotest"
)

// BenchmarkDecode decodes the 4 s, 48 kHz stereo, 128 kbit/s fixture from
// memory and reports the speed as a multiple of real time, by wall clock
// (x-realtime) and by process CPU time (x-realtime-cpu).
func BenchmarkDecode(b *testing.B) {
	audiotest.RunDecodeBenchmark(b, audiotest.Fixture(b, "music-s48-128.mp3"), New)
}
