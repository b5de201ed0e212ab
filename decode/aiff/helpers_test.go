package aiff

import (
	"bytes"
	"errors"
	"testing"

	"github.com/kweigh/kweigh/decode"
	"github.com/kweigh/kweigh/internal/audiotest"
)

// decodeAll reads data blockFrames frames at a time and returns the
// samples, the first non-EOF error and the decoder (nil if NewDecoder
// failed, its error then being returned).
func decodeAll(t testing.TB, data []byte, blockFrames int) ([]float64, error, *Decoder) {
	t.Helper()
	d, err := NewDecoder(bytes.NewReader(data), int64(len(data)))
	if err != nil {
		return nil, err, nil
	}
	got, err := audiotest.ReadAll(t, d, blockFrames)
	return got, err, d
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
