package mp3

import (
	"encoding/binary"
	"io"
)

// MPEG audio has no magic number: a frame starts with an 11-bit sync pattern
// that random data and PCM samples contain by chance. Match therefore
// accepts a file only when the first frame header (after ID3v2 tags and a
// little zero padding) is followed by further valid headers of the same
// stream exactly where the computed frame lengths put them.
const (
	// chainFrames is how many consecutive frames must link up.
	chainFrames = 4
	// minChainFrames is enough when the stream ends exactly after them.
	minChainFrames = 2
	// maxLeadingZeros is how many zero bytes may precede the first frame
	// (tag padding that a tagger left outside the declared tag size).
	maxLeadingZeros = 4096
	// maxFreeFrameLen bounds the search for the next header of a
	// free-format stream (640 kbit/s at 32 kHz is 2 880 bytes).
	maxFreeFrameLen = 4096
)

// Match reports whether the content of r (size bytes) is an MPEG audio
// stream. It also matches the MPEG streams New rejects as unsupported
// (MPEG-2.5, free format, layers I and II) so that the user is told why
// rather than "not a recognised audio file". It never panics.
func Match(r io.ReaderAt, size int64) bool {
	start, end := audioBounds(r, size)
	first, ok := firstFrame(r, start, end)
	if !ok {
		return false
	}
	return linked(r, first, end)
}

// readHeader reads and parses the frame header at off.
func readHeader(r io.ReaderAt, off, end int64) (frameHeader, bool) {
	if off < 0 || off+headerSize > end {
		return frameHeader{}, false
	}
	var b [headerSize]byte
	if _, err := r.ReadAt(b[:], off); err != nil {
		return frameHeader{}, false
	}
	h, err := parseHeader(b[:])
	return h, err == nil
}

// firstFrame returns the offset of the first frame header at or after
// start, skipping at most maxLeadingZeros zero bytes.
func firstFrame(r io.ReaderAt, start, end int64) (int64, bool) {
	var buf [512]byte
	limit := min(end, start+maxLeadingZeros+1) // the frame may start at the last allowed byte
	for off := start; off < limit; {
		n, _ := r.ReadAt(buf[:min(int64(len(buf)), limit-off)], off)
		if n == 0 {
			return 0, false
		}
		for i := range n {
			if buf[i] != 0 {
				return off + int64(i), buf[i] == 0xFF
			}
		}
		off += int64(n)
	}
	return 0, false
}

// linked reports whether the frame at off is followed by enough frames of
// the same stream at the offsets its frame lengths predict.
func linked(r io.ReaderAt, off, end int64) bool {
	first, ok := readHeader(r, off, end)
	if !ok {
		return false
	}
	if first.freeFormat() {
		return linkedFree(r, off, end)
	}
	for n := 0; n < chainFrames; n++ {
		h, ok := readHeader(r, off, end)
		if !ok || !first.sameStream(h) || h.freeFormat() {
			return false
		}
		off += int64(h.frameLen())
		if off > end {
			return false
		}
		if off == end {
			return n+1 >= minChainFrames
		}
	}
	return true
}

// linkedFree checks a free-format stream: its frames have one fixed length
// (plus a padding byte), so the same header must recur at that spacing.
func linkedFree(r io.ReaderAt, off, end int64) bool {
	buf := make([]byte, chainFrames*(maxFreeFrameLen+1)+headerSize)
	n, _ := r.ReadAt(buf[:min(int64(len(buf)), end-off)], off)
	buf = buf[:n]
	if len(buf) < headerSize {
		return false
	}
	const streamBits = 0xFFFFFCC0 // sync … sampling frequency, and the mode
	want := binary.BigEndian.Uint32(buf) & streamBits
	pos, spacing := 0, 0
	for found := 1; found < chainFrames; found++ {
		next := -1
		for p := pos + headerSize + 1; p+headerSize <= len(buf) && p-pos <= maxFreeFrameLen+1; p++ {
			if binary.BigEndian.Uint32(buf[p:])&streamBits == want {
				next = p
				break
			}
		}
		if next < 0 {
			return false
		}
		gap := next - pos
		if spacing == 0 {
			spacing = gap
		} else if gap < spacing-1 || gap > spacing+1 {
			return false
		}
		pos = next
	}
	return true
}
