package mp3

import (
	"bytes"
	"errors"
	"io"
	"os"
	"path/filepath"
	"testing"

	"github.com/mewkiz/flac"
)

// pcm is a decoded signal: interleaved samples scaled to ±1.
type pcm struct {
	rate, channels int
	samples        []float64
}

func (p pcm) frames() int { return len(p.samples) / p.channels }

// channel returns one channel of p.
func (p pcm) channel(c int) []float64 {
	out := make([]float64, p.frames())
	for i := range out {
		out[i] = p.samples[i*p.channels+c]
	}
	return out
}

// readFixture returns the bytes of testdata/name.
func readFixture(t testing.TB, name string) []byte {
	t.Helper()
	b, err := os.ReadFile(filepath.Join("testdata", name))
	if err != nil {
		t.Fatal(err)
	}
	return b
}

// readSource decodes a FLAC source fixture (the exact samples lame was
// given) with github.com/mewkiz/flac, scaled by 1/32768 as a 16-bit WAV is.
func readSource(t testing.TB, name string) pcm {
	t.Helper()
	stream, err := flac.New(bytes.NewReader(readFixture(t, name)))
	if err != nil {
		t.Fatalf("%s: %v", name, err)
	}
	info := stream.Info
	p := pcm{rate: int(info.SampleRate), channels: int(info.NChannels)}
	scale := 1 / float64(int(1)<<(info.BitsPerSample-1))
	for {
		f, err := stream.ParseNext()
		if errors.Is(err, io.EOF) {
			break
		}
		if err != nil {
			t.Fatalf("%s: %v", name, err)
		}
		for i := range int(f.BlockSize) {
			for c := range f.Subframes {
				p.samples = append(p.samples, float64(f.Subframes[c].Samples[i])*scale)
			}
		}
	}
	return p
}

// decoded is everything a decoder run produced.
type decoded struct {
	pcm
	dec   *Decoder
	notes []string
	err   error // the first non-EOF error ReadFrames returned
}

// decodeBytes decodes b completely with New and ReadFrames, reading in odd
// block sizes so that block boundaries fall everywhere.
func decodeBytes(t testing.TB, b []byte) decoded {
	t.Helper()
	d, err := New(bytes.NewReader(b), int64(len(b)))
	if err != nil {
		t.Fatalf("New: %v", err)
	}
	ch := d.Info().Channels
	out := decoded{pcm: pcm{rate: d.Info().SampleRate, channels: ch}, dec: d}
	buf := make([]float64, 1000*ch)
	for {
		n, err := d.ReadFrames(buf)
		out.samples = append(out.samples, buf[:n*ch]...)
		if errors.Is(err, io.EOF) {
			break
		}
		if err != nil {
			if out.err != nil {
				t.Fatalf("second error after %v: %v", out.err, err)
			}
			out.err = err
		}
	}
	out.notes = d.Notes()
	return out
}

// decodeFixture decodes testdata/name.
func decodeFixture(t testing.TB, name string) decoded {
	t.Helper()
	return decodeBytes(t, readFixture(t, name))
}
