package mp3

import (
	"bytes"
	"errors"
	"io"
	"testing"

	"github.com/kweigh/kweigh/internal/audiotest"
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

// readSource decodes a FLAC source fixture (the exact samples lame was
// given) with github.com/mewkiz/flac, scaled by 1/32768 as a 16-bit WAV is.
func readSource(t testing.TB, name string) pcm {
	t.Helper()
	stream, err := flac.New(bytes.NewReader(audiotest.Fixture(t, name)))
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
	out.samples, out.err = audiotest.ReadAll(t, d, 1000)
	out.notes = d.Notes()
	return out
}

// decodeFixture decodes testdata/name.
func decodeFixture(t testing.TB, name string) decoded {
	t.Helper()
	return decodeBytes(t, audiotest.Fixture(t, name))
}
