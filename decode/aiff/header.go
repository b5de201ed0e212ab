package aiff

import (
	"encoding/binary"
	"fmt"
	"io"
	"math"

	"github.com/kweigh/kweigh/decode"
)

// Limits that keep a damaged header from describing an absurd stream.
const (
	maxChannels   = 64
	maxSampleRate = 10_000_000 // Hz
)

// coding is how the sample points of SSND are stored.
type coding int

const (
	bigEndianInt coding = iota
	littleEndianInt
	bigEndianFloat
)

// header is what COMM and SSND say about the stream.
type header struct {
	container   string // "aiff" or "aifc"
	channels    int
	frames      int64 // numSampleFrames as declared
	sampleSize  int   // bits as declared
	rate        float64
	compression string // AIFF-C compression type; "" for AIFF
	coding      coding
	width       int   // bytes per sample point
	dataOff     int64 // file offset of the first sample frame
	dataLen     int64 // bytes of sample frames present in the file
	ssndEnd     int64 // where the SSND chunk claims to end
	hasSSND     bool
	// foreign is the offset of the first byte after the chunks and tags
	// that is neither (audio the header does not declare?); the file size
	// when there is none.
	foreign int64
}

// unsupportedCompression names the AIFF-C compression types kweigh does not
// decode (Apple AIFF-C draft and QuickTime sound-format registry).
var unsupportedCompression = map[string]string{
	"ulaw": "µ-law", "ULAW": "µ-law",
	"alaw": "A-law", "ALAW": "A-law",
	"ima4": "IMA 4:1 ADPCM",
	"MAC3": "MACE 3:1", "MAC6": "MACE 6:1",
	"G722": "G.722", "G726": "G.726", "G728": "G.728",
	"GSM ": "GSM 06.10",
	"ACE2": "ACE 2:1", "ACE8": "ACE 8:3",
}

// readHeader walks the chunks of the FORM and reads COMM and SSND.
func readHeader(r io.ReaderAt, size int64) (*header, error) {
	var form [12]byte
	if _, err := r.ReadAt(form[:], 0); err != nil {
		return nil, formatError("aiff", 0, "file is shorter than the 12-byte FORM header")
	}
	h := &header{}
	switch {
	case string(form[:4]) != "FORM":
		return nil, formatError("aiff", 0, fmt.Sprintf(`expected "FORM", found %q`, form[:4]))
	case string(form[8:]) == "AIFF":
		h.container = "aiff"
	case string(form[8:]) == "AIFC":
		h.container = "aifc"
	default:
		return nil, formatError("aiff", 8, fmt.Sprintf(`expected form type "AIFF" or "AIFC", found %q`, form[8:]))
	}
	formEnd := 8 + int64(binary.BigEndian.Uint32(form[4:]))

	// Walk the chunks to the end of the FORM; past it only while COMM or
	// SSND is still missing (some writers leave a FORM size of 0 or of an
	// earlier state of the file).
	var hasCOMM bool
	off := int64(12)
	for off+8 <= size && (off < formEnd || !hasCOMM || !h.hasSSND) {
		var ck [8]byte
		if _, err := r.ReadAt(ck[:], off); err != nil {
			return nil, formatError(h.container, off, "cannot read chunk header")
		}
		if hasCOMM && h.hasSSND && !decode.PlausibleChunkID(ck[:4]) {
			break // not a chunk: audio past the declared sizes?
		}
		id := string(ck[:4])
		n := int64(binary.BigEndian.Uint32(ck[4:]))
		body := off + 8
		switch {
		case id == "COMM" && !hasCOMM: // a second COMM is ignored
			if err := h.readCOMM(r, body, n, size); err != nil {
				return nil, err
			}
			hasCOMM = true
		case id == "SSND" && !h.hasSSND:
			if err := h.readSSND(r, body, n, size); err != nil {
				return nil, err
			}
		}
		off = body + n + n&1
	}
	if !hasCOMM {
		return nil, formatError(h.container, 12, "no COMM chunk")
	}
	if !h.hasSSND && h.frames > 0 {
		return nil, formatError(h.container, 12, fmt.Sprintf("no SSND chunk, though COMM declares %d sample frames", h.frames))
	}
	// What follows the walk: tags and chunks past the FORM (some writers
	// append ID3 tags), or audio the header does not declare.
	h.foreign = size
	if off < size {
		h.foreign = decode.ForeignAfter(r, off, size, binary.BigEndian)
	}
	return h, nil
}

