package opus

import (
	"encoding/binary"
	"fmt"

	"github.com/kweigh/kweigh/decode"
)

// Head is the Opus identification header (RFC 7845 section 5.1).
type Head struct {
	Version        byte
	Channels       int
	PreSkip        int    // samples at 48 kHz to drop from the start
	InputRate      int    // the encoder's input sample rate, 0 if unknown
	OutputGainQ8   int16  // dB in Q7.8
	MappingFamily  byte   // 0, 1, 2, 3 or 255
	Streams        int    // for family ≠ 0
	CoupledStreams int    // for family ≠ 0
	Mapping        []byte // output channel → decoded channel
}

// ParseHead parses an OpusHead packet.
func ParseHead(b []byte) (*Head, error) {
	if len(b) < 19 || string(b[:8]) != "OpusHead" {
		return nil, fmt.Errorf("first packet is not an OpusHead header")
	}
	h := &Head{
		Version:       b[8],
		Channels:      int(b[9]),
		PreSkip:       int(binary.LittleEndian.Uint16(b[10:12])),
		InputRate:     int(binary.LittleEndian.Uint32(b[12:16])),
		OutputGainQ8:  int16(binary.LittleEndian.Uint16(b[16:18])),
		MappingFamily: b[18],
	}
	if h.Version>>4 != 0 {
		return nil, fmt.Errorf("OpusHead version %d is not one this decoder knows (major version 0 only)", h.Version)
	}
	if h.Channels == 0 {
		return nil, fmt.Errorf("OpusHead declares 0 channels")
	}
	switch h.MappingFamily {
	case 0:
		if h.Channels > 2 {
			return nil, fmt.Errorf("OpusHead mapping family 0 with %d channels (at most 2)", h.Channels)
		}
		h.Streams, h.CoupledStreams = 1, h.Channels-1
		h.Mapping = []byte{0, 1}[:h.Channels]
		return h, nil
	case 1:
		if h.Channels > 8 {
			return nil, fmt.Errorf("OpusHead mapping family 1 with %d channels (at most 8)", h.Channels)
		}
	default:
		return nil, &decode.UnsupportedError{Format: "opus", What: fmt.Sprintf("channel mapping family %d (kweigh decodes families 0 and 1)", h.MappingFamily)}
	}
	if len(b) < 21+h.Channels {
		return nil, fmt.Errorf("OpusHead is %d bytes, too short for its %d-channel mapping table", len(b), h.Channels)
	}
	h.Streams, h.CoupledStreams = int(b[19]), int(b[20])
	if h.Streams == 0 || h.CoupledStreams > h.Streams || h.Streams+h.CoupledStreams > 255 {
		return nil, fmt.Errorf("OpusHead declares %d streams of which %d coupled", h.Streams, h.CoupledStreams)
	}
	h.Mapping = append([]byte(nil), b[21:21+h.Channels]...)
	for i, m := range h.Mapping {
		if m != 255 && int(m) >= h.Streams+h.CoupledStreams {
			return nil, fmt.Errorf("OpusHead maps channel %d to decoded channel %d of %d", i, m, h.Streams+h.CoupledStreams)
		}
	}
	return h, nil
}

// vorbisOrder is the channel order of mapping family 1 for 1 to 8
// channels (RFC 7845 section 5.1.1.2, which takes it from the Vorbis I
// specification section 4.3.9).
var vorbisOrder = [][]string{
	1: {decode.Mono},
	2: {decode.FrontLeft, decode.FrontRight},
	3: {decode.FrontLeft, decode.FrontCenter, decode.FrontRight},
	4: {decode.FrontLeft, decode.FrontRight, decode.SurroundLeft, decode.SurroundRight},
	5: {decode.FrontLeft, decode.FrontCenter, decode.FrontRight, decode.SurroundLeft, decode.SurroundRight},
	6: {decode.FrontLeft, decode.FrontCenter, decode.FrontRight, decode.SurroundLeft, decode.SurroundRight, decode.LowFrequency},
	7: {decode.FrontLeft, decode.FrontCenter, decode.FrontRight, decode.SurroundLeft, decode.SurroundRight, decode.BackCenter, decode.LowFrequency},
	8: {decode.FrontLeft, decode.FrontCenter, decode.FrontRight, decode.SurroundLeft, decode.SurroundRight, decode.BackLeft, decode.BackRight, decode.LowFrequency},
}

// Layout returns the channel labels of the header's mapping.
func (h *Head) Layout() []string {
	if h.Channels < len(vorbisOrder) {
		return append([]string(nil), vorbisOrder[h.Channels]...)
	}
	return nil
}

// checkTags checks that the second packet is an OpusTags header (RFC 7845
// section 5.2) and returns its vendor string.
func checkTags(b []byte) (string, error) {
	if len(b) < 16 || string(b[:8]) != "OpusTags" {
		return "", fmt.Errorf("second packet is not an OpusTags header")
	}
	n := int(binary.LittleEndian.Uint32(b[8:12]))
	if n < 0 || n > len(b)-12 {
		return "", fmt.Errorf("OpusTags vendor string of %d bytes overruns the %d-byte header", n, len(b))
	}
	return string(b[12 : 12+n]), nil
}
