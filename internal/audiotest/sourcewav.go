package audiotest

import (
	"encoding/binary"
	"fmt"
	"os"
)

// SourceWAV is a PCM WAV file read the plain way, independently of any
// decoder in kweigh, so that a decode can be compared with the file it was
// encoded or converted from.
type SourceWAV struct {
	// Rate is the sample rate in hertz.
	Rate int
	// Channels is the number of interleaved channels.
	Channels int
	// Bits is the bits per sample of the fmt chunk.
	Bits int
	// Samples holds the integer samples, interleaved; 8-bit samples are
	// made signed (value − 128).
	Samples []int32
}

// ReadSourceWAV reads a RIFF/WAVE file with PCM samples (format tag 1 or
// WAVE_FORMAT_EXTENSIBLE 0xFFFE; Microsoft RIFF and WAVEFORMATEXTENSIBLE
// documentation): little-endian, 8-bit unsigned, 16/24/32-bit signed.
func ReadSourceWAV(path string) (*SourceWAV, error) {
	b, err := os.ReadFile(path)
	if err != nil {
		return nil, err
	}
	if len(b) < 12 || string(b[:4]) != "RIFF" || string(b[8:12]) != "WAVE" {
		return nil, fmt.Errorf("%s: not RIFF/WAVE", path)
	}
	w := &SourceWAV{}
	for off := 12; off+8 <= len(b); {
		id := string(b[off : off+4])
		n := int(binary.LittleEndian.Uint32(b[off+4:]))
		body := b[off+8 : min(off+8+n, len(b))]
		switch id {
		case "fmt ":
			if len(body) < 16 {
				return nil, fmt.Errorf("%s: fmt chunk of %d bytes at offset %d, want at least 16", path, len(body), off)
			}
			w.Channels = int(binary.LittleEndian.Uint16(body[2:]))
			w.Rate = int(binary.LittleEndian.Uint32(body[4:]))
			w.Bits = int(binary.LittleEndian.Uint16(body[14:]))
		case "data":
			width := (w.Bits + 7) / 8
			if width < 1 || width > 4 {
				return nil, fmt.Errorf("%s: data chunk at offset %d with %d bits per sample (no fmt chunk before it, or not 8-32)", path, off, w.Bits)
			}
			w.Samples = make([]int32, len(body)/width)
			for i := range w.Samples {
				p := body[i*width:]
				switch width {
				case 1:
					w.Samples[i] = int32(p[0]) - 128
				case 2:
					w.Samples[i] = int32(int16(binary.LittleEndian.Uint16(p)))
				case 3:
					w.Samples[i] = int32(uint32(p[0])<<8|uint32(p[1])<<16|uint32(p[2])<<24) >> 8
				case 4:
					w.Samples[i] = int32(binary.LittleEndian.Uint32(p))
				}
			}
			return w, nil
		}
		off += 8 + n + n&1
	}
	return nil, fmt.Errorf("%s: no data chunk", path)
}

// Scaled returns the samples as kweigh's decoders deliver them: value /
// 2^(Bits-1).
func (w *SourceWAV) Scaled() []float64 {
	out := make([]float64, len(w.Samples))
	full := float64(int64(1) << (w.Bits - 1))
	for i, v := range w.Samples {
		out[i] = float64(v) / full
	}
	return out
}
