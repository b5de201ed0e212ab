package aiff

import (
	"bytes"
	"encoding/binary"
	"math"
)

// aiffSpec describes a test file for buildAIFF, a small writer that follows
// AIFF 1.3 and the AIFF-C draft so that variants sox cannot produce can be
// built bit-exactly.
type aiffSpec struct {
	aifc        bool
	compression string // AIFF-C type, e.g. "sowt"; "" = "NONE"
	channels    int
	bits        int // COMM sampleSize
	rate        float64
	ints        []int32   // interleaved, already left-justified to bits
	floats      []float64 // for fl32/fl64
	commFrames  int64     // -1: derived from the samples
	ssndOffset  uint32
	blockSize   uint32
	chunksFirst []rawChunk // written before COMM
	ssndFirst   bool       // SSND before COMM
	formSize    int64      // -1: correct
}

type rawChunk struct {
	id   string
	body []byte
}

func chunk(buf *bytes.Buffer, id string, body []byte) {
	buf.WriteString(id)
	binary.Write(buf, binary.BigEndian, uint32(len(body)))
	buf.Write(body)
	if len(body)%2 == 1 {
		buf.WriteByte(0) // pad byte (IFF: chunks are even-aligned)
	}
}

func buildAIFF(s aiffSpec) []byte {
	width := (s.bits + 7) / 8
	comp := s.compression
	if s.aifc && comp == "" {
		comp = "NONE"
	}
	switch comp {
	case "fl32", "FL32":
		width = 4
	case "fl64", "FL64":
		width = 8
	}
	var data bytes.Buffer
	frames := int64(0)
	switch {
	case s.floats != nil:
		frames = int64(len(s.floats) / s.channels)
		for _, v := range s.floats {
			if width == 4 {
				binary.Write(&data, binary.BigEndian, math.Float32bits(float32(v)))
			} else {
				binary.Write(&data, binary.BigEndian, math.Float64bits(v))
			}
		}
	default:
		frames = int64(len(s.ints) / s.channels)
		for _, v := range s.ints {
			var b [4]byte
			if comp == "sowt" {
				binary.LittleEndian.PutUint32(b[:], uint32(v))
				data.Write(b[:width])
			} else {
				binary.BigEndian.PutUint32(b[:], uint32(v)<<(32-8*width))
				data.Write(b[:width])
			}
		}
	}
	if s.commFrames >= 0 {
		frames = s.commFrames
	}

	var comm bytes.Buffer
	binary.Write(&comm, binary.BigEndian, int16(s.channels))
	binary.Write(&comm, binary.BigEndian, uint32(frames))
	binary.Write(&comm, binary.BigEndian, int16(s.bits))
	rate := floatToExtended(s.rate)
	comm.Write(rate[:])
	if s.aifc {
		comm.WriteString(comp)
		name := "kweigh test " + comp
		comm.WriteByte(byte(len(name)))
		comm.WriteString(name)
		if (len(name)+1)%2 == 1 {
			comm.WriteByte(0) // pstring padded to even length
		}
	}

	var ssnd bytes.Buffer
	binary.Write(&ssnd, binary.BigEndian, s.ssndOffset)
	binary.Write(&ssnd, binary.BigEndian, s.blockSize)
	ssnd.Write(make([]byte, s.ssndOffset))
	ssnd.Write(data.Bytes())

	var body bytes.Buffer
	if s.aifc {
		body.WriteString("AIFC")
		chunk(&body, "FVER", []byte{0xA2, 0x80, 0x51, 0x40}) // AIFF-C version 1 timestamp
	} else {
		body.WriteString("AIFF")
	}
	for _, c := range s.chunksFirst {
		chunk(&body, c.id, c.body)
	}
	if s.ssndFirst {
		chunk(&body, "SSND", ssnd.Bytes())
		chunk(&body, "COMM", comm.Bytes())
	} else {
		chunk(&body, "COMM", comm.Bytes())
		chunk(&body, "SSND", ssnd.Bytes())
	}
	var out bytes.Buffer
	out.WriteString("FORM")
	size := int64(body.Len())
	if s.formSize >= 0 {
		size = s.formSize
	}
	binary.Write(&out, binary.BigEndian, uint32(size))
	out.Write(body.Bytes())
	return out.Bytes()
}
