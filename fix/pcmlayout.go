package fix

import (
	"encoding/binary"
	"fmt"
	"io"
	"math"
)

// pcmLayout is where the audio bytes of a WAV or AIFF file are and how they
// are coded: what a writer needs to replace them and nothing else.
type pcmLayout struct {
	dataOffset int64 // first byte of the first frame
	dataSize   int64 // bytes of audio the chunk declares (capped at the file)
	blockAlign int   // bytes per frame
	bytes      int   // bytes per sample (container)
	validBits  int   // significant bits (integer PCM), left-justified in the container
	float      bool
	bigEndian  bool
	unsigned8  bool // 8-bit WAV is unsigned
	// bextBody and bextSize locate a bext chunk body (-1 when absent).
	bextBody int64
	bextSize int64
}

// chunkError reports a structure the writer cannot follow (the decoder
// accepted the file, so this is rare: a chunk walk that differs).
func chunkError(format string, off int64, what string, a ...any) error {
	return fmt.Errorf("%s structure at byte %d: %s", format, off, fmt.Sprintf(what, a...))
}

// scanWAV walks the chunks of a RIFF, RF64 or BW64 WAVE file.
func scanWAV(r io.ReaderAt, size int64, validBits int) (*pcmLayout, error) {
	le := binary.LittleEndian
	var head [12]byte
	if _, err := r.ReadAt(head[:], 0); err != nil {
		return nil, chunkError("wav", 0, "cannot read the header: %v", err)
	}
	l := &pcmLayout{bextBody: -1, dataOffset: -1}
	var ds64Data uint64
	haveDS64 := false
	var fmtTag uint16
	channels, bits := 0, 0
	for off := int64(12); off+8 <= size; {
		var ch [8]byte
		if _, err := r.ReadAt(ch[:], off); err != nil {
			return nil, chunkError("wav", off, "cannot read a chunk header: %v", err)
		}
		id, n := string(ch[:4]), int64(le.Uint32(ch[4:]))
		body := off + 8
		switch id {
		case "ds64":
			var b [16]byte
			if _, err := r.ReadAt(b[:], body); err != nil {
				return nil, chunkError("wav", body, "cannot read ds64: %v", err)
			}
			ds64Data, haveDS64 = le.Uint64(b[8:]), true
		case "fmt ":
			var b [40]byte
			k, _ := r.ReadAt(b[:min(int64(len(b)), n)], body)
			if k < 16 {
				return nil, chunkError("wav", body, "fmt chunk of %d bytes", k)
			}
			fmtTag = le.Uint16(b[0:])
			channels = int(le.Uint16(b[2:]))
			l.blockAlign = int(le.Uint16(b[12:]))
			bits = int(le.Uint16(b[14:]))
			if fmtTag == 0xFFFE && k >= 26 {
				fmtTag = le.Uint16(b[24:]) // the sub-format GUID's first two bytes
			}
		case "bext":
			l.bextBody, l.bextSize = body, n
		case "data":
			if l.dataOffset >= 0 {
				break // only the first data chunk is audio
			}
			if n == 0xFFFFFFFF && haveDS64 {
				n = int64(ds64Data)
			} else if haveDS64 && ds64Data > uint64(n) {
				n = int64(ds64Data)
			}
			l.dataOffset, l.dataSize = body, min(n, size-body)
		}
		off = body + n + n&1
	}
	if l.dataOffset < 0 || channels == 0 || l.blockAlign == 0 {
		return nil, chunkError("wav", 12, "no fmt and data chunks found")
	}
	if l.blockAlign%channels != 0 {
		return nil, chunkError("wav", 12, "block align %d is not a multiple of %d channels", l.blockAlign, channels)
	}
	l.bytes = l.blockAlign / channels
	l.validBits = validBits
	switch fmtTag {
	case 1:
	case 3:
		l.float = true
	default:
		return nil, chunkError("wav", 12, "format tag 0x%04x cannot be written", fmtTag)
	}
	if !l.float && (l.validBits <= 0 || l.validBits > 8*l.bytes) {
		l.validBits = min(bits, 8*l.bytes)
	}
	l.unsigned8 = !l.float && l.bytes == 1
	return l, nil
}

