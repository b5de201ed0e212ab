package mp3

import (
	"errors"
	"path/filepath"
	"strings"
	"testing"

	"github.com/kweigh/kweigh/decode"
)

func TestCRCDamageCounted(t *testing.T) {
	// lame -p writes the CRC-16 of ISO/IEC 11172-3 §2.4.3.1 into every
	// frame. Flipping a bit of the side information of three frames must
	// make exactly those three fail the check: the file still decodes to
	// its full length (silence where the frames were bad, so the timing
	// holds), and then reports one *decode.IntegrityError that counts
	// them and names the first frame's offset.
	dir := t.TempDir()
	src := filepath.Join(dir, "a.wav")
	writeWAV16(t, src, 44100, 2, richSignal(44100, 2, 3, 9))
	b := lameEncode(t, src, "a.mp3", "-p", "-b", "128")
	clean := decodeBytes(t, b)
	if clean.err != nil {
		t.Fatalf("undamaged stream: %v", clean.err)
	}
	var offsets []int
	off, n := 0, 0
	for off+4 <= len(b) {
		h, err := parseHeader(b[off:])
		if err != nil {
			t.Fatalf("byte %d: %v", off, err)
		}
		if !h.protected {
			t.Fatalf("byte %d: frame without CRC", off)
		}
		if n == 20 || n == 40 || n == 60 {
			b[off+8] ^= 0x10 // inside the side information
			offsets = append(offsets, off)
		}
		off += h.frameLen()
		n++
	}
	got := decodeBytes(t, b)
	var ie *decode.IntegrityError
	if !errors.As(got.err, &ie) {
		t.Fatalf("got %v, want *decode.IntegrityError", got.err)
	}
	if ie.Offset != int64(offsets[0]) || !strings.HasPrefix(ie.Problem, "3 of ") || !strings.Contains(ie.Problem, "CRC-16") {
		t.Errorf("error at byte %d %q; want at byte %d, counting 3 frames, naming the CRC", ie.Offset, ie.Problem, offsets[0])
	}
	if got.frames() != clean.frames() {
		t.Errorf("%d frames decoded, the undamaged stream %d", got.frames(), clean.frames())
	}
	t.Logf("%v", got.err)
}
