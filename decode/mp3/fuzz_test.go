package mp3

import (
	"bytes"
	"errors"
	"io"
	"testing"

	"github.com/kweigh/kweigh/decode"
	"github.com/kweigh/kweigh/internal/audiotest"
)

// The seed corpora are in testdata/fuzz/Fuzz*/ (headers, Info frames and
// small cut-down streams from the fixtures); f.Add adds a few more.

func FuzzHeader(f *testing.F) {
	f.Add([]byte{0xFF, 0xFB, 0x90, 0x64})
	f.Add([]byte{0xFF, 0xE3, 0x28, 0xC4})
	f.Fuzz(func(t *testing.T, b []byte) {
		h, err := parseHeader(b)
		if err != nil {
			return
		}
		if h.freeFormat() != (h.frameLen() == 0) {
			t.Fatalf("free format %v but frame length %d", h.freeFormat(), h.frameLen())
		}
		if n := h.frameLen(); n < 0 || n > maxFrameLen {
			t.Fatalf("frame length %d out of range", n)
		}
		if !h.freeFormat() && h.layer == 3 && h.unsupported() == "" && h.frameLen() < headerSize+h.sideInfoLen() {
			t.Fatalf("supported frame of %d bytes cannot hold its side information", h.frameLen())
		}
		if !h.sameStream(h) {
			t.Fatal("header not compatible with itself")
		}
	})
}

func FuzzXing(f *testing.F) {
	f.Add([]byte{0xFF, 0xFB, 0x90, 0x64}, uint16(384))
	f.Fuzz(func(t *testing.T, b []byte, size uint16) {
		h, err := parseHeader(b)
		if err != nil {
			return
		}
		x, ok := parseXing(b, h)
		if !ok {
			return
		}
		if x.delay < 0 || x.delay >= 1<<12 || x.padding < 0 || x.padding >= 1<<12 {
			t.Fatalf("delay %d / padding %d outside 12 bits", x.delay, x.padding)
		}
		if !x.extensionCRCOK && (x.delay != 0 || x.padding != 0) {
			t.Fatal("delay/padding taken from an extension that failed its CRC")
		}
	})
}

func FuzzDecode(f *testing.F) {
	for _, name := range []string{"mpeg2-22k.mp3", "no-info-header.mp3"} {
		b := audiotest.Fixture(f, name)
		f.Add(b[:min(len(b), 3000)])
	}
	// The two shapes of issue 8: sync-like junk after the frames, and an
	// Info header declaring fewer frames than follow.
	short := audiotest.Fixture(f, "mpeg2-22k.mp3")[:2000]
	f.Add(junkTail(short, 3000))
	lying := append([]byte(nil), audiotest.Fixture(f, "music-s48-128.mp3")[:4000]...)
	halveInfoFrames(f, lying)
	f.Add(lying)
	f.Fuzz(func(t *testing.T, b []byte) {
		matched := Match(bytes.NewReader(b), int64(len(b)))
		d, err := New(bytes.NewReader(b), int64(len(b)))
		if err != nil {
			var fe *decode.FormatError
			var ue *decode.UnsupportedError
			if !errors.As(err, &fe) && !errors.As(err, &ue) {
				t.Fatalf("New: untyped error %v", err)
			}
			return
		}
		_ = matched
		ch := d.Info().Channels
		if ch != 1 && ch != 2 {
			t.Fatalf("%d channels", ch)
		}
		// Every frame is at least 24 bytes at 8 kbit/s (MPEG-2, 24 kHz)
		// and yields at most 1152 samples [calc]: a bound on the output.
		limit := (len(b)/24 + 1) * 1152
		buf := make([]float64, 4096*ch)
		total, errs := 0, 0
		for {
			n, err := d.ReadFrames(buf)
			total += n
			if total > limit {
				t.Fatalf("%d frames from %d bytes", total, len(b))
			}
			// The length is the stream's, found before the first sample:
			// never less than what is delivered.
			if fr := d.Info().Frames; fr >= 0 && int64(total) > fr {
				t.Fatalf("%d frames delivered, Info.Frames %d", total, fr)
			}
			for _, v := range buf[:n*ch] {
				if v < -1 || v > 1 || v != v {
					t.Fatalf("sample %v out of range", v)
				}
			}
			if err == io.EOF {
				break
			}
			if err != nil {
				var ie *decode.IntegrityError
				if !errors.As(err, &ie) {
					t.Fatalf("ReadFrames: untyped error %v", err)
				}
				if errs++; errs > 1 {
					t.Fatal("second error after an IntegrityError")
				}
			}
		}
		_ = d.Notes()
	})
}
