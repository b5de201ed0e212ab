package mp3

import (
	"encoding/binary"
	"testing"
)

// header builds a 4-byte header word from its fields (ISO/IEC 11172-3
// §2.4.1.3 bit layout).
func header(version mpegVersion, layer, bitIndex, rateIndex int, padded bool, mode channelMode) []byte {
	w := uint32(0x7FF)<<21 | uint32(version)<<19 | uint32(4-layer)<<17 | 1<<16 |
		uint32(bitIndex)<<12 | uint32(rateIndex)<<10 | uint32(mode)<<6
	if padded {
		w |= 1 << 9
	}
	return binary.BigEndian.AppendUint32(nil, w)
}

func TestParseHeader(t *testing.T) {
	// Expected bit rates and sampling frequencies: ISO/IEC 11172-3:1993
	// §2.4.2.3 and ISO/IEC 13818-3:1998 §2.4.2.3 [memory]. Frame lengths:
	// [calc] from the slot formula of the same sections,
	// 144·bitrate/fs (+1) bytes for MPEG-1 Layer III, 72·bitrate/fs for the
	// lower rates, 12·bitrate/fs (+1) × 4 bytes for Layer I. The tolerance is
	// 0: these are exact integers.
	tests := []struct {
		name     string
		b        []byte
		codec    string
		bitRate  int
		rate     int
		frameLen int
		spf      int
		channels int
		mode     string
	}{
		// 128 kbit/s at 48 kHz: 384 bytes; music-s48-128.mp3 is 169 frames
		// of 64 896 bytes = 169 × 384 [calc].
		{"mpeg1 L3 128k 48k", header(mpeg1, 3, 9, 1, false, modeJointStereo), "mpeg-1 layer 3", 128000, 48000, 384, 1152, 2, "joint stereo"},
		// 144 × 128000 / 44100 = 417.96 → 417, padded 418 [calc].
		{"mpeg1 L3 128k 44.1k", header(mpeg1, 3, 9, 0, false, modeMono), "mpeg-1 layer 3", 128000, 44100, 417, 1152, 1, "mono"},
		{"mpeg1 L3 128k 44.1k padded", header(mpeg1, 3, 9, 0, true, modeStereo), "mpeg-1 layer 3", 128000, 44100, 418, 1152, 2, "stereo"},
		{"mpeg1 L3 320k 32k", header(mpeg1, 3, 14, 2, false, modeDualChannel), "mpeg-1 layer 3", 320000, 32000, 1440, 1152, 2, "dual channel"},
		{"mpeg1 L3 32k 48k", header(mpeg1, 3, 1, 1, false, modeMono), "mpeg-1 layer 3", 32000, 48000, 96, 1152, 1, "mono"},
		// 72 × 64000 / 22050 = 208.98 → 208 [calc].
		{"mpeg2 L3 64k 22.05k", header(mpeg2, 3, 8, 0, false, modeJointStereo), "mpeg-2 layer 3", 64000, 22050, 208, 576, 2, "joint stereo"},
		{"mpeg2 L3 160k 16k", header(mpeg2, 3, 14, 2, false, modeStereo), "mpeg-2 layer 3", 160000, 16000, 720, 576, 2, "stereo"},
		{"mpeg2.5 L3 16k 8k", header(mpeg25, 3, 2, 2, false, modeMono), "mpeg-2.5 layer 3", 16000, 8000, 144, 576, 1, "mono"},
		{"mpeg2.5 L3 8k 11.025k", header(mpeg25, 3, 1, 0, false, modeMono), "mpeg-2.5 layer 3", 8000, 11025, 52, 576, 1, "mono"},
		// Layer II 192k 48k: 144 × 192000 / 48000 = 576 [calc].
		{"mpeg1 L2 192k 48k", header(mpeg1, 2, 10, 1, false, modeStereo), "mpeg-1 layer 2", 192000, 48000, 576, 1152, 2, "stereo"},
		{"mpeg1 L2 384k 32k", header(mpeg1, 2, 14, 2, true, modeStereo), "mpeg-1 layer 2", 384000, 32000, 1729, 1152, 2, "stereo"},
		// Layer I 448k 44.1k: (12 × 448000 / 44100 = 121) × 4 = 484 [calc].
		{"mpeg1 L1 448k 44.1k", header(mpeg1, 1, 14, 0, false, modeStereo), "mpeg-1 layer 1", 448000, 44100, 484, 384, 2, "stereo"},
		// (12 × 256000 / 24000 = 128, + 1 padding slot) × 4 = 516 [calc].
		{"mpeg2 L1 256k 24k", header(mpeg2, 1, 14, 1, true, modeMono), "mpeg-2 layer 1", 256000, 24000, 516, 384, 1, "mono"},
		{"free format", header(mpeg1, 3, 0, 0, false, modeStereo), "mpeg-1 layer 3", 0, 44100, 0, 1152, 2, "stereo"},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			h, err := parseHeader(tt.b)
			if err != nil {
				t.Fatal(err)
			}
			if h.codec() != tt.codec || h.bitRate != tt.bitRate || h.sampleRate != tt.rate ||
				h.frameLen() != tt.frameLen || h.samplesPerFrame() != tt.spf ||
				h.channels() != tt.channels || h.mode.String() != tt.mode {
				t.Errorf("got %s %d bit/s %d Hz len %d spf %d ch %d %s; want %s %d %d %d %d %d %s",
					h.codec(), h.bitRate, h.sampleRate, h.frameLen(), h.samplesPerFrame(), h.channels(), h.mode,
					tt.codec, tt.bitRate, tt.rate, tt.frameLen, tt.spf, tt.channels, tt.mode)
			}
		})
	}
}

