package fix

import (
	"io"
	"math"
	"math/rand/v2"
	"os"
	"path/filepath"
	"testing"

	"github.com/kweigh/kweigh/decode"
	"github.com/mewkiz/flac"
)

// TestFLACPredictionRoundTrip encodes hard blocks through writeFLAC's
// analysis and the library's bit writer and decodes them with the library's
// decoder (an independent reading of the stream): every sample must come
// back bit for bit. The blocks: full-scale 24-bit white noise (the side
// channel then needs 25 bits and the 5-bit Rice parameters), a full-scale
// square wave, silence with single-sample spikes, a pure sine (where
// linear prediction must win), and a short last block.
func TestFLACPredictionRoundTrip(t *testing.T) {
	const bps = 24
	full := int32(1<<(bps-1) - 1)
	rng := rand.New(rand.NewPCG(5, 6))
	n := flacBlockFrames*4 + 1000
	signals := map[string][2][]int32{}
	mk := func(f func(i, k int) int32) [2][]int32 {
		var s [2][]int32
		for k := range s {
			s[k] = make([]int32, n)
			for i := range n {
				s[k][i] = f(i, k)
			}
		}
		return s
	}
	signals["noise"] = mk(func(i, k int) int32 { return int32(rng.Int64N(int64(2*full)+1)) - full })
	signals["square"] = mk(func(i, k int) int32 {
		if (i/37)%2 == k {
			return full
		}
		return -full - 1
	})
	signals["spikes"] = mk(func(i, k int) int32 {
		if i%1999 == 0 {
			return full
		}
		return 0
	})
	signals["sine"] = mk(func(i, k int) int32 {
		return int32(math.Round(0.7 * float64(full) * math.Sin(2*math.Pi*997*float64(i)/48000+float64(k))))
	})
	for name, s := range signals {
		x := make([]float64, 2*n)
		for i := range n {
			x[2*i] = float64(s[0][i]) / float64(full+1)
			x[2*i+1] = float64(s[1][i]) / float64(full+1)
		}
		src := &sliceDecoder{x: x, info: flacInfo(bps)}
		path := filepath.Join(t.TempDir(), name+".flac")
		f, err := os.Create(path)
		if err != nil {
			t.Fatal(err)
		}
		if _, err := writeFLAC(f, newChain(src, 1, nil, nil), nil); err != nil {
			t.Fatalf("%s: %v", name, err)
		}
		f.Close()
		st, _ := os.Stat(path)
		got := decodeMewkiz(t, path)
		if len(got[0]) != n {
			t.Fatalf("%s: %d frames back, want %d", name, len(got[0]), n)
		}
		for k := range 2 {
			for i := range n {
				if got[k][i] != s[k][i] {
					t.Fatalf("%s: channel %d sample %d = %d, want %d", name, k, i, got[k][i], s[k][i])
				}
			}
		}
		t.Logf("%s: %.2f bits per sample", name, float64(st.Size()*8)/float64(2*n))
		if name == "sine" && st.Size()*8 > int64(2*n*10) {
			t.Errorf("a pure sine took %d bytes: linear prediction did not work", st.Size())
		}
	}
}

func flacInfo(bps int) decode.Info {
	return decode.Info{Container: "flac", SampleRate: 48000, Channels: 2, BitsPerSample: bps, Frames: -1}
}

// decodeMewkiz decodes a FLAC file with github.com/mewkiz/flac's decoder,
// per channel.
func decodeMewkiz(t *testing.T, path string) [2][]int32 {
	t.Helper()
	s, err := flac.ParseFile(path)
	if err != nil {
		t.Fatal(err)
	}
	defer s.Close()
	var out [2][]int32
	for {
		fr, err := s.ParseNext()
		if err == io.EOF {
			return out
		}
		if err != nil {
			t.Fatal(err)
		}
		for k := range out {
			out[k] = append(out[k], fr.Subframes[k].Samples...)
		}
	}
}

// sliceDecoder serves interleaved samples as a decode.Decoder.
type sliceDecoder struct {
	x    []float64
	info decode.Info
}

func (d *sliceDecoder) Info() decode.Info { return d.info }

func (d *sliceDecoder) ReadFrames(dst []float64) (int, error) {
	if len(d.x) == 0 {
		return 0, io.EOF
	}
	n := copy(dst, d.x)
	d.x = d.x[n:]
	return n / d.info.Channels, nil
}
