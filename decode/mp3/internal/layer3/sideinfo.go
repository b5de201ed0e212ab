package layer3

import (
	"encoding/binary"
	"errors"
	"fmt"
)

// Header is the part of an MPEG audio frame header (ISO/IEC 11172-3
// §2.4.1.3, ISO/IEC 13818-3 §2.4.1.3) the Layer III decoding needs.
type Header struct {
	// LSF is true for the lower sampling frequencies (MPEG-2 and the
	// MPEG-2.5 extension): one granule per frame, 8-bit main_data_begin,
	// 9-bit scalefac_compress.
	LSF bool
	// RateIndex selects the scale-factor band tables: 0–2 for 44.1, 48,
	// 32 kHz; 3–5 for 22.05, 24, 16 kHz; 6–8 for 11.025, 12, 8 kHz.
	RateIndex int
	Protected bool // a 16-bit CRC follows the header
	Channels  int  // 1 or 2
	ModeExt   int  // joint stereo: bit 1 M/S, bit 0 intensity
	Joint     bool // mode is joint stereo
	BitRate   int  // bits per second; 0 for free format
	Padded    bool
}

// layer3Kbps is bitrate_index for Layer III: MPEG-1, then the lower
// sampling frequencies (ISO/IEC 11172-3 §2.4.2.3; ISO/IEC 13818-3
// §2.4.2.3) [memory; the same values as the parent package's table, whose
// frame lengths the lame fixtures confirm].
var layer3Kbps = [2][15]int{
	{0, 32, 40, 48, 56, 64, 80, 96, 112, 128, 160, 192, 224, 256, 320},
	{0, 8, 16, 24, 32, 40, 48, 56, 64, 80, 96, 112, 128, 144, 160},
}

// sampleRateHz is the sampling frequency of each RateIndex.
var sampleRateHz = [9]int{44100, 48000, 32000, 22050, 24000, 16000, 11025, 12000, 8000}

// ParseHeader reads a Layer III frame header from the first 4 bytes of b.
func ParseHeader(b []byte) (Header, error) {
	if len(b) < 4 {
		return Header{}, errors.New("frame header cut short")
	}
	w := binary.BigEndian.Uint32(b)
	if w>>21 != 0x7FF {
		return Header{}, fmt.Errorf("no frame sync (found %08x)", w)
	}
	version := w >> 19 & 3
	if version == 1 {
		return Header{}, fmt.Errorf("reserved MPEG version (header %08x)", w)
	}
	if w>>17&3 != 1 {
		return Header{}, fmt.Errorf("not layer III (header %08x)", w)
	}
	sr := int(w >> 10 & 3)
	bi := int(w >> 12 & 15)
	if sr == 3 || bi == 15 {
		return Header{}, fmt.Errorf("reserved sampling frequency or bit rate (header %08x)", w)
	}
	h := Header{Protected: w>>16&1 == 0, Padded: w>>9&1 == 1, ModeExt: int(w >> 4 & 3)}
	mode := w >> 6 & 3
	h.Channels = 2
	if mode == 3 {
		h.Channels = 1
	}
	h.Joint = mode == 1
	switch version {
	case 3:
		h.RateIndex = sr
		h.BitRate = layer3Kbps[0][bi] * 1000
	case 2:
		h.LSF, h.RateIndex = true, 3+sr
		h.BitRate = layer3Kbps[1][bi] * 1000
	default:
		h.LSF, h.RateIndex = true, 6+sr
		h.BitRate = layer3Kbps[1][bi] * 1000
	}
	return h, nil
}

// SampleRate is the sampling frequency in Hz.
func (h Header) SampleRate() int { return sampleRateHz[h.RateIndex] }

// Granules is the number of granules (576 samples each) per frame.
func (h Header) Granules() int {
	if h.LSF {
		return 1
	}
	return 2
}

