package aiff

import (
	"bytes"
	"errors"
	"io"
	"path/filepath"
	"testing"

	"github.com/kweigh/kweigh/decode"
)

func source(t testing.TB, name string) *sourceWAV {
	t.Helper()
	w, err := readSourceWAV(filepath.Join("testdata", name))
	if err != nil {
		t.Fatal(err)
	}
	return w
}

// decodeAll reads data blockFrames frames at a time and returns the
// samples, the first non-EOF error and the decoder (nil if NewDecoder
// failed, its error then being returned).
func decodeAll(t testing.TB, data []byte, blockFrames int) ([]float64, error, *Decoder) {
	t.Helper()
	d, err := NewDecoder(bytes.NewReader(data), int64(len(data)))
	if err != nil {
		return nil, err, nil
	}
	ch := d.Info().Channels
	buf := make([]float64, blockFrames*ch)
	var out []float64
	var first error
	for calls := 0; ; calls++ {
		if calls > 1<<20 {
			t.Fatal("ReadFrames never reached io.EOF")
		}
		n, err := d.ReadFrames(buf)
		out = append(out, buf[:n*ch]...)
		if err == io.EOF {
			return out, first, d
		}
		if err != nil {
			if first != nil {
				t.Fatalf("second error %v after %v; want io.EOF", err, first)
			}
			first = err
		}
	}
}

func errorKind(err error) string {
	var fe *decode.FormatError
	var ue *decode.UnsupportedError
	var ie *decode.IntegrityError
	switch {
	case err == nil:
		return "none"
	case errors.As(err, &fe):
		return "format"
	case errors.As(err, &ue):
		return "unsupported"
	case errors.As(err, &ie):
		return "integrity"
	}
	return "untyped"
}