func TestParseHeaderRejects(t *testing.T) {
	// Reserved and forbidden values: ISO/IEC 11172-3 §2.4.2.3 (layer '00'
	// reserved, bitrate_index '1111' forbidden, sampling_frequency '11'
	// reserved, emphasis '10' reserved); version '01' is reserved in the
	// MPEG-2.5 extension of the ID field [desc].
	good := header(mpeg1, 3, 9, 0, false, modeStereo)
	w := binary.BigEndian.Uint32(good)
	tests := []struct {
		name string
		word uint32
	}{
		{"no sync", w &^ (1 << 23)},
		{"reserved version", w&^(3<<19) | 1<<19},
		{"reserved layer", w &^ (3 << 17)},
		{"bit-rate index 15", w | 15<<12},
		{"reserved sampling frequency", w | 3<<10},
		{"reserved emphasis", w | 2},
	}
	for _, tt := range tests {
		if _, err := parseHeader(binary.BigEndian.AppendUint32(nil, tt.word)); err == nil {
			t.Errorf("%s (%08x): accepted", tt.name, tt.word)
		}
	}
	if _, err := parseHeader(good[:3]); err == nil {
		t.Error("3-byte header accepted")
	}
}

func TestUnsupported(t *testing.T) {
	tests := []struct {
		name string
		b    []byte
		want bool
	}{
		{"mpeg-1 layer 3", header(mpeg1, 3, 9, 0, false, modeStereo), false},
		{"mpeg-2 layer 3", header(mpeg2, 3, 8, 0, false, modeStereo), false},
		{"mpeg-2.5", header(mpeg25, 3, 2, 2, false, modeMono), false},
		{"layer 2", header(mpeg1, 2, 10, 1, false, modeStereo), true},
		{"layer 1", header(mpeg1, 1, 10, 1, false, modeStereo), true},
		{"free format", header(mpeg1, 3, 0, 1, false, modeStereo), true},
	}
	for _, tt := range tests {
		h, err := parseHeader(tt.b)
		if err != nil {
			t.Fatal(err)
		}
		if got := h.unsupported() != ""; got != tt.want {
			t.Errorf("%s: unsupported = %q, want rejected=%v", tt.name, h.unsupported(), tt.want)
		}
	}
}
