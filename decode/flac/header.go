package flac

import (
	"fmt"

	"github.com/kweigh/kweigh/decode/flac/internal/crc"
)

// Channel assignments of a frame (RFC 9639, section 9.1.3): independent
// channels, or one of the three stereo decorrelation modes, in which the
// side channel is coded with one bit more than the stream's samples.
const (
	independent = iota
	leftSide    // channel 0 left, channel 1 side; right = left - side
	sideRight   // channel 0 side, channel 1 right; left = side + right
	midSide     // channel 0 mid, channel 1 side
)

// maxHeaderSize is the longest frame header: 4 fixed bytes, a 7-byte coded
// number, 2 bytes of block size, 2 of sample rate and the CRC-8.
const maxHeaderSize = 4 + 7 + 2 + 2 + 1

// frameHeader is a decoded FRAME_HEADER (RFC 9639, section 9.1).
type frameHeader struct {
	variable   bool // variable block size: number is a sample number
	blockSize  int
	sampleRate int // 0: as STREAMINFO
	channels   int
	assignment int
	bits       int    // bits per sample, 0: as STREAMINFO
	number     uint64 // frame number, or first sample number if variable
	size       int    // header length in bytes, CRC-8 included
}

// errHeaderShort is parseHeader's answer when b ends inside the header.
const errHeaderShort = "the file ends inside the frame header"

// parseHeader decodes the frame header at the start of b and checks its
// CRC-8. It returns the header, or what is wrong with it (errHeaderShort
// when b ends first).
func parseHeader(b []byte) (h frameHeader, problem string) {
	if len(b) < 4 {
		return h, errHeaderShort
	}
	// 14-bit sync code 0b11111111111110, a reserved 0 bit, the blocking
	// strategy bit.
	if b[0] != 0xFF || b[1]&0xFE != 0xF8 {
		return h, fmt.Sprintf("no frame sync code (found %#02x %#02x)", b[0], b[1])
	}
	h.variable = b[1]&1 != 0
	bsCode, rateCode := b[2]>>4, b[2]&0x0F
	chCode, bitsCode := b[3]>>4, b[3]>>1&7
	if b[3]&1 != 0 {
		return h, "the reserved bit after the sample size is set"
	}
	switch {
	case chCode < 8:
		h.channels, h.assignment = int(chCode)+1, independent
	case chCode <= 10:
		h.channels, h.assignment = 2, int(chCode)-7
	default:
		return h, fmt.Sprintf("reserved channel assignment %d", chCode)
	}
	switch bitsCode {
	case 0:
		h.bits = 0
	case 3:
		return h, "reserved sample size code 3"
	default:
		h.bits = [8]int{1: 8, 2: 12, 4: 16, 5: 20, 6: 24, 7: 32}[bitsCode]
	}

	// The coded number: UTF-8-like, 1 to 7 bytes (section 9.1.5).
	p := 4
	if p >= len(b) {
		return h, errHeaderShort
	}
	first := b[p]
	var extra int
	var v uint64
	switch {
	case first < 0x80:
		v = uint64(first)
	case first&0xE0 == 0xC0:
		extra, v = 1, uint64(first&0x1F)
	case first&0xF0 == 0xE0:
		extra, v = 2, uint64(first&0x0F)
	case first&0xF8 == 0xF0:
		extra, v = 3, uint64(first&0x07)
	case first&0xFC == 0xF8:
		extra, v = 4, uint64(first&0x03)
	case first&0xFE == 0xFC:
		extra, v = 5, uint64(first&0x01)
	case first == 0xFE:
		extra, v = 6, 0
	default:
		return h, fmt.Sprintf("invalid first byte %#02x of the coded frame number", first)
	}
	if !h.variable && extra > 5 {
		return h, "a frame number longer than 31 bits"
	}
	p++
	if p+extra > len(b) {
		return h, errHeaderShort
	}
	for _, c := range b[p : p+extra] {
		if c&0xC0 != 0x80 {
			return h, fmt.Sprintf("invalid continuation byte %#02x in the coded frame number", c)
		}
		v = v<<6 | uint64(c&0x3F)
	}
	p += extra
	h.number = v

	// Block size (section 9.1.1) and sample rate (9.1.2), possibly
	// from bytes at the end of the header.
	need := p + 1
	switch bsCode {
	case 6:
		need++
	case 7:
		need += 2
	}
	switch rateCode {
	case 12:
		need++
	case 13, 14:
		need += 2
	}
	if need > len(b) {
		return h, errHeaderShort
	}
	switch {
	case bsCode == 0:
		return h, "reserved block size code 0"
	case bsCode == 1:
		h.blockSize = 192
	case bsCode <= 5:
		h.blockSize = 144 << bsCode // 576 · 2^(code-2)
	case bsCode == 6:
		h.blockSize = int(b[p]) + 1
		p++
	case bsCode == 7:
		h.blockSize = int(b[p])<<8 | int(b[p+1]) + 1
		p += 2
	default:
		h.blockSize = 256 << (bsCode - 8)
	}
	switch rateCode {
	case 0:
		h.sampleRate = 0
	case 12:
		h.sampleRate = int(b[p]) * 1000
		p++
	case 13:
		h.sampleRate = int(b[p])<<8 | int(b[p+1])
		p += 2
	case 14:
		h.sampleRate = (int(b[p])<<8 | int(b[p+1])) * 10
		p += 2
	case 15:
		return h, "invalid sample rate code 15"
	default:
		h.sampleRate = [12]int{1: 88200, 2: 176400, 3: 192000, 4: 8000, 5: 16000, 6: 22050,
			7: 24000, 8: 32000, 9: 44100, 10: 48000, 11: 96000}[rateCode]
	}
	if got, want := crc.Update8(0, b[:p]), b[p]; got != want {
		return h, fmt.Sprintf("header CRC-8 is %#02x, computed %#02x", want, got)
	}
	h.size = p + 1
	return h, ""
}
