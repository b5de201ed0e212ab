package mp3

import (
	"errors"
	"fmt"
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

func TestDamageBetweenFramesSkipped(t *testing.T) {
	// Real lame encodes (CBR and VBR, 44.1 kHz stereo) with three whole
	// frames from frame 40 on overwritten by bytes that are not frames
	// (zeros, then a pattern), and with one frame header's bit-rate index
	// damaged so that its length is wrong. The decoder must skip the
	// damage, deliver every frame after it, count the loss, and report one
	// *decode.IntegrityError at the first damaged byte; a few frames after
	// the damage (the bit reservoir, the overlap and the synthesis window
	// refilled from frames after it) every sample equals the undamaged
	// decode's, three frames earlier.
	dir := t.TempDir()
	src := filepath.Join(dir, "a.wav")
	writeWAV16(t, src, 44100, 2, richSignal(44100, 2, 4, 17))
	for _, tt := range []struct {
		name string
		opts []string
	}{
		{"cbr", []string{"-b", "128"}},
		{"vbr", []string{"-V2"}},
	} {
		t.Run(tt.name, func(t *testing.T) {
			b := lameEncode(t, src, tt.name+".mp3", tt.opts...)
			clean := decodeBytes(t, b)
			if clean.err != nil {
				t.Fatal(clean.err)
			}
			starts := frameStarts(t, b)
			for _, damage := range []struct {
				name  string
				write func(b []byte, from, to int)
				lost  int // whole frames not delivered
				want  string
			}{
				{"zeros", func(b []byte, from, to int) { clear(b[from:to]) }, 3, "frames resume at byte"},
				{"pattern", func(b []byte, from, to int) {
					for i := from; i < to; i++ {
						b[i] = byte(i*13 + 5)
					}
				}, 3, "frames resume at byte"},
			} {
				t.Run(damage.name, func(t *testing.T) {
					d := append([]byte(nil), b...)
					from, to := starts[40], starts[43]
					damage.write(d, from, to)
					got := decodeBytes(t, d)
					var ie *decode.IntegrityError
					if !errors.As(got.err, &ie) {
						t.Fatalf("got %v, want *decode.IntegrityError", got.err)
					}
					if ie.Offset != int64(from) || !strings.Contains(ie.Problem, damage.want) || !strings.Contains(ie.Problem, fmt.Sprintf("%d bytes at byte %d", to-from, from)) {
						t.Errorf("error at byte %d %q; want the %d bytes at byte %d named", ie.Offset, ie.Problem, to-from, from)
					}
					lost := damage.lost * 1152
					if got.frames() != clean.frames()-lost {
						t.Fatalf("%d frames delivered, want %d (the clean %d less %d)", got.frames(), clean.frames()-lost, clean.frames(), lost)
					}
					compareAfterJoin(t, got, clean, 40*1152, lost)
				})
			}
			t.Run("length", func(t *testing.T) {
				// Frame 40's bit-rate index raised by one step: its header
				// claims a longer frame, running over the next header.
				d := append([]byte(nil), b...)
				at := starts[40]
				if d[at+2]>>4 >= 14 {
					t.Skip("frame 40 already has the highest bit rate")
				}
				d[at+2] += 0x10
				got := decodeBytes(t, d)
				var ie *decode.IntegrityError
				if !errors.As(got.err, &ie) || ie.Offset != int64(at) || !strings.Contains(ie.Problem, fmt.Sprintf("%d bytes at byte %d (frames resume at byte %d)", starts[41]-at, at, starts[41])) {
					t.Fatalf("got %v, want frame 40 (bytes %d-%d) skipped", got.err, at, starts[41])
				}
				if got.frames() != clean.frames()-1152 {
					t.Fatalf("%d frames delivered, want %d", got.frames(), clean.frames()-1152)
				}
				compareAfterJoin(t, got, clean, 40*1152, 1152)
			})
		})
	}
}

// frameStarts walks the frames of a lame encode (the first is the Info
// frame) and returns the offset of each audio frame.
func frameStarts(t *testing.T, b []byte) []int {
	t.Helper()
	var starts []int
	off := 0
	for off+headerSize <= len(b) {
		h, err := parseHeader(b[off:])
		if err != nil {
			break
		}
		starts = append(starts, off)
		off += h.frameLen()
	}
	if len(starts) < 60 {
		t.Fatalf("only %d frames", len(starts))
	}
	return starts[1:] // audio frames: the Info frame is not one
}

// compareAfterJoin checks that got, decoded with lost samples per channel
// skipped from decoded position at on, equals clean from a few frames after
// the join on (got's sample i is clean's i + lost), and before the damage
// (less the frame whose data reaches into it) too.
func compareAfterJoin(t *testing.T, got, clean decoded, at, lost int) {
	t.Helper()
	ch := clean.channels
	// Trimmed output: the decoder's delay moves the join later by up to
	// 576 + 529 samples; the frames just after it rebuild the reservoir.
	settle := at + 8*1152
	for i := settle * ch; i < len(got.samples); i++ {
		if got.samples[i] != clean.samples[i+lost*ch] {
			t.Fatalf("sample %d after the join: %g, undamaged %g", i/ch, got.samples[i], clean.samples[i+lost*ch])
		}
	}
	for i := range (at - 2*1152) * ch {
		if got.samples[i] != clean.samples[i] {
			t.Fatalf("sample %d before the damage: %g, undamaged %g", i/ch, got.samples[i], clean.samples[i])
		}
	}
}
