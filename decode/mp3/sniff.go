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
// the same stream at the offsets its frame lengths predict. It reads the
// bytes of the chain with one ReadAt.
func linked(r io.ReaderAt, off, end int64) bool {
	first, ok := readHeader(r, off, end)
	if !ok {
		return false
	}
	if first.freeFormat() {
		return linkedFree(r, off, end)
	}
	var buf [chainSpan]byte
	n, _ := r.ReadAt(buf[:min(int64(chainSpan), end-off)], off)
	return linkedBytes(buf[:n], off+int64(n) == end)
}

// chainSpan is the most bytes a chain of chainFrames frames and the header
// after it can cover.
const chainSpan = chainFrames*maxFrameLen + headerSize

// linkedBytes is linked on bytes already read: b starts with a frame
// header, and atEnd says that the stream ends where b does (otherwise b
// holds at least chainSpan bytes or the chain is judged broken).
func linkedBytes(b []byte, atEnd bool) bool {
	if len(b) < headerSize {
		return false
	}
	w := binary.BigEndian.Uint32(b)
	if !plausibleWord(w) {
		return false
	}
	first, err := parseHeader(b)
	if err != nil || first.freeFormat() {
		return false
	}
	off := 0
	for n := 0; n < chainFrames; n++ {
		if off+headerSize > len(b) {
			return false
		}
		w := binary.BigEndian.Uint32(b[off:])
		if !plausibleWord(w) || !sameStreamWord(binary.BigEndian.Uint32(b), w) {
			return false
		}
		h, err := parseHeader(b[off:])
		if err != nil || h.freeFormat() {
			return false
		}
		off += h.frameLen()
		if off > len(b) {
			return false
		}
		if off == len(b) && atEnd {
			return n+1 >= minChainFrames
		}
	}
	return true
}

// plausibleWord is a quick test, without allocating, that the 32-bit word w
// can be a frame header: frame sync, and none of the reserved or forbidden
// values parseHeader rejects. Scanning loops call it before parseHeader.
func plausibleWord(w uint32) bool {
	return w>>21 == 0x7FF && // sync
		w>>19&3 != 1 && // reserved version
		w>>17&3 != 0 && // reserved layer
		w>>12&15 != 15 && // forbidden bit-rate index
		w>>10&3 != 3 && // reserved sampling frequency
		w&3 != 2 // reserved emphasis
}

// streamWordMask keeps the header bits that stay fixed within one stream
// as sameStream defines it: sync, version, layer and sampling frequency.
// The channel count (mono or not) is compared separately.
const streamWordMask = 0xFFFE0C00

// sameStreamWord is frameHeader.sameStream on raw header words.
func sameStreamWord(a, b uint32) bool {
	return a&streamWordMask == b&streamWordMask && (a>>6&3 == 3) == (b>>6&3 == 3)
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
