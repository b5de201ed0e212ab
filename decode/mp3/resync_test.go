package mp3

import (
	"bytes"
	"io"
	"strings"
	"testing"

	"github.com/kweigh/kweigh/internal/audiotest"
)

// countingSource is a decode.Source over bytes that counts the ReadAt
// calls made on it and the bytes they returned.
type countingSource struct {
	*bytes.Reader
	reads int
	bytes int64
}

func (c *countingSource) ReadAt(p []byte, off int64) (int, error) {
	c.reads++
	n, err := c.Reader.ReadAt(p, off)
	c.bytes += int64(n)
	return n, err
}

// junkTail returns b followed by n bytes of 0xFF: sync-like bytes, every
// one of which starts a candidate frame header.
func junkTail(b []byte, n int) []byte {
	return append(append([]byte(nil), b...), bytes.Repeat([]byte{0xFF}, n)...)
}

func TestJunkTailScannedOnce(t *testing.T) {
	// Issue 8: 20 MB of 0xFF after the last frame took ~20 s, one read per
	// byte. The work must be linear and buffered: the whole open + decode
	// may read each byte of the file at most twice (the frame scan and the
	// decoding walk) plus the tail once for the resync search, in reads of
	// at least resyncWindow bytes (BenchmarkJunkTail has the time).
	const junk = 20 << 20
	clean := audiotest.Fixture(t, "music-s48-128.mp3")
	data := junkTail(clean, junk)
	src := &countingSource{Reader: bytes.NewReader(data)}
	d, err := New(src, int64(len(data)))
	if err != nil {
		t.Fatal(err)
	}
	n, err := audiotest.CountFrames(d, make([]float64, 4096*2))
	if err != nil || n != 192000 {
		t.Fatalf("%d frames, %v; want the fixture's 192000 and no damage", n, err)
	}
	notes := d.Notes()
	if len(notes) != 1 || !strings.Contains(notes[0], "ignored 20971520 bytes") {
		t.Errorf("notes %q, want one note on the 20971520 ignored bytes", notes)
	}
	maxReads := 2*junk/resyncWindow + 200
	maxBytes := int64(2*len(clean)) + 2*junk
	if src.reads > maxReads || src.bytes > maxBytes {
		t.Errorf("%d reads of %d bytes for a %d-byte file; want at most %d reads and %d bytes",
			src.reads, src.bytes, len(data), maxReads, maxBytes)
	}
	t.Logf("%d reads, %d bytes read for a %d-byte file", src.reads, src.bytes, len(data))
}

func TestResyncFindsFramesAfterJunk(t *testing.T) {
	// Damage inside the stream: 100 kB of 0xFF between two halves of the
	// fixture. The walk must find the frames that resume after it (the
	// resync search crosses a window boundary), decode them, and report
	// the damage.
	b := audiotest.Fixture(t, "music-s48-128.mp3")
	const cut = 100 * 384 // a frame boundary: CBR frames of 384 bytes
	data := append(junkTail(b[:cut], 100_000), b[cut:]...)
	d, err := New(bytes.NewReader(data), int64(len(data)))
	if err != nil {
		t.Fatal(err)
	}
	n, err := audiotest.CountFrames(d, make([]float64, 4096*2))
	if err == nil || err == io.EOF || !strings.Contains(err.Error(), "100000 bytes at byte 38400 (frames resume at byte 138400)") {
		t.Errorf("got %v, want damage with frames resuming at byte %d", err, cut+100_000)
	}
	// Every frame of the fixture is decoded: the junk was inserted, not
	// written over frames (the estimate of what it held is then too high,
	// which the message says is an estimate).
	if n != 192000 {
		t.Errorf("%d frames delivered, want the fixture's 192000", n)
	}
}

func TestAbsurdInfoCounts(t *testing.T) {
	// An Info header declaring 2³²−1 frames and bytes: nothing is
	// allocated for them (the length comes from the stream), the frames
	// present are delivered untrimmed, and the missing ones are damage.
	b := append([]byte(nil), audiotest.Fixture(t, "music-s48-128.mp3")...)
	at := bytes.Index(b[:384], []byte("Info"))
	for i := at + 8; i < at+16; i++ {
		b[i] = 0xFF
	}
	got := decodeBytes(t, b)
	if got.dec.Info().Frames != 168*1152 || got.frames() != 168*1152 {
		t.Errorf("Info.Frames %d, %d delivered; want 168 frames of 1152 (the fixture's, TestParseXingFixtures)", got.dec.Info().Frames, got.frames())
	}
	if got.err == nil || !strings.Contains(got.err.Error(), "after 168 of the 4294967295 audio frames") {
		t.Errorf("got %v, want damage: 168 of 4294967295 declared frames", got.err)
	}
	allocs := testing.AllocsPerRun(3, func() {
		d, err := New(bytes.NewReader(b), int64(len(b)))
		if err != nil {
			t.Fatal(err)
		}
		_ = d
	})
	if allocs > 40 {
		t.Errorf("New made %.0f allocations", allocs)
	}
}