// FrameLen is the frame length in bytes, header included (0 for free
// format): 144 (72 at the lower frequencies) × bit rate / sampling
// frequency, plus the padding byte.
func (h Header) FrameLen() int {
	if h.BitRate == 0 {
		return 0
	}
	n := 144 * h.BitRate / h.SampleRate()
	if h.LSF {
		n = 72 * h.BitRate / h.SampleRate()
	}
	if h.Padded {
		n++
	}
	return n
}

// SideInfoLen is the length of the side information in bytes.
func (h Header) SideInfoLen() int {
	switch {
	case !h.LSF && h.Channels == 2:
		return 32
	case !h.LSF:
		return 17
	case h.Channels == 2:
		return 17
	}
	return 9
}

// MainDataOffset is where the side information ends and the main data
// begins, from the start of the frame.
func (h Header) MainDataOffset() int {
	n := 4 + h.SideInfoLen()
	if h.Protected {
		n += 2
	}
	return n
}

// granule is the side information of one channel in one granule
// (ISO/IEC 11172-3 §2.4.1.7 and §2.4.2.7).
type granule struct {
	part23Len       int
	bigValues       int
	globalGain      int
	sfCompress      int
	windowSwitching bool
	blockType       int // 0 normal, 1 start, 2 short, 3 stop
	mixed           bool
	tableSelect     [3]int
	subblockGain    [3]int
	region0Count    int
	region1Count    int
	preflag         bool
	sfScale         bool
	count1B         bool
}

// sideInfo is the side information of one frame.
type sideInfo struct {
	mainDataBegin int
	scfsi         [2][4]bool
	gr            [2][2]granule // [granule][channel]
}

// parseSideInfo reads the side information of a frame described by h
// from b (which starts right after the header and its CRC).
func parseSideInfo(b []byte, h Header, si *sideInfo) error {
	if len(b) < h.SideInfoLen() {
		return errors.New("side information cut short")
	}
	var r bitReader
	r.reset(b[:h.SideInfoLen()])
	*si = sideInfo{}
	if h.LSF {
		si.mainDataBegin = int(r.read(8))
		r.read(uint(h.Channels)) // private bits
	} else {
		si.mainDataBegin = int(r.read(9))
		if h.Channels == 1 {
			r.read(5)
		} else {
			r.read(3)
		}
		for ch := range h.Channels {
			for band := range 4 {
				si.scfsi[ch][band] = r.read(1) == 1
			}
		}
	}
	for gr := range h.Granules() {
		for ch := range h.Channels {
			g := &si.gr[gr][ch]
			g.part23Len = int(r.read(12))
			g.bigValues = int(r.read(9))
			g.globalGain = int(r.read(8))
			if h.LSF {
				g.sfCompress = int(r.read(9))
			} else {
				g.sfCompress = int(r.read(4))
			}
			if g.bigValues > 288 {
				return fmt.Errorf("granule %d channel %d: big_values %d exceeds 288", gr, ch, g.bigValues)
			}
			g.windowSwitching = r.read(1) == 1
			if g.windowSwitching {
				g.blockType = int(r.read(2))
				g.mixed = r.read(1) == 1
				for i := range 2 {
					g.tableSelect[i] = int(r.read(5))
				}
				for i := range 3 {
					g.subblockGain[i] = int(r.read(3))
				}
				if g.blockType == 0 {
					return fmt.Errorf("granule %d channel %d: block_type 0 with window switching is forbidden", gr, ch)
				}
				// Implicit region counts (§2.4.2.7): region0 covers 8
				// long bands (9 short windows for short blocks).
				g.region0Count = 7
				if g.blockType == 2 && !g.mixed {
					g.region0Count = 8
				}
				g.region1Count = 20 - g.region0Count
			} else {
				for i := range 3 {
					g.tableSelect[i] = int(r.read(5))
				}
				g.region0Count = int(r.read(4))
				g.region1Count = int(r.read(3))
			}
			if !h.LSF {
				g.preflag = r.read(1) == 1
			}
			g.sfScale = r.read(1) == 1
			g.count1B = r.read(1) == 1
		}
	}
	return nil
}
