package opus_test

import (
	"context"
	"encoding/binary"
	"errors"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"github.com/kweigh/kweigh/decode"
	"github.com/kweigh/kweigh/measure"
)

// pages splits an Ogg file into its pages.
func pages(t *testing.T, b []byte) [][]byte {
	var out [][]byte
	for off := 0; off < len(b); {
		n := 27 + int(b[off+26])
		for _, l := range b[off+27 : off+n] {
			n += int(l)
		}
		out = append(out, b[off:off+n])
		off += n
	}
	return out
}

// multiplex interleaves two Ogg streams as RFC 3533 section 4 allows: both
// BOS pages first, then the other pages alternately. b gets a new serial.
func multiplex(t *testing.T, a, b []byte) []byte {
	b = fixSerial(t, append([]byte(nil), b...), binary.LittleEndian.Uint32(a[14:])^0xA5A5)
	pa, pb := pages(t, a), pages(t, b)
	out := append(append([]byte(nil), pa[0]...), pb[0]...)
	for i := 1; i < max(len(pa), len(pb)); i++ {
		if i < len(pa) {
			out = append(out, pa[i]...)
		}
		if i < len(pb) {
			out = append(out, pb[i]...)
		}
	}
	return out
}

func fixSerial(t *testing.T, b []byte, serial uint32) []byte {
	binary.LittleEndian.PutUint32(b[14:], serial)
	return fixCRCs(t, b)
}

// TestMultiplexed: a second Opus stream multiplexed with the first is
// refused by name; a logical stream that is not Opus is skipped with a
// note, and the Opus audio decodes exactly as it does alone.
func TestMultiplexed(t *testing.T) {
	dir := t.TempDir()
	a, ref := encodeOpus(t, dir, "a", 48000, 2, 1.5)
	b, _ := encodeOpus(t, dir, "b", 48000, 2, 1)
	ab, _ := os.ReadFile(a)
	bb, _ := os.ReadFile(b)

	two := filepath.Join(dir, "two.opus")
	os.WriteFile(two, multiplex(t, ab, bb), 0o644)
	_, err := decode.Open(two)
	var u *decode.UnsupportedError
	if !errors.As(err, &u) || !strings.Contains(err.Error(), "second Opus stream") {
		t.Errorf("two Opus streams: error %v", err)
	}

	// The other stream's header renamed: a logical stream of some other
	// codec, as a video track would be.
	other := append([]byte(nil), bb...)
	head := 27 + int(other[26])
	copy(other[head:], "XvidHead")
	withOther := filepath.Join(dir, "with-other.opus")
	os.WriteFile(withOther, multiplex(t, ab, other), 0o644)
	compare(t, withOther, ref, "L,R")
	m := measure.File(context.Background(), withOther, measure.Options{})
	if !strings.Contains(strings.Join(m.Notes, ";"), "non-Opus logical stream") {
		t.Errorf("notes %q", m.Notes)
	}
}
