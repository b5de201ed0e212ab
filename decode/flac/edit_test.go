package flac

import (
	"bufio"
	"bytes"
	"encoding/binary"
	"io"
	"testing"

	mewflac "github.com/mewkiz/flac"
)

// Byte offsets inside a FLAC file that starts with "fLaC" and STREAMINFO
// (FLAC format, METADATA_BLOCK_STREAMINFO): 4 signature + 4 block header,
// then 2+2 block sizes, 3+3 frame sizes, 20 bits rate, 3 bits channels,
// 5 bits bits-per-sample, 36 bits total samples, 16 bytes MD5.
const (
	streamInfoHeader = 4
	totalSamplesByte = 8 + 13 // low 4 bits, then bytes 22..25
	md5Offset        = 8 + 18
	streamInfoEnd    = 8 + 34
)

func clone(b []byte) []byte { return append([]byte(nil), b...) }

// withVorbisComment inserts a Vorbis comment block holding tags right
// after STREAMINFO (FLAC format, METADATA_BLOCK_VORBIS_COMMENT; Vorbis I
// comment header: little-endian lengths).
func withVorbisComment(data []byte, tags ...string) []byte {
	var body bytes.Buffer
	le := func(n int) { binary.Write(&body, binary.LittleEndian, uint32(n)) }
	vendor := "kweigh test"
	le(len(vendor))
	body.WriteString(vendor)
	le(len(tags))
	for _, tag := range tags {
		le(len(tag))
		body.WriteString(tag)
	}
	out := clone(data[:streamInfoEnd])
	last := out[streamInfoHeader] & 0x80
	out[streamInfoHeader] &^= 0x80
	n := body.Len()
	out = append(out, last|4, byte(n>>16), byte(n>>8), byte(n))
	out = append(out, body.Bytes()...)
	return append(out, data[streamInfoEnd:]...)
}

// frameOffsets returns the byte offset of every frame and the end of the
// last one, found by decoding with the oracle library (mewkiz/flac)
// through a reader that counts the bytes it hands out.
func frameOffsets(t testing.TB, data []byte) []int64 {
	t.Helper()
	in := &countingReader{r: bytes.NewReader(data)}
	br := bufio.NewReaderSize(in, 64<<10)
	stream, err := mewflac.New(br)
	if err != nil {
		t.Fatal(err)
	}
	var offs []int64
	for {
		offs = append(offs, in.n-int64(br.Buffered()))
		if _, err := stream.ParseNext(); err == io.EOF {
			return offs
		} else if err != nil {
			t.Fatal(err)
		}
	}
}

// countingReader counts the bytes read through it.
type countingReader struct {
	r io.Reader
	n int64
}

func (c *countingReader) Read(p []byte) (int, error) {
	n, err := c.r.Read(p)
	c.n += int64(n)
	return n, err
}

// crc16 is the FLAC frame checksum: polynomial x^16 + x^15 + x^2 + 1,
// initialised with 0, over every byte of the frame before the CRC (FLAC
// format, FRAME_FOOTER).
func crc16(b []byte) uint16 {
	var crc uint16
	for _, x := range b {
		crc ^= uint16(x) << 8
		for range 8 {
			if crc&0x8000 != 0 {
				crc = crc<<1 ^ 0x8005
			} else {
				crc <<= 1
			}
		}
	}
	return crc
}
