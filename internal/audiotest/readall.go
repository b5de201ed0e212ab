package audiotest

import (
	"io"
	"testing"

	"github.com/kweigh/kweigh/decode"
)

// maxReadCalls bounds the ReadFrames calls ReadAll makes, so that a decoder
// that never reaches io.EOF fails the test instead of hanging it.
const maxReadCalls = 1 << 22

// ReadAll reads d to io.EOF, blockFrames frames at a time, and returns every
// sample delivered and the first error other than io.EOF. It holds d to the
// decode.Decoder contract: tb fails if ReadFrames claims more frames than
// the buffer holds, returns 0 frames without an error, returns a second
// error instead of io.EOF after the first, or never reaches io.EOF.
func ReadAll(tb testing.TB, d decode.Decoder, blockFrames int) ([]float64, error) {
	tb.Helper()
	ch := d.Info().Channels
	buf := make([]float64, blockFrames*ch)
	var out []float64
	var first error
	for range maxReadCalls {
		n, err := d.ReadFrames(buf)
		if n < 0 || n > blockFrames {
			tb.Fatalf("ReadFrames returned %d frames into a %d-frame buffer", n, blockFrames)
		}
		out = append(out, buf[:n*ch]...)
		switch {
		case err == io.EOF:
			return out, first
		case err != nil && first != nil:
			tb.Fatalf("second error %v after %v; want io.EOF", err, first)
		case err != nil:
			first = err
		case n == 0:
			tb.Fatal("ReadFrames returned 0 frames and no error")
		}
	}
	tb.Fatal("ReadFrames never reached io.EOF")
	return nil, nil
}

// CountFrames reads d to io.EOF into buf and returns the number of frames
// read; it stops at the first other error and returns it. It allocates
// nothing, for benchmark loops.
func CountFrames(d decode.Decoder, buf []float64) (int64, error) {
	var frames int64
	for {
		n, err := d.ReadFrames(buf)
		frames += int64(n)
		if err == io.EOF {
			return frames, nil
		}
		if err != nil {
			return frames, err
		}
	}
}

// DecodeFile opens path through the decode registry and returns all its
// samples and its Info; tb fails on any error. The caller imports the
// formats it needs.
func DecodeFile(tb testing.TB, path string) ([]float64, decode.Info) {
	tb.Helper()
	f, err := decode.Open(path)
	if err != nil {
		tb.Fatal(err)
	}
	defer f.Close()
	samples, err := ReadAll(tb, f, 3000)
	if err != nil {
		tb.Fatalf("%s: %v", path, err)
	}
	return samples, f.Info()
}
