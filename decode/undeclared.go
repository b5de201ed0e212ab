package decode

import (
	"encoding/binary"
	"io"
)

// Undeclared describes data a file holds beyond the audio its header
// declares: bytes after the declared audio that are neither a chunk of the
// container nor a known tag. A header that declares half of the audio
// really present makes every player that trusts it stop half-way, while
// others play on; the measurement covers only the declared audio, so a
// caller must say so (package rules fails the file's integrity check).
type Undeclared struct {
	// Offset is the file offset of the first undeclared byte.
	Offset int64 `json:"offset"`
	// Bytes is how many undeclared bytes the file holds.
	Bytes int64 `json:"bytes"`
	// Seconds is how long those bytes would play as audio of the stream's
	// own format (bytes ÷ frame size ÷ sample rate).
	Seconds float64 `json:"seconds"`
}

// ForeignAfter walks the chunk list of an IFF-style container (RIFF
// little-endian, AIFF big-endian: 4-byte ID, 4-byte size, body padded to
// even length) from offset from to end, and returns the offset of the first
// byte that does not belong to a plausible chunk or tag, or end when every
// byte does. A chunk is plausible when its ID is four printable ASCII
// characters not starting with a space and its body fits before end (the
// pad byte of an odd last chunk may be missing). An ID3v2 tag ("ID3",
// sync-safe size) and a 128-byte ID3v1 tag ("TAG") at the very end are
// recognised too, since tag writers append them to WAV and AIFF files
// outside any chunk. Audio samples almost never pass: four printable bytes
// and a size that fits are rare in sampled sound.
func ForeignAfter(r io.ReaderAt, from, end int64, order binary.ByteOrder) int64 {
	pos := from
	for pos < end {
		var h [10]byte
		n, _ := r.ReadAt(h[:min(int64(len(h)), end-pos)], pos)
		switch {
		case n >= 10 && string(h[:3]) == "ID3" && h[3] < 0xFF && h[4] < 0xFF && syncSafe(h[6:10]):
			size := int64(h[6])<<21 | int64(h[7])<<14 | int64(h[8])<<7 | int64(h[9])
			next := pos + 10 + size
			if h[5]&0x10 != 0 {
				next += 10 // footer
			}
			if next > end {
				return pos
			}
			pos = next
			continue
		case end-pos == 128 && n >= 3 && string(h[:3]) == "TAG":
			return end
		case n < 8 || !PlausibleChunkID(h[:4]):
			return pos
		}
		size := int64(order.Uint32(h[4:8]))
		if pos+8+size > end {
			return pos
		}
		pos += 8 + size + size&1
	}
	return end
}

// PlausibleChunkID reports whether id looks like an IFF/RIFF chunk ID: four
// printable ASCII characters, the first not a space. Decoders use it to
// tell a chunk after the audio from audio the header does not declare.
func PlausibleChunkID(id []byte) bool {
	if len(id) != 4 {
		return false
	}
	if id[0] == ' ' {
		return false
	}
	for _, c := range id {
		if c < 0x20 || c > 0x7E {
			return false
		}
	}
	return true
}

// syncSafe reports whether b is an ID3v2 sync-safe integer (top bits clear).
func syncSafe(b []byte) bool {
	for _, c := range b {
		if c&0x80 != 0 {
			return false
		}
	}
	return true
}
