package audiotest

import (
	"bytes"
	"testing"

	"github.com/kweigh/kweigh/decode"
)

// benchBlockFrames is the buffer a decode benchmark reads into, in frames:
// the block size kweigh's measuring loop uses.
const benchBlockFrames = 4096

// RunDecodeBenchmark decodes the file held in data b.N times, each time with a
// fresh decoder from newDecoder reading into one buffer of 4096 frames, and
// reports the file's bytes per op, the allocations and the speed as a
// multiple of real time by wall clock and by process CPU time
// (StartRealtime). It returns the frames one decode delivered, for the
// caller to check.
func RunDecodeBenchmark[D decode.Decoder](b *testing.B, data []byte, newDecoder func(src decode.Source, size int64) (D, error)) int64 {
	b.Helper()
	first, err := newDecoder(bytes.NewReader(data), int64(len(data)))
	if err != nil {
		b.Fatal(err)
	}
	info := first.Info()
	buf := make([]float64, benchBlockFrames*info.Channels)
	var frames int64
	b.SetBytes(int64(len(data)))
	b.ReportAllocs()
	clock := StartRealtime(b)
	for b.Loop() {
		d, err := newDecoder(bytes.NewReader(data), int64(len(data)))
		if err != nil {
			b.Fatal(err)
		}
		if frames, err = CountFrames(d, buf); err != nil {
			b.Fatal(err)
		}
	}
	clock.Report(float64(frames) / float64(info.SampleRate))
	return frames
}