// scanAIFF walks the chunks of an AIFF or AIFF-C file.
func scanAIFF(r io.ReaderAt, size int64, float bool, validBits int) (*pcmLayout, error) {
	be := binary.BigEndian
	var head [12]byte
	if _, err := r.ReadAt(head[:], 0); err != nil {
		return nil, chunkError("aiff", 0, "cannot read the header: %v", err)
	}
	l := &pcmLayout{bextBody: -1, dataOffset: -1, bigEndian: true, float: float}
	channels, sampleSize := 0, 0
	var frames int64
	var ssndSize int64
	for off := int64(12); off+8 <= size; {
		var ch [8]byte
		if _, err := r.ReadAt(ch[:], off); err != nil {
			return nil, chunkError("aiff", off, "cannot read a chunk header: %v", err)
		}
		id, n := string(ch[:4]), int64(be.Uint32(ch[4:]))
		body := off + 8
		switch id {
		case "COMM":
			var b [22]byte
			k, _ := r.ReadAt(b[:min(int64(len(b)), n)], body)
			if k < 18 {
				return nil, chunkError("aiff", body, "COMM chunk of %d bytes", k)
			}
			channels = int(be.Uint16(b[0:]))
			frames = int64(be.Uint32(b[2:]))
			sampleSize = int(be.Uint16(b[6:]))
			if k >= 22 {
				switch string(b[18:22]) {
				case "sowt":
					l.bigEndian = false
				case "fl32", "FL32":
					sampleSize = 32
				case "fl64", "FL64":
					sampleSize = 64
				}
			}
		case "SSND":
			var b [8]byte
			if _, err := r.ReadAt(b[:], body); err != nil {
				return nil, chunkError("aiff", body, "cannot read SSND: %v", err)
			}
			skip := int64(be.Uint32(b[:]))
			l.dataOffset = body + 8 + skip
			ssndSize = n - 8 - skip
		}
		off = body + n + n&1
	}
	if l.dataOffset < 0 || channels == 0 || sampleSize == 0 {
		return nil, chunkError("aiff", 12, "no COMM and SSND chunks found")
	}
	if l.dataOffset > size {
		return nil, chunkError("aiff", l.dataOffset, "SSND data offset beyond the end of the file")
	}
	l.bytes = (sampleSize + 7) / 8
	l.blockAlign = l.bytes * channels
	l.validBits = validBits
	if l.validBits <= 0 || l.validBits > 8*l.bytes {
		l.validBits = sampleSize
	}
	l.dataSize = min(max(ssndSize, 0), frames*int64(l.blockAlign), size-l.dataOffset)
	return l, nil
}

// sampleCoder writes float64 samples (integer full scale ±1.0) into the byte
// coding of a layout, after the quantizer has made them whole codes.
type sampleCoder struct {
	l *pcmLayout
	q *quantizer // nil for float
}

// encode writes the interleaved samples x as bytes into dst (len(x) ×
// l.bytes) and returns the number of samples that had to be clipped to the
// integer range.
func (c sampleCoder) encode(dst []byte, x []float64) (clipped int) {
	l := c.l
	if l.float {
		for i, v := range x {
			b := dst[i*l.bytes:]
			if l.bytes == 4 {
				u := math.Float32bits(float32(v))
				if l.bigEndian {
					binary.BigEndian.PutUint32(b, u)
				} else {
					binary.LittleEndian.PutUint32(b, u)
				}
			} else {
				u := math.Float64bits(v)
				if l.bigEndian {
					binary.BigEndian.PutUint64(b, u)
				} else {
					binary.LittleEndian.PutUint64(b, u)
				}
			}
		}
		return 0
	}
	shift := uint(8*l.bytes - l.validBits)
	for i, v := range x {
		code, clip := c.q.code(v)
		if clip {
			clipped++
		}
		u := uint64(code) << shift // two's complement, left-justified
		if l.unsigned8 {
			u = uint64(code + 128)
		}
		b := dst[i*l.bytes : (i+1)*l.bytes]
		for k := range l.bytes {
			byteK := byte(u >> (8 * uint(k)))
			if l.bigEndian {
				b[l.bytes-1-k] = byteK
			} else {
				b[k] = byteK
			}
		}
	}
	return clipped
}