// readCOMM reads the common chunk (AIFF 1.3 "Common Chunk"; AIFF-C adds the
// compression type and a Pascal-string name): numChannels int16,
// numSampleFrames uint32, sampleSize int16, sampleRate extended.
func (h *header) readCOMM(r io.ReaderAt, body, n, size int64) error {
	need := int64(18)
	if h.container == "aifc" {
		need = 22
	}
	if n < need {
		return formatError(h.container, body-4, fmt.Sprintf("COMM chunk is %d bytes, expected at least %d", n, need))
	}
	if body+need > size {
		return formatError(h.container, body, "file ends inside the COMM chunk")
	}
	var b [22]byte
	if _, err := r.ReadAt(b[:need], body); err != nil {
		return formatError(h.container, body, "cannot read the COMM chunk")
	}
	h.channels = int(int16(binary.BigEndian.Uint16(b[0:])))
	h.frames = int64(binary.BigEndian.Uint32(b[2:]))
	h.sampleSize = int(int16(binary.BigEndian.Uint16(b[6:])))
	h.rate = extendedToFloat([10]byte(b[8:18]))
	if h.container == "aifc" {
		h.compression = string(b[18:22])
	}
	switch {
	case h.channels < 1 || h.channels > maxChannels:
		return formatError(h.container, body, fmt.Sprintf("COMM declares %d channels; expected 1 to %d", h.channels, maxChannels))
	case math.IsNaN(h.rate) || h.rate < 1 || h.rate > maxSampleRate:
		return formatError(h.container, body+8, fmt.Sprintf("COMM declares a sample rate of %v Hz", h.rate))
	}
	return h.chooseCoding(r, body+22, n-22)
}

// chooseCoding sets coding and width from the compression type.
func (h *header) chooseCoding(r io.ReaderAt, nameOff, nameLen int64) error {
	switch h.compression {
	case "", "NONE", "twos", "sowt":
		if h.sampleSize < 1 || h.sampleSize > 32 {
			return formatError(h.container, nameOff-16, fmt.Sprintf("COMM declares %d-bit samples; expected 1 to 32", h.sampleSize))
		}
		h.coding = bigEndianInt
		if h.compression == "sowt" {
			h.coding = littleEndianInt
		}
		h.width = (h.sampleSize + 7) / 8
	case "fl32", "FL32":
		h.coding, h.width, h.sampleSize = bigEndianFloat, 4, 32
	case "fl64", "FL64":
		h.coding, h.width, h.sampleSize = bigEndianFloat, 8, 64
	default:
		what := unsupportedCompression[h.compression]
		if what == "" {
			what = compressionName(r, nameOff, nameLen)
		}
		if what != "" {
			what = " (" + what + ")"
		}
		return &decode.UnsupportedError{Format: h.container, What: fmt.Sprintf("AIFF-C compression type %q%s", h.compression, what)}
	}
	return nil
}

// compressionName reads the Pascal-string name that follows the compression
// type in an AIFF-C COMM chunk, or returns "".
func compressionName(r io.ReaderAt, off, n int64) string {
	if n < 1 {
		return ""
	}
	var b [256]byte
	if _, err := r.ReadAt(b[:1], off); err != nil {
		return ""
	}
	l := min(int64(b[0]), n-1)
	if _, err := r.ReadAt(b[1:1+l], off+1); err != nil {
		return ""
	}
	name := b[1 : 1+l]
	for _, c := range name {
		if c < 0x20 || c > 0x7E {
			return ""
		}
	}
	return string(name)
}

// readSSND reads the sound data chunk header (AIFF 1.3 "Sound Data Chunk"):
// offset and blockSize (uint32 each), then the sample frames from offset
// bytes further on. A chunk that runs past the end of the file is kept: the
// frames that are there are delivered and the shortfall reported.
func (h *header) readSSND(r io.ReaderAt, body, n, size int64) error {
	if n < 8 || body+8 > size {
		return formatError(h.container, body-8, "SSND chunk is too short for its offset and block size")
	}
	var b [8]byte
	if _, err := r.ReadAt(b[:], body); err != nil {
		return formatError(h.container, body, "cannot read the SSND chunk")
	}
	offset := int64(binary.BigEndian.Uint32(b[0:]))
	h.dataOff = body + 8 + offset
	h.ssndEnd = body + n
	if h.dataOff > h.ssndEnd {
		return formatError(h.container, body, fmt.Sprintf("SSND offset %d points past the end of the chunk (%d bytes)", offset, n))
	}
	h.dataLen = max(0, min(h.ssndEnd, size)-h.dataOff)
	h.hasSSND = true
	return nil
}

func formatError(container string, off int64, problem string) error {
	return &decode.FormatError{Format: container, Offset: off, Problem: problem}
}
