package flac

import (
	"bytes"
	"errors"
	"io"
	"os"
	"path/filepath"
	"testing"

	"github.com/kweigh/kweigh/decode"
)

func fixture(t testing.TB, name string) []byte {
	t.Helper()
	b, err := os.ReadFile(filepath.Join("testdata", name))
	if err != nil {
		t.Fatal(err)
	}
	return b
}

// decodeAll decodes data with the given options, reading blockFrames frames
// at a time, and returns the samples, the first non-EOF error and the
// decoder.
func decodeAll(t testing.TB, data []byte, opts Options, blockFrames int) ([]float64, error, *Decoder) {
	t.Helper()
	d, err := NewDecoder(bytes.NewReader(data), int64(len(data)), opts)
	if err != nil {
		return nil, err, nil
	}
	ch := d.Info().Channels
	buf := make([]float64, blockFrames*ch)
	var out []float64
	var firstErr error
	for calls := 0; ; calls++ {
		if calls > 1<<22 {
			t.Fatal("ReadFrames never reached io.EOF")
		}
		n, err := d.ReadFrames(buf)
		out = append(out, buf[:n*ch]...)
		if err == io.EOF {
			break
		}
		if err != nil {
			if firstErr != nil {
				t.Fatalf("second error after %v: %v (want io.EOF)", firstErr, err)
			}
			firstErr = err
		}
	}
	return out, firstErr, d
}

func isIntegrity(err error) bool {
	var ie *decode.IntegrityError
	return errors.As(err, &ie)
}

func isFormat(err error) bool {
	var fe *decode.FormatError
	return errors.As(err, &fe)
}
