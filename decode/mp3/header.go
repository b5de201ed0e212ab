package mp3

import (
	"encoding/binary"
	"fmt"
)

// mpegVersion is the ID field of a frame header (bits 20–19 of the 32-bit
// header word; the 2.5 value uses the bit that MPEG-1 counts as sync).
type mpegVersion uint8

const (
	mpeg25 mpegVersion = 0 // the unofficial low-rate extension (8, 11.025, 12 kHz)
	mpeg2  mpegVersion = 2 // ISO/IEC 13818-3 low sampling frequencies
	mpeg1  mpegVersion = 3 // ISO/IEC 11172-3
)

func (v mpegVersion) String() string {
	switch v {
	case mpeg1:
		return "mpeg-1"
	case mpeg2:
		return "mpeg-2"
	case mpeg25:
		return "mpeg-2.5"
	}
	return "reserved version"
}

// channelMode is the mode field of a frame header.
type channelMode uint8

const (
	modeStereo      channelMode = 0
	modeJointStereo channelMode = 1
	modeDualChannel channelMode = 2
	modeMono        channelMode = 3 // "single_channel" in the standard
)

func (m channelMode) String() string {
	return [...]string{"stereo", "joint stereo", "dual channel", "mono"}[m&3]
}

// frameHeader is a decoded 4-byte MPEG audio frame header
// (ISO/IEC 11172-3 §2.4.1.3 and §2.4.2.3; ISO/IEC 13818-3 §2.4.2.3 for the
// low sampling frequencies).
type frameHeader struct {
	version    mpegVersion
	layer      int  // 1, 2 or 3
	protected  bool // protection_bit == 0: a 16-bit CRC follows the header
	bitRate    int  // bits per second; 0 for free format
	sampleRate int  // Hz
	padded     bool // one extra slot in this frame
	mode       channelMode
	modeExt    uint8
	emphasis   uint8
}

// headerSize is the length of a frame header in bytes.
const headerSize = 4

// bitRatesKbps holds the bitrate_index tables in kbit/s; index 0 is free
// format, index 15 is forbidden. [mpeg-1 = 0 / lower rates = 1][layer-1].
// Values: ISO/IEC 11172-3:1993 §2.4.2.3 (bitrate_index) and ISO/IEC
// 13818-3:1998 §2.4.2.3 (lower sampling frequencies) [memory]; the Layer III
// rows are confirmed by the frame lengths of the lame-made fixtures.
var bitRatesKbps = [2][3][15]int{
	{ // MPEG-1
		{0, 32, 64, 96, 128, 160, 192, 224, 256, 288, 320, 352, 384, 416, 448}, // Layer I
		{0, 32, 48, 56, 64, 80, 96, 112, 128, 160, 192, 224, 256, 320, 384},    // Layer II
		{0, 32, 40, 48, 56, 64, 80, 96, 112, 128, 160, 192, 224, 256, 320},     // Layer III
	},
	{ // MPEG-2 (and 2.5) lower sampling frequencies
		{0, 32, 48, 56, 64, 80, 96, 112, 128, 144, 160, 176, 192, 224, 256}, // Layer I
		{0, 8, 16, 24, 32, 40, 48, 56, 64, 80, 96, 112, 128, 144, 160},      // Layer II
		{0, 8, 16, 24, 32, 40, 48, 56, 64, 80, 96, 112, 128, 144, 160},      // Layer III
	},
}

// sampleRates holds the sampling_frequency tables in Hz, indexed by version
// and the 2-bit field (3 is reserved). ISO/IEC 11172-3 §2.4.2.3 (44.1, 48,
// 32 kHz), ISO/IEC 13818-3 §2.4.2.3 (half of those) [memory]; the quarter
// rates are the MPEG-2.5 extension, which no ISO document defines.
var sampleRates = [4][3]int{
	mpeg25: {11025, 12000, 8000},
	mpeg2:  {22050, 24000, 16000},
	mpeg1:  {44100, 48000, 32000},
}

