package flac

import (
	"bytes"
	"errors"
	"io"
	"testing"

	"github.com/kweigh/kweigh/decode"
	"github.com/kweigh/kweigh/internal/audiotest"
)

// FuzzFLAC feeds arbitrary bytes to the wrapper. Whatever the input, the
// decoder must not panic, must return typed errors, must stop with io.EOF,
// and must never deliver more frames than a FLAC frame could hold per call.
// The seed corpus is in testdata/fuzz/FuzzFLAC plus the small fixtures.
func FuzzFLAC(f *testing.F) {
	for _, name := range []string{"mono8-8k.flac", "mono16-24k.flac"} {
		f.Add(audiotest.Fixture(f, name))
	}
	f.Fuzz(func(t *testing.T, data []byte) {
		if !match(bytes.NewReader(data), int64(len(data))) {
			return
		}
		d, err := NewDecoder(bytes.NewReader(data), int64(len(data)), DefaultOptions())
		if err != nil {
			var fe *decode.FormatError
			var ue *decode.UnsupportedError
			if !errors.As(err, &fe) && !errors.As(err, &ue) {
				t.Fatalf("NewDecoder: untyped error %T %v", err, err)
			}
			return
		}
		info := d.Info()
		if info.Channels < 1 || info.Channels > 8 || len(info.Layout) != info.Channels {
			t.Fatalf("info %+v", info)
		}
		buf := make([]float64, 1024*info.Channels)
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
			if err == io.EOF {
				return
			}
			if err != nil && !isIntegrity(err) {
				t.Fatalf("ReadFrames: untyped error %T %v", err, err)
			}
		}
	})
}
