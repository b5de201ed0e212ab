package wav_test

import (
	"encoding/binary"
	"math"
)

// This file is the tests' own tiny WAVE writer. It follows the layouts of
// Microsoft "Multiple Channel Audio Data and WAVE Files" (fmt, extensible),
// EBU Tech 3306 (RF64 ds64) and EBU Tech 3285 v2 (bext), written
// independently of the reader so that round trips test the reader against
// the documents rather than against itself.

// testChunk is one chunk to write. size overrides the declared 32-bit size
// when sizeSet; noPad omits the pad byte of an odd-sized body.
type testChunk struct {
	id      string
	body    []byte
	size    uint32
	sizeSet bool
	noPad   bool
}

func chunk(id string, body []byte) testChunk { return testChunk{id: id, body: body} }

// declaring returns c with a different declared size.
func (c testChunk) declaring(size uint32) testChunk {
	c.size, c.sizeSet = size, true
	return c
}

// wavFile writes magic ("RIFF", "RF64", "BW64"), the form size (the true
// one for RIFF, 0xFFFFFFFF otherwise), "WAVE" and the chunks.
func wavFile(magic string, chunks ...testChunk) []byte {
	var body []byte
	for _, c := range chunks {
		size := uint32(len(c.body))
		if c.sizeSet {
			size = c.size
		}
		body = append(body, c.id...)
		body = binary.LittleEndian.AppendUint32(body, size)
		body = append(body, c.body...)
		if len(c.body)%2 == 1 && !c.noPad {
			body = append(body, 0)
		}
	}
	riffSize := uint32(4 + len(body))
	if magic != "RIFF" {
		riffSize = 0xFFFFFFFF
	}
	out := append([]byte(magic), 0, 0, 0, 0)
	binary.LittleEndian.PutUint32(out[4:], riffSize)
	out = append(out, "WAVE"...)
	return append(out, body...)
}

// fmtChunk is a 16-byte fmt body. blockAlign and byteRate are derived
// from channels and bits the way Microsoft's documentation defines them
// (nBlockAlign = nChannels × ceil(wBitsPerSample/8)).
func fmtChunk(tag uint16, channels, rate, bits int) testChunk {
	blockAlign := channels * ((bits + 7) / 8)
	return chunk("fmt ", fmtBody(tag, channels, rate, blockAlign, bits))
}

func fmtBody(tag uint16, channels, rate, blockAlign, bits int) []byte {
	le := binary.LittleEndian
	b := le.AppendUint16(nil, tag)
	b = le.AppendUint16(b, uint16(channels))
	b = le.AppendUint32(b, uint32(rate))
	b = le.AppendUint32(b, uint32(rate*blockAlign))
	b = le.AppendUint16(b, uint16(blockAlign))
	return le.AppendUint16(b, uint16(bits))
}

// extensibleChunk is a 40-byte WAVE_FORMAT_EXTENSIBLE fmt body with the
// KSDATAFORMAT_SUBTYPE GUID built from subFormat
// (xxxxxxxx-0000-0010-8000-00aa00389b71).
func extensibleChunk(channels, rate, containerBits, validBits int, mask uint32, subFormat uint32) testChunk {
	le := binary.LittleEndian
	b := fmtBody(0xFFFE, channels, rate, channels*containerBits/8, containerBits)
	b = le.AppendUint16(b, 22)
	b = le.AppendUint16(b, uint16(validBits))
	b = le.AppendUint32(b, mask)
	b = le.AppendUint32(b, subFormat)
	b = append(b, 0x00, 0x00, 0x10, 0x00, 0x80, 0x00, 0x00, 0xAA, 0x00, 0x38, 0x9B, 0x71)
	return chunk("fmt ", b)
}

// encodeInts writes integer samples of validBits significant bits into
// containers of containerBits, left-justified (low bits zero) as Microsoft's
// documentation prescribes; 8-bit containers are unsigned (offset 128).
func encodeInts(values []int32, containerBits, validBits int) []byte {
	bytesPer := containerBits / 8
	out := make([]byte, 0, len(values)*bytesPer)
	for _, v := range values {
		if containerBits == 8 {
			out = append(out, byte(v+128))
			continue
		}
		u := uint32(v) << (containerBits - validBits)
		for i := range bytesPer {
			out = append(out, byte(u>>(8*i)))
		}
	}
	return out
}

func encodeFloat32(values []float32) []byte {
	var out []byte
	for _, v := range values {
		out = binary.LittleEndian.AppendUint32(out, math.Float32bits(v))
	}
	return out
}

func encodeFloat64(values []float64) []byte {
	var out []byte
	for _, v := range values {
		out = binary.LittleEndian.AppendUint64(out, math.Float64bits(v))
	}
	return out
}

// ds64Chunk is an RF64/BW64 ds64 body (EBU Tech 3306 §3.2): riffSize,
// dataSize, sampleCount as low/high uint32 pairs, then the table.
func ds64Chunk(riffSize, dataSize, sampleCount uint64, table map[string]uint64) testChunk {
	le := binary.LittleEndian
	b := le.AppendUint64(nil, riffSize)
	b = le.AppendUint64(b, dataSize)
	b = le.AppendUint64(b, sampleCount)
	b = le.AppendUint32(b, uint32(len(table)))
	for id, size := range table {
		b = append(b, id...)
		b = le.AppendUint64(b, size)
	}
	return chunk("ds64", b)
}

// bextFields are the bext values a test writes.
type bextFields struct {
	description, originator, reference, date, time string
	timeReference                                  uint64
	version                                        uint16
	loudness                                       [5]int16 // value, range, true peak, momentary, short-term
	codingHistory                                  string
}

// bextChunk lays out a bext body per EBU Tech 3285 v2 §2.3: 602 fixed bytes
// then the coding history.
func bextChunk(f bextFields) testChunk {
	le := binary.LittleEndian
	b := make([]byte, 602)
	copy(b[0:256], f.description)
	copy(b[256:288], f.originator)
	copy(b[288:320], f.reference)
	copy(b[320:330], f.date)
	copy(b[330:338], f.time)
	le.PutUint64(b[338:], f.timeReference)
	le.PutUint16(b[346:], f.version)
	for i, v := range f.loudness {
		le.PutUint16(b[412+2*i:], uint16(v))
	}
	b = append(b, f.codingHistory...)
	return chunk("bext", b)
}
