package wav

import (
	"encoding/binary"
	"fmt"
	"io"
	"math"

	"github.com/kweigh/kweigh/decode"
)

const (
	riffHeaderSize  = 12 // FourCC, 32-bit size, form type
	chunkHeaderSize = 8  // chunk ID, 32-bit size
	// fmtReadSize is how much of a fmt chunk is read: the 40 bytes of
	// WAVE_FORMAT_EXTENSIBLE; anything beyond is of no use here.
	fmtReadSize = 40
)

// header is what the chunk walk learns about a file.
type header struct {
	container string // "wav", "rf64" or "bw64"
	fileSize  int64
	riffEnd   int64 // end of the RIFF form as declared, capped at fileSize
	sizes     *ds64 // nil unless the file has a ds64 chunk

	layout  sampleLayout
	haveFmt bool

	haveData      bool
	dataOffset    int64  // file offset of the first sample byte
	dataSize      uint64 // as declared
	dataSizeKnown bool   // false for a RIFF data chunk of size 0xFFFFFFFF

	bext  *decode.Bext
	ixml  *decode.IXML
	notes []string

	// trailer is where the chunk walk stopped at bytes that may not be
	// chunks (the end of the RIFF form, or an implausible chunk ID after
	// fmt and data); -1 when it ran to the end of the file.
	trailer    int64
	undeclared *decode.Undeclared
}

// readHeader checks the RIFF header and walks the chunk list of a file of
// the given size, reading only the chunks it needs.
func readHeader(r io.ReaderAt, size int64) (*header, error) {
	e := chunkErrors{container: "wav"}
	if size <= 0 {
		return nil, e.bad(0, "file is empty")
	}
	var head [riffHeaderSize]byte
	if err := readFull(r, head[:], 0); err != nil {
		return nil, e.wrap(0, err, "file is %d bytes long, too short for a RIFF header", size)
	}
	h := &header{fileSize: size, trailer: -1}
	switch string(head[:4]) {
	case "RIFF":
		h.container = "wav"
	case "RF64":
		h.container = "rf64"
	case "BW64":
		h.container = "bw64"
	case "RIFX":
		return nil, &decode.UnsupportedError{Format: "wav", What: "big-endian RIFX container"}
	default:
		return nil, e.bad(0, "expected RIFF, RF64 or BW64, found %q", head[:4])
	}
	e.container = h.container
	if string(head[8:12]) != "WAVE" {
		return nil, e.bad(8, "expected form type WAVE, found %q", head[8:12])
	}
	h.setRIFFSize(uint64(binary.LittleEndian.Uint32(head[4:])))
	if err := h.walk(r, e); err != nil {
		return nil, err
	}
	if !h.haveFmt {
		return nil, e.wrap(size, io.ErrUnexpectedEOF, "no fmt chunk before the end of the file")
	}
	if !h.haveData {
		return nil, e.wrap(size, io.ErrUnexpectedEOF, "no data chunk before the end of the file")
	}
	h.findUndeclared(r)
	return h, nil
}

// findUndeclared looks at the bytes where the chunk walk stopped: past the
// tags and chunks that may follow the audio, anything left is data the
// header does not declare. At least one frame (and at least a chunk
// header's 8 bytes) of it is reported in h.undeclared; less is a note.
func (h *header) findUndeclared(r io.ReaderAt) {
	if h.trailer < 0 || h.trailer >= h.fileSize {
		return
	}
	foreign := decode.ForeignAfter(r, h.trailer, h.fileSize, binary.LittleEndian)
	n := h.fileSize - foreign
	switch {
	case n == 0:
	case n < max(chunkHeaderSize, int64(h.layout.blockAlign)):
		h.note("%d stray bytes at the end of the file (byte %d) ignored", n, foreign)
	default:
		h.undeclared = &decode.Undeclared{Offset: foreign, Bytes: n,
			Seconds: float64(n/int64(h.layout.blockAlign)) / float64(h.layout.sampleRate)}
	}
}

// setRIFFSize records the declared form size; an implausible one (0,
// 0xFFFFFFFF or past the end of the file) leaves the walk bounded by the
// file alone.
func (h *header) setRIFFSize(riffSize uint64) {
	h.riffEnd = h.fileSize
	if riffSize >= 4 && riffSize != sizeSeeDS64 && riffSize <= uint64(h.fileSize-chunkHeaderSize) {
		h.riffEnd = chunkHeaderSize + int64(riffSize)
	}
}

func (h *header) note(format string, args ...any) {
	h.notes = append(h.notes, fmt.Sprintf(format, args...))
}

