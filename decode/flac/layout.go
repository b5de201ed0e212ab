package flac

import (
	"fmt"
	"strconv"
	"strings"

	"github.com/kweigh/kweigh/decode"
)

// flacOrder is FLAC's defined channel order for each channel count (FLAC
// format specification, FRAME_HEADER "Channel assignment"): 1 mono; 2 left,
// right; 3 left, right, center; 4 front left, front right, back left, back
// right; 5 front left, front right, front center, back/surround left,
// back/surround right; 6 the same plus LFE after center; 7 front left,
// front right, front center, LFE, back center, side left, side right; 8
// front left, front right, front center, LFE, back left, back right, side
// left, side right. With no side pair the back pair are the surrounds
// (Ls/Rs), as in a WAVE 5.1 mask; with a side pair (8 channels) the sides
// are Ls/Rs and the backs Lb/Rb.
var flacOrder = [9][]string{
	1: {decode.Mono},
	2: {decode.FrontLeft, decode.FrontRight},
	3: {decode.FrontLeft, decode.FrontRight, decode.FrontCenter},
	4: {decode.FrontLeft, decode.FrontRight, decode.SurroundLeft, decode.SurroundRight},
	5: {decode.FrontLeft, decode.FrontRight, decode.FrontCenter, decode.SurroundLeft, decode.SurroundRight},
	6: {decode.FrontLeft, decode.FrontRight, decode.FrontCenter, decode.LowFrequency, decode.SurroundLeft, decode.SurroundRight},
	7: {decode.FrontLeft, decode.FrontRight, decode.FrontCenter, decode.LowFrequency, decode.BackCenter, decode.SurroundLeft, decode.SurroundRight},
	8: {decode.FrontLeft, decode.FrontRight, decode.FrontCenter, decode.LowFrequency, decode.BackLeft, decode.BackRight, decode.SurroundLeft, decode.SurroundRight},
}

// maskTag is the Vorbis comment in which the reference encoder keeps the
// channel mask of a WAVE_FORMAT_EXTENSIBLE source whose mask is not FLAC's
// default for its channel count (flac 1.3 and later, e.g.
// "WAVEFORMATEXTENSIBLE_CHANNEL_MASK=0x0033").
const maskTag = "WAVEFORMATEXTENSIBLE_CHANNEL_MASK"

// channelLayout returns the layout and channel mask of a stream with the
// given channel count: the channel-mask tag of the Vorbis comment when it
// names as many channels as the stream has, else FLAC's defined order. A
// note explains a mask it could not use.
func channelLayout(md *metadata, channels int) (labels []string, mask uint32, note string) {
	labels = append([]string(nil), flacOrder[channels]...)
	switch {
	case md.commentErr != nil:
		return labels, 0, fmt.Sprintf("could not read the Vorbis comment (%v); assuming FLAC's channel order", md.commentErr)
	case !md.maskFound:
		return labels, 0, ""
	}
	value := md.maskValue
	m, err := strconv.ParseUint(strings.TrimSpace(value), 0, 32)
	if err != nil || m == 0 {
		return labels, 0, fmt.Sprintf("ignoring %s=%q: not a channel mask; assuming FLAC's channel order", maskTag, value)
	}
	if decode.MaskChannels(uint32(m)) != channels {
		return labels, 0, fmt.Sprintf("ignoring %s=%q: it names %d channels, the stream has %d; assuming FLAC's channel order",
			maskTag, value, decode.MaskChannels(uint32(m)), channels)
	}
	return decode.LayoutFromMask(uint32(m), channels), uint32(m), ""
}
