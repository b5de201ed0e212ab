package mp3

import (
	"bytes"
	"errors"
	"io"
	"math"
	"testing"

	gomp3 "github.com/hajimehoshi/go-mp3"

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
	// Damage between frames that the walk skips (resync): frames 4-5 of
	// the 48 kHz fixture zeroed, and frame 4's bit-rate index raised so
	// that its length runs over the next header (CBR frames of 384 bytes
	// after the 384-byte Info frame).
	zeroed := append([]byte(nil), audiotest.Fixture(f, "music-s48-128.mp3")[:4000]...)
	clear(zeroed[5*384 : 7*384])
	f.Add(zeroed)
	longer := append([]byte(nil), audiotest.Fixture(f, "music-s48-128.mp3")[:4000]...)
	longer[5*384+2] += 0x10
	f.Add(longer)
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
			// Decoded overs are kept (never clamped), so a mutated
			// frame's gain can put samples far above full scale; what
			// must not come out is NaN, ±Inf or more than the format can
			// code: |is|^(4/3) ≤ 8206^(4/3) ≈ 1.7e5 at the largest gain
			// 2^(45/4) ≈ 2.4e3, summed over 18 IMDCT and 32 DCT terms
			// with overlap, stereo and a window whose taps add to about
			// 1.1, stays far below 1e13 [calc, loose].
			for _, v := range buf[:n*ch] {
				if math.Abs(v) > 1e13 || v != v {
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

// FuzzAgainstGoMP3 feeds the same bytes to this package's decoder and to
// go-mp3 (the decoder it replaced, kept as a test oracle). Ours must never
// panic, must refuse what is plainly broken (bytes without a single frame
// sync cannot be an MP3 stream), and must deliver whole frames with finite
// samples; a go-mp3 panic is the oracle's own failure and only logged.
// Where both decode the whole input without complaint, the two lengths
// may differ by go-mp3's habits (mono doubled to stereo, the Info frame
// and delays kept), so only ours is held to its contract.
func FuzzAgainstGoMP3(f *testing.F) {
	for _, name := range []string{"speech-m44-128.mp3", "mpeg25-8k.mp3", "hot-s44-128.mp3"} {
		b := audiotest.Fixture(f, name)
		f.Add(b[:min(len(b), 2500)])
	}
	f.Fuzz(func(t *testing.T, b []byte) {
		func() {
			defer func() {
				if r := recover(); r != nil {
					t.Logf("go-mp3 panicked (oracle failure, not ours): %v", r)
				}
			}()
			if g, err := gomp3.NewDecoder(bytes.NewReader(b)); err == nil {
				_, _ = io.Copy(io.Discard, io.LimitReader(g, 1<<22))
			}
		}()
		d, err := New(bytes.NewReader(b), int64(len(b)))
		hasSync := false
		for i := 0; i+1 < len(b); i++ {
			if b[i] == 0xFF && b[i+1]&0xE0 == 0xE0 {
				hasSync = true
				break
			}
		}
		if err != nil {
			return
		}
		if !hasSync {
			t.Fatal("accepted bytes without a single frame sync")
		}
		ch := d.Info().Channels
		buf := make([]float64, 1000*ch)
		total := 0
		for range 100000 {
			n, err := d.ReadFrames(buf)
			for _, v := range buf[:n*ch] {
				if math.IsNaN(v) || math.IsInf(v, 0) {
					t.Fatalf("non-finite sample %v", v)
				}
			}
			total += n
			if errors.Is(err, io.EOF) {
				return
			}
			if err != nil {
				var ie *decode.IntegrityError
				if !errors.As(err, &ie) {
					t.Fatalf("ReadFrames: untyped error %v", err)
				}
			}
		}
		t.Fatalf("no end after %d frames", total)
	})
}
