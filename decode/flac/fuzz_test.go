package flac

import (
	"bytes"
	"errors"
	"fmt"
	"io"
	"math"
	"strings"
	"testing"

	"github.com/kweigh/kweigh/decode"
	"github.com/kweigh/kweigh/internal/audiotest"
	mewflac "github.com/mewkiz/flac"
)

// FuzzFLAC feeds the same bytes to this decoder and to mewkiz/flac (the
// test oracle). Neither may panic. This decoder must return typed errors,
// stop with io.EOF, keep samples within full scale, and never accept what
// is plainly broken: when it decodes a stream cleanly, the oracle must not
// find a CRC mismatch in it, and where both decode every frame the samples
// must agree exactly. The seed corpus is in testdata/fuzz/FuzzFLAC plus
// the small fixtures.
func FuzzFLAC(f *testing.F) {
	for _, name := range []string{"mono8-8k.flac", "mono16-24k.flac"} {
		f.Add(audiotest.Fixture(f, name))
	}
	f.Fuzz(func(t *testing.T, data []byte) {
		if !match(bytes.NewReader(data), int64(len(data))) {
			return
		}
		ours, bits, err := fuzzOurs(t, data)
		oracle, oracleErr := fuzzOracle(data)
		if oracleErr != nil && strings.HasPrefix(oracleErr.Error(), "the oracle panicked") {
			t.Fatal(oracleErr)
		}
		if err != nil || bits < 8 || bits > 24 {
			return // damaged input, or a width the oracle does not read
		}
		if oracleErr != nil && strings.Contains(oracleErr.Error(), "checksum mismatch") {
			t.Fatalf("decoded cleanly, but the oracle finds %v", oracleErr)
		}
		if oracleErr == nil {
			if len(oracle) != len(ours) {
				t.Fatalf("%d samples, the oracle %d", len(ours), len(oracle))
			}
			scale := math.Ldexp(1, bits-1)
			for i, v := range oracle {
				if float64(v) != ours[i]*scale {
					t.Fatalf("sample %d = %v, the oracle %d", i, ours[i]*scale, v)
				}
			}
		}
	})
}

// fuzzOurs decodes data with this package, checking the decoder contract,
// and returns the samples, the bit depth and the first error.
func fuzzOurs(t *testing.T, data []byte) ([]float64, int, error) {
	d, err := NewDecoder(bytes.NewReader(data), int64(len(data)), DefaultOptions())
	if err != nil {
		var fe *decode.FormatError
		var ue *decode.UnsupportedError
		if !errors.As(err, &fe) && !errors.As(err, &ue) {
			t.Fatalf("NewDecoder: untyped error %T %v", err, err)
		}
		return nil, 0, err
	}
	info := d.Info()
	if info.Channels < 1 || info.Channels > 8 || len(info.Layout) != info.Channels {
		t.Fatalf("info %+v", info)
	}
	buf := make([]float64, 1024*info.Channels)
	var out []float64
	var first error
	for calls := 0; ; calls++ {
		if calls > 1<<16 {
			t.Fatal("no io.EOF")
		}
		n, err := d.ReadFrames(buf)
		for _, v := range buf[:n*info.Channels] {
			if v < -1 || v >= 1 {
				t.Fatalf("sample %v outside [-1, 1)", v)
			}
		}
		if len(out) < 1<<22 {
			out = append(out, buf[:n*info.Channels]...)
		}
		switch {
		case err == io.EOF:
			return out, info.BitsPerSample, first
		case err != nil && !isIntegrity(err):
			t.Fatalf("ReadFrames: untyped error %T %v", err, err)
		case err != nil && first != nil:
			t.Fatalf("second error %v after %v", err, first)
		case err != nil:
			first = err
		}
	}
}

// fuzzOracle decodes data with mewkiz/flac; a panic is returned as an
// error for the caller to fail on.
func fuzzOracle(data []byte) (samples []int32, err error) {
	defer func() {
		if p := recover(); p != nil {
			err = fmt.Errorf("the oracle panicked: %v", p)
		}
	}()
	stream, err := mewflac.New(bytes.NewReader(data))
	if err != nil {
		return nil, err
	}
	for len(samples) < 1<<22 {
		fr, err := stream.ParseNext()
		if err == io.EOF {
			return samples, nil
		}
		if err != nil {
			return nil, err
		}
		for i := range int(fr.BlockSize) {
			for _, sub := range fr.Subframes {
				samples = append(samples, sub.Samples[i])
			}
		}
	}
	return samples, nil
}
