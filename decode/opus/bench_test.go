package opus_test

import (
	"bytes"
	"io"
	"os"
	"os/exec"
	"path/filepath"
	"testing"

	"github.com/kweigh/kweigh/decode/opus"
)

// benchFile makes 30 s of stereo Opus at 128 kbit/s with opusenc.
func benchFile(b *testing.B) string {
	file, _ := encodeOpus(b, b.TempDir(), "bench", 48000, 2, 30, "--bitrate", "128")
	return file
}

// BenchmarkOpus decodes 30 s of stereo Opus from memory and reports the
// speed as a multiple of real time; BenchmarkOpusdec is the peer in the
// same run.
func BenchmarkOpus(b *testing.B) {
	raw, err := os.ReadFile(benchFile(b))
	if err != nil {
		b.Fatal(err)
	}
	buf := make([]float64, 4096*2)
	var frames int64
	for b.Loop() {
		d, err := opus.New(bytes.NewReader(raw), int64(len(raw)))
		if err != nil {
			b.Fatal(err)
		}
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
	b.ReportMetric(float64(frames)/opus.Rate/b.Elapsed().Seconds(), "x-realtime")
}

// BenchmarkOpusdec runs Debian's opusdec --float on the same file, writing
// to /dev/null.
func BenchmarkOpusdec(b *testing.B) {
	file := benchFile(b)
	out := filepath.Join(b.TempDir(), "out.wav")
	for b.Loop() {
		if err := exec.Command("opusdec", "--quiet", "--float", "--rate", "48000", file, out).Run(); err != nil {
			b.Fatal(err)
		}
	}
	b.ReportMetric(30*float64(b.N)/b.Elapsed().Seconds(), "x-realtime")
}
