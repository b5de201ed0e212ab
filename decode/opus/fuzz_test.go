package opus_test

import (
	"bytes"
	"testing"

	"github.com/kweigh/kweigh/decode/opus"
)

// FuzzOpus runs the whole decoder (Ogg pages, headers, packets) on any
// bytes: it must return an error or audio, never panic or stall. The seed
// corpus (testdata/fuzz/FuzzOpus) holds small opusenc files, mono, stereo
// and 5.1, and damaged copies.
func FuzzOpus(f *testing.F) {
	f.Fuzz(func(t *testing.T, b []byte) {
		if !opus.Match(bytes.NewReader(b), int64(len(b))) {
			return
		}
		d, err := opus.New(bytes.NewReader(b), int64(len(b)))
		if err != nil {
			return
		}
		buf := make([]float64, 1024*d.Info().Channels)
		// A few seconds of audio are enough to exercise every path; a
		// mutated file of 1-byte packets can legitimately hold many
		// minutes, which would only slow the fuzzer down.
		for range 300 {
			n, err := d.ReadFrames(buf)
			if err != nil {
				return
			}
			if n == 0 {
				t.Fatal("no progress and no error")
			}
		}
	})
}

// FuzzParseHead checks the OpusHead parser on any bytes.
func FuzzParseHead(f *testing.F) {
	f.Add([]byte("OpusHead\x01\x02\x38\x01\x80\xbb\x00\x00\x00\x00\x00"))
	f.Add([]byte("OpusHead\x01\x06\x38\x01\x44\xac\x00\x00\x00\x00\x01\x04\x02\x00\x04\x01\x02\x03\x05"))
	f.Fuzz(func(t *testing.T, b []byte) {
		h, err := opus.ParseHead(b)
		if err == nil && (len(h.Mapping) != h.Channels || h.Streams < 1) {
			t.Fatalf("accepted an inconsistent header: %+v", h)
		}
	})
}
