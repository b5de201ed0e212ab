package external_test

import (
	"io"
	"testing"

	"github.com/kweigh/kweigh/decode"
)

// benchDecode decodes file through the bridge b.N times and reports the
// speed as a multiple of real time (x-realtime), beside ffmpeg decoding the
// same file to a null sink in the same run (BenchmarkFFmpegAlone), which is
// the peer the bridge's overhead is measured against.
func benchDecode(b *testing.B, file string) {
	var seconds float64
	for b.Loop() {
		f, err := decode.Open(file)
		if err != nil {
			b.Fatal(err)
		}
		info := f.Info()
		buf := make([]float64, 4096*info.Channels)
		var frames int64
		for {
			n, err := f.ReadFrames(buf)
			frames += int64(n)
			if err == io.EOF {
				break
			}
			if err != nil {
				b.Fatal(err)
			}
		}
		f.Close()
		seconds += float64(frames) / float64(info.SampleRate)
	}
	b.ReportMetric(seconds/b.Elapsed().Seconds(), "x-realtime")
}

// BenchmarkAAC: 60 s of stereo AAC-LC in M4A through the bridge.
func BenchmarkAAC(b *testing.B) {
	f := fixtures(b)
	benchDecode(b, f.make(b, "bench.m4a", "-i", f.long(b), "-c:a", "aac", "-aac_pns", "0", "-b:a", "192k"))
}

// BenchmarkMXF: 4 s of 8 mono 24-bit PCM tracks in MXF through the bridge.
func BenchmarkMXF(b *testing.B) {
	benchDecode(b, fixtures(b).mxf8(b))
}

// BenchmarkFFmpegAlone: ffmpeg decoding the same AAC file to its null
// muxer, the peer of BenchmarkAAC.
func BenchmarkFFmpegAlone(b *testing.B) {
	f := fixtures(b)
	file := f.make(b, "bench.m4a", "-i", f.long(b), "-c:a", "aac", "-aac_pns", "0", "-b:a", "192k")
	for b.Loop() {
		encode(b, "-i", file, "-f", "null", "-")
	}
	b.ReportMetric(60*float64(b.N)/b.Elapsed().Seconds(), "x-realtime")
}
