package external_test

import (
	"bytes"
	"testing"

	"github.com/kweigh/kweigh/decode/external"
)

// FuzzDetect runs the magic matchers on any bytes: they must never panic,
// and what they claim must start like the container they name. The seed
// corpus (testdata/fuzz/FuzzDetect) holds the first bytes of every kind of
// fixture, made by testdata/make-seeds.sh.
func FuzzDetect(f *testing.F) {
	f.Fuzz(func(t *testing.T, b []byte) {
		k := external.Detect(bytes.NewReader(b), int64(len(b)))
		switch k {
		case external.Matroska:
			if !bytes.HasPrefix(b, []byte{0x1A, 0x45, 0xDF, 0xA3}) {
				t.Fatal("Matroska without the EBML magic")
			}
		case external.Vorbis:
			if !bytes.HasPrefix(b, []byte("OggS")) {
				t.Fatal("Ogg Vorbis without an Ogg page")
			}
		case external.AC3, external.EAC3:
			if !bytes.HasPrefix(b, []byte{0x0B, 0x77}) {
				t.Fatal("AC-3 without the sync word")
			}
		}
	})
}