// walk visits the chunks from the end of the RIFF header to the end of the
// file (or of the RIFF form, once fmt and data are known).
func (h *header) walk(r io.ReaderAt, e chunkErrors) error {
	pos := int64(riffHeaderSize)
	for pos < h.fileSize {
		complete := h.haveFmt && h.haveData
		if complete && pos >= h.riffEnd {
			h.trailer = pos // bytes after the RIFF form: appended tags, or audio the header does not declare
			break
		}
		if h.fileSize-pos < chunkHeaderSize {
			if complete {
				h.note("%d stray bytes at the end of the file (byte %d) ignored", h.fileSize-pos, pos)
				break
			}
			return e.wrap(pos, io.ErrUnexpectedEOF, "file ends inside a chunk header")
		}
		var ch [chunkHeaderSize]byte
		if err := readFull(r, ch[:], pos); err != nil {
			return e.wrap(pos, err, "reading chunk header")
		}
		id := string(ch[:4])
		if complete && !decode.PlausibleChunkID(ch[:4]) {
			h.trailer = pos // not a chunk: audio past the declared data size?
			break
		}
		size32 := binary.LittleEndian.Uint32(ch[4:])
		size := uint64(size32)
		body := pos + chunkHeaderSize
		if size32 == sizeSeeDS64 && h.container != "wav" {
			s, ok := h.ds64Size(id)
			if !ok && complete {
				h.note("chunk %q at byte %d has size 0xFFFFFFFF but no ds64 entry gives its real size; the rest of the file is ignored", id, pos)
				break
			}
			if !ok {
				return e.bad(pos+4, "chunk %q has size 0xFFFFFFFF but no ds64 chunk gives its real size", id)
			}
			size = s
		}
		remaining := uint64(h.fileSize - body)
		if id == "data" && !h.haveData && size32 == sizeSeeDS64 && h.container == "wav" {
			// A streaming writer that never came back to fill in the size.
			h.note("data chunk size is unset (0xFFFFFFFF): audio read to the end of the file")
			size = remaining
		}
		fits := size <= remaining
		ce := chunkErrors{container: h.container, body: body}

		switch {
		case id == "data" && h.haveData:
			h.note("second data chunk at byte %d ignored", pos)
		case id == "data":
			h.haveData = true
			h.dataOffset = body
			h.dataSize = size
			h.dataSizeKnown = !(size32 == sizeSeeDS64 && h.container == "wav")
		case !fits:
			// handled below
		case id == "ds64" && h.sizes == nil:
			d, err := readDS64(r, body, size, ce)
			if err != nil {
				return err
			}
			h.sizes = d
			if h.container != "wav" {
				h.setRIFFSize(d.riffSize)
			}
		case id == "fmt " && h.haveFmt:
			h.note("second fmt chunk at byte %d ignored", pos)
		case id == "fmt ":
			buf := make([]byte, min(size, fmtReadSize))
			if err := readFull(r, buf, body); err != nil {
				return ce.wrap(0, err, "reading fmt chunk")
			}
			l, err := parseFmt(buf, body, h.container)
			if err != nil {
				return err
			}
			h.layout, h.haveFmt = l, true
		case id == "bext" && h.bext == nil:
			buf := make([]byte, min(size, bextCodingHistory+maxCodingHistory))
			if err := readFull(r, buf, body); err != nil {
				return ce.wrap(0, err, "reading bext chunk")
			}
			if len(buf) < minBextSize {
				h.note("bext chunk at byte %d is only %d bytes long; its fields may be incomplete", pos, size)
			}
			if size > uint64(len(buf)) {
				h.note("bext coding history longer than %d bytes; the rest is ignored", maxCodingHistory)
			}
			h.bext = parseBext(buf)
		case id == "iXML" && h.ixml == nil:
			buf := make([]byte, min(size, maxIXML))
			if err := readFull(r, buf, body); err != nil {
				return ce.wrap(0, err, "reading iXML chunk")
			}
			x, err := parseIXML(buf)
			if err != nil {
				h.note("iXML chunk at byte %d: %v; its timecode fields are ignored", pos, err)
			}
			h.ixml = x
		}

		if !fits {
			if id == "data" {
				break // the audio runs to the end of the file; nothing follows it
			}
			if h.haveFmt && h.haveData {
				h.note("chunk %q at byte %d declares %d bytes but the file ends %d bytes later; ignored", id, pos, size, remaining)
				break
			}
			return e.wrap(pos, io.ErrUnexpectedEOF, "chunk %q declares %d bytes but the file ends %d bytes later", id, size, remaining)
		}
		pos = body + int64(size) + int64(size&1) // chunks are padded to even length
	}
	return nil
}

// ds64Size returns the 64-bit size of a chunk whose 32-bit size field holds
// 0xFFFFFFFF.
func (h *header) ds64Size(id string) (uint64, bool) {
	if h.sizes == nil {
		return 0, false
	}
	if id == "data" {
		return h.sizes.dataSize, true
	}
	s, ok := h.sizes.table[[4]byte([]byte(id))]
	return s, ok
}

// frames is the declared length in frames, -1 when the header does not say.
func (h *header) frames() int64 {
	if !h.dataSizeKnown {
		return -1
	}
	return int64(min(h.dataSize/uint64(h.layout.blockAlign), math.MaxInt64))
}
