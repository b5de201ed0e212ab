package wav_test

import (
	"bytes"
	"errors"
	"fmt"
	"io"
	"math"
	"testing"

	"github.com/kweigh/kweigh/decode"
	"github.com/kweigh/kweigh/decode/wav"
	"github.com/kweigh/kweigh/internal/audiotest"
)

// inPlaceFiles are files of every sample coding, each more than one read
// block (256 KiB) long and of a frame size that does not divide it.
func inPlaceFiles() map[string][]byte {
	const frames = 70001
	files := map[string][]byte{}
	for _, c := range []struct {
		channels, bits int
	}{{1, 8}, {2, 16}, {3, 24}, {6, 24}, {2, 32}} {
		data := encodeInts(testInts(frames*c.channels, c.bits), c.bits, c.bits)
		files[fmt.Sprintf("%dch-int%d", c.channels, c.bits)] = wavFile("RIFF", fmtChunk(1, c.channels, 48000, c.bits), chunk("data", data))
	}
	f32 := make([]float32, 2*frames)
	f64 := make([]float64, 5*frames)
	for i := range f32 {
		f32[i] = float32(math.Sin(float64(i)*0.01)) * 1.5
	}
	f32[7] = float32(math.NaN())
	for i := range f64 {
		f64[i] = math.Cos(float64(i)*0.003) * 2
	}
	f64[9] = math.Inf(-1)
	files["2ch-float32"] = wavFile("RIFF", fmtChunk(3, 2, 48000, 32), chunk("data", encodeFloat32(f32)))
	files["5ch-float64"] = wavFile("RIFF", fmtChunk(3, 5, 48000, 64), chunk("data", encodeFloat64(f64)))
	return files
}

// readSizes reads d to its end with buffers of the given frame counts in
// turn and returns the samples and the first error other than io.EOF.
func readSizes(t *testing.T, d decode.Decoder, sizes []int) ([]float64, error) {
	t.Helper()
	ch := d.Info().Channels
	var out []float64
	for k := 0; k < 10000; k++ {
		buf := make([]float64, sizes[k%len(sizes)]*ch)
		for i := range buf {
			buf[i] = 12345 // not a value any file holds
		}
		n, err := d.ReadFrames(buf)
		out = append(out, buf[:n*ch]...)
		if err != nil {
			if err == io.EOF {
				return out, nil
			}
			return out, err
		}
	}
	t.Fatal("never reached the end")
	return nil, nil
}

// TestReadInPlace checks that a request larger than the read block, which
// is read straight into the caller's buffer and converted there, decodes
// every coding to the same samples, bit for bit, as 4 096-frame requests
// through the decoder's own buffer, whatever mix of sizes the caller asks
// for, also when the file ends early (the damage at the same byte).
func TestReadInPlace(t *testing.T) {
	for name, file := range inPlaceFiles() {
		for _, cut := range []int{0, 3 * len(file) / 4} {
			f := file
			if cut > 0 {
				f = file[:cut]
			}
			want, wantErr := audiotest.ReadAll(t, open(t, f), 4096)
			for _, sizes := range [][]int{{1 << 20}, {100000, 3}, {5, 40000, 4096, 200000}} {
				got, err := readSizes(t, open(t, f), sizes)
				if fmt.Sprint(err) != fmt.Sprint(wantErr) {
					t.Errorf("%s cut at %d, sizes %v: error %v, want %v", name, cut, sizes, err, wantErr)
				}
				if len(got) != len(want) {
					t.Fatalf("%s cut at %d, sizes %v: %d samples, want %d", name, cut, sizes, len(got), len(want))
				}
				for i := range want {
					if math.Float64bits(got[i]) != math.Float64bits(want[i]) {
						t.Fatalf("%s cut at %d, sizes %v: sample %d is %v, want %v", name, cut, sizes, i, got[i], want[i])
					}
				}
			}
		}
	}
}

// failingSource fails every ReadAt that reaches beyond its first good
// bytes (the header is read through the embedded reader's other methods
// too).
type failingSource struct {
	*bytes.Reader
	data []byte
	good int64
}

var errDisk = errors.New("the disk went away")

func (s failingSource) ReadAt(p []byte, off int64) (int, error) {
	if off+int64(len(p)) <= s.good {
		return copy(p, s.data[off:]), nil
	}
	n := 0
	if off < s.good {
		n = copy(p, s.data[off:s.good])
	}
	return n, errDisk
}

// TestReadErrorAfterFrames checks that a read error met inside a large or
// a buffered read is returned after the whole frames read before it, on
// both paths alike, and then on every further call.
func TestReadErrorAfterFrames(t *testing.T) {
	file := inPlaceFiles()["3ch-int24"]
	src := failingSource{Reader: bytes.NewReader(file), data: file, good: int64(len(file)) / 2}
	for _, sizes := range [][]int{{4096}, {1 << 20}, {100000, 7}} {
		d, err := wav.New(src, int64(len(file)))
		if err != nil {
			t.Fatal(err)
		}
		got, err := readSizes(t, d, sizes)
		if !errors.Is(err, errDisk) {
			t.Fatalf("sizes %v: error %v, want the read error", sizes, err)
		}
		// (good − 44-byte header) / 9-byte frames, whole frames only.
		if frames := len(got) / 3; frames != int(src.good-44)/9 {
			t.Errorf("sizes %v: %d frames before the error, want %d", sizes, frames, (src.good-44)/9)
		}
		if _, again := d.ReadFrames(make([]float64, 3)); !errors.Is(again, errDisk) {
			t.Errorf("sizes %v: the next call returned %v", sizes, again)
		}
	}
}
