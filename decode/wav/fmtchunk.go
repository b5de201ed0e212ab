package wav

import (
	"encoding/binary"
	"fmt"

	"github.com/kweigh/kweigh/decode"
)

// Format tags of the fmt chunk (Microsoft mmreg.h; Microsoft "Multiple
// Channel Audio Data and WAVE Files").
const (
	tagPCM        = 0x0001
	tagIEEEFloat  = 0x0003
	tagExtensible = 0xFFFE
)

// Plausibility limits: beyond these a header is taken to be damaged rather
// than exotic.
const (
	maxChannels   = 64
	maxSampleRate = 768000
)

// extensibleGUIDTail is bytes 4..15 of every KSDATAFORMAT_SUBTYPE GUID built
// from a format tag (xxxxxxxx-0000-0010-8000-00aa00389b71); the first four
// bytes hold the tag.
var extensibleGUIDTail = [12]byte{0x00, 0x00, 0x10, 0x00, 0x80, 0x00, 0x00, 0xAA, 0x00, 0x38, 0x9B, 0x71}

// tagNames names the non-PCM codings most often met in WAVE files, so that
// the refusal says what the file is.
var tagNames = map[uint32]string{
	0x0002: "Microsoft ADPCM",
	0x0006: "A-law",
	0x0007: "µ-law",
	0x0011: "IMA ADPCM",
	0x0031: "GSM 6.10",
	0x0050: "MPEG audio",
	0x0055: "MPEG-1 Layer 3 (MP3)",
	0x0092: "Dolby AC-3 over S/PDIF",
	0x00FF: "AAC",
	0x0161: "Windows Media Audio",
	0x0162: "Windows Media Audio Professional",
	0x0163: "Windows Media Audio Lossless",
	0x1610: "HE-AAC",
	0x2000: "Dolby AC-3",
	0x2001: "DTS",
}

// sampleLayout is what the fmt chunk says about the sample data.
type sampleLayout struct {
	float         bool   // IEEE float rather than integer PCM
	extensible    bool   // declared as WAVE_FORMAT_EXTENSIBLE
	channels      int    // interleaved channels
	sampleRate    int    // frames per second
	blockAlign    int    // bytes per frame
	containerBits int    // bits each sample occupies in the data
	validBits     int    // significant bits (≤ containerBits)
	channelMask   uint32 // extensible dwChannelMask, 0 when absent
}

// chunkErrors builds the errors of one chunk: FormatErrors carry the file
// offset of the offending field, UnsupportedErrors name the coding.
type chunkErrors struct {
	container string // "wav", "rf64" or "bw64"
	body      int64  // file offset of the chunk body
}

func (e chunkErrors) bad(at int64, format string, args ...any) error {
	return &decode.FormatError{Format: e.container, Offset: e.body + at, Problem: fmt.Sprintf(format, args...)}
}

func (e chunkErrors) wrap(at int64, err error, format string, args ...any) error {
	return &decode.FormatError{Format: e.container, Offset: e.body + at, Problem: fmt.Sprintf(format, args...), Err: err}
}

func (e chunkErrors) unsupported(format string, args ...any) error {
	return &decode.UnsupportedError{Format: e.container, What: fmt.Sprintf(format, args...)}
}