// parseHeader decodes the 4 bytes at the start of b. It accepts every header
// the syntax allows (including MPEG-2.5, free format and layers I/II, which
// unsupported rejects later) and returns an error for the reserved and
// forbidden values and a missing frame sync.
func parseHeader(b []byte) (frameHeader, error) {
	if len(b) < headerSize {
		return frameHeader{}, fmt.Errorf("frame header needs %d bytes, have %d", headerSize, len(b))
	}
	w := binary.BigEndian.Uint32(b)
	if w>>21 != 0x7FF {
		return frameHeader{}, fmt.Errorf("no frame sync (found %08x)", w)
	}
	h := frameHeader{
		version:   mpegVersion(w >> 19 & 3),
		layer:     4 - int(w>>17&3),
		protected: w>>16&1 == 0,
		padded:    w>>9&1 == 1,
		mode:      channelMode(w >> 6 & 3),
		modeExt:   uint8(w >> 4 & 3),
		emphasis:  uint8(w & 3),
	}
	if h.version == 1 {
		return frameHeader{}, fmt.Errorf("reserved MPEG version (header %08x)", w)
	}
	if h.layer == 4 {
		return frameHeader{}, fmt.Errorf("reserved layer (header %08x)", w)
	}
	rateIndex := w >> 10 & 3
	if rateIndex == 3 {
		return frameHeader{}, fmt.Errorf("reserved sampling frequency (header %08x)", w)
	}
	h.sampleRate = sampleRates[h.version][rateIndex]
	bitIndex := w >> 12 & 15
	if bitIndex == 15 {
		return frameHeader{}, fmt.Errorf("forbidden bit-rate index 15 (header %08x)", w)
	}
	lowRate := 0
	if h.version != mpeg1 {
		lowRate = 1
	}
	h.bitRate = bitRatesKbps[lowRate][h.layer-1][bitIndex] * 1000
	if h.emphasis == 2 {
		return frameHeader{}, fmt.Errorf("reserved emphasis (header %08x)", w)
	}
	return h, nil
}

// freeFormat reports whether the header has bitrate_index 0: the frame
// length is then not given by the header.
func (h frameHeader) freeFormat() bool { return h.bitRate == 0 }

// samplesPerFrame is 384 for Layer I, 1152 for Layer II and MPEG-1 Layer III,
// 576 for Layer III at the lower sampling frequencies (ISO/IEC 11172-3
// §2.4.3.1; ISO/IEC 13818-3 §2.4.3.1 [memory]).
func (h frameHeader) samplesPerFrame() int {
	switch {
	case h.layer == 1:
		return 384
	case h.layer == 3 && h.version != mpeg1:
		return 576
	}
	return 1152
}

// frameLen is the length of the frame in bytes, header included; 0 for free
// format. A frame holds samplesPerFrame/8 × bitRate/sampleRate bytes, rounded
// down, plus one slot when padded (a slot is 4 bytes in Layer I, 1 byte
// otherwise).
func (h frameHeader) frameLen() int {
	if h.freeFormat() {
		return 0
	}
	pad := 0
	if h.padded {
		pad = 1
	}
	if h.layer == 1 {
		return (12*h.bitRate/h.sampleRate + pad) * 4
	}
	return h.samplesPerFrame()/8*h.bitRate/h.sampleRate + pad
}

// channels is 1 for single-channel frames and 2 for the other modes.
func (h frameHeader) channels() int {
	if h.mode == modeMono {
		return 1
	}
	return 2
}

// sideInfoLen is the length of the Layer III side information that follows
// the header (and its CRC): 32/17 bytes for MPEG-1 stereo/mono, 17/9 bytes
// at the lower sampling frequencies (ISO/IEC 11172-3 §2.4.1.7; ISO/IEC
// 13818-3 §2.4.1.7).
func (h frameHeader) sideInfoLen() int {
	switch {
	case h.version == mpeg1 && h.mode != modeMono:
		return 32
	case h.version == mpeg1:
		return 17
	case h.mode != modeMono:
		return 17
	}
	return 9
}

// codec names the coding for Info.Codec, e.g. "mpeg-1 layer 3".
func (h frameHeader) codec() string { return fmt.Sprintf("%s layer %d", h.version, h.layer) }

// sameStream reports whether next can follow h in one stream: the same
// version, layer, sampling frequency and channel count. Bit rate, padding
// and the stereo coding may change from frame to frame.
func (h frameHeader) sameStream(next frameHeader) bool {
	return h.version == next.version && h.layer == next.layer &&
		h.sampleRate == next.sampleRate && h.channels() == next.channels()
}

// unsupported describes why kweigh does not decode a stream with this
// header, or returns "" for MPEG-1 and MPEG-2 Layer III with a bit-rate
// index (not free format).
func (h frameHeader) unsupported() string {
	switch {
	case h.layer != 3:
		return fmt.Sprintf("%s layer %d audio; only layer 3 (MP3) is decoded", h.version, h.layer)
	case h.freeFormat():
		return "free-format bit rate (bit-rate index 0); the frame length cannot be read from the header"
	}
	return ""
}
