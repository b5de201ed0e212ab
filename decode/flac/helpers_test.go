package flac

import (
	"bytes"
	"errors"
	"testing"

	"github.com/kweigh/kweigh/decode"
	"github.com/kweigh/kweigh/internal/audiotest"
)

// decodeAll decodes data with the given options, reading blockFrames frames
// at a time, and returns the samples, the first non-EOF error and the
// decoder.
func decodeAll(t testing.TB, data []byte, opts Options, blockFrames int) ([]float64, error, *Decoder) {
	t.Helper()
	d, err := NewDecoder(bytes.NewReader(data), int64(len(data)), opts)
	if err != nil {
		return nil, err, nil
	}
	got, err := audiotest.ReadAll(t, d, blockFrames)
	return got, err, d
}

func isIntegrity(err error) bool {
	var ie *decode.IntegrityError
	return errors.As(err, &ie)
}

func isFormat(err error) bool {
	var fe *decode.FormatError
	return errors.As(err, &fe)
}