// parseFmt reads a fmt chunk body located at byte offset off of the file.
func parseFmt(body []byte, off int64, container string) (sampleLayout, error) {
	e := chunkErrors{container: container, body: off}
	if len(body) < 16 {
		return sampleLayout{}, e.bad(0, "fmt chunk is %d bytes long, at least 16 are needed", len(body))
	}
	le := binary.LittleEndian
	tag := uint32(le.Uint16(body[0:]))
	l := sampleLayout{
		channels:      int(le.Uint16(body[2:])),
		sampleRate:    int(le.Uint32(body[4:])),
		blockAlign:    int(le.Uint16(body[12:])),
		containerBits: int(le.Uint16(body[14:])),
	}
	if l.channels == 0 {
		return l, e.bad(2, "fmt chunk declares 0 channels")
	}
	if l.channels > maxChannels {
		return l, e.bad(2, "fmt chunk declares %d channels; more than %d is not a plausible audio file", l.channels, maxChannels)
	}
	if l.sampleRate == 0 || l.sampleRate > maxSampleRate {
		return l, e.bad(4, "fmt chunk declares a sample rate of %d Hz; expected 1 to %d Hz", l.sampleRate, maxSampleRate)
	}

	coding := fmt.Sprintf("format tag 0x%04X", tag)
	if tag == tagExtensible {
		l.extensible = true
		if len(body) < 40 {
			return l, e.bad(0, "WAVE_FORMAT_EXTENSIBLE fmt chunk is %d bytes long, 40 are needed", len(body))
		}
		if cb := le.Uint16(body[16:]); cb < 22 {
			return l, e.bad(16, "WAVE_FORMAT_EXTENSIBLE fmt chunk has cbSize %d, 22 are needed", cb)
		}
		l.validBits = int(le.Uint16(body[18:]))
		l.channelMask = le.Uint32(body[20:])
		guid := body[24:40]
		if [12]byte(guid[4:]) != extensibleGUIDTail {
			return l, e.unsupported("WAVE_FORMAT_EXTENSIBLE with unknown SubFormat GUID %s", formatGUID(guid))
		}
		tag = le.Uint32(guid)
		coding = fmt.Sprintf("WAVE_FORMAT_EXTENSIBLE SubFormat 0x%04X", tag)
	}

	switch tag {
	case tagPCM:
		if err := l.settlePCMBits(e); err != nil {
			return l, err
		}
	case tagIEEEFloat:
		l.float = true
		if l.containerBits != 32 && l.containerBits != 64 {
			return l, e.unsupported("%d-bit IEEE float (%s); only 32 and 64 bits are read", l.containerBits, coding)
		}
		if l.validBits == 0 || !l.extensible {
			l.validBits = l.containerBits
		}
		if l.validBits != l.containerBits {
			return l, e.unsupported("IEEE float with %d valid bits in a %d-bit container (%s)", l.validBits, l.containerBits, coding)
		}
	default:
		if name, ok := tagNames[tag]; ok {
			return l, e.unsupported("%s (%s)", name, coding)
		}
		return l, e.unsupported("unknown sample coding (%s)", coding)
	}

	if want := l.channels * l.containerBits / 8; l.blockAlign != want {
		return l, e.bad(12, "fmt chunk declares block align %d, but %d channels of %d-bit samples need %d", l.blockAlign, l.channels, l.containerBits, want)
	}
	return l, nil
}

// settlePCMBits fixes container and valid bits of integer PCM. The plain
// format stores N-bit samples in ceil(N/8) bytes; the extensible one names
// the container size in wBitsPerSample and the significant bits separately.
func (l *sampleLayout) settlePCMBits(e chunkErrors) error {
	declared := l.containerBits
	switch {
	case declared == 0:
		return e.bad(14, "fmt chunk declares 0 bits per sample")
	case declared > 32:
		return e.unsupported("%d-bit integer PCM; at most 32 bits are read", declared)
	}
	if !l.extensible {
		l.validBits = declared
		l.containerBits = (declared + 7) / 8 * 8
		return nil
	}
	if declared%8 != 0 {
		return e.bad(14, "WAVE_FORMAT_EXTENSIBLE declares a %d-bit container; it must be a multiple of 8", declared)
	}
	if l.validBits == 0 {
		l.validBits = declared
	}
	if l.validBits > declared {
		return e.bad(18, "WAVE_FORMAT_EXTENSIBLE declares %d valid bits in a %d-bit container", l.validBits, declared)
	}
	return nil
}

// formatGUID writes a GUID stored in Microsoft's mixed-endian layout in its
// usual text form.
func formatGUID(b []byte) string {
	le := binary.LittleEndian
	return fmt.Sprintf("%08x-%04x-%04x-%x-%x", le.Uint32(b[0:]), le.Uint16(b[4:]), le.Uint16(b[6:]), b[8:10], b[10:16])
}
