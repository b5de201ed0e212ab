package flac

import (
	"encoding/binary"
	"fmt"
	"os"
)

// sourceWAV is a PCM WAV file read the plain way, independently of any
// decoder in kweigh, so that the FLAC decode can be compared with the file
// it was encoded from.
type sourceWAV struct {
	rate, channels, bits int
	samples              []int32 // interleaved
}

// readSourceWAV reads a RIFF/WAVE file with PCM samples (format tag 1 or
// WAVE_FORMAT_EXTENSIBLE 0xFFFE; Microsoft RIFF and WAVEFORMATEXTENSIBLE
// documentation): little-endian, 8-bit unsigned, 16/24/32-bit signed.
func readSourceWAV(path string) (*sourceWAV, error) {
	b, err := os.ReadFile(path)
	if err != nil {
		return nil, err
	}
	if len(b) < 12 || string(b[:4]) != "RIFF" || string(b[8:12]) != "WAVE" {
		return nil, fmt.Errorf("%s: not RIFF/WAVE", path)
	}
	w := &sourceWAV{}
	for off := 12; off+8 <= len(b); {
		id := string(b[off : off+4])
		n := int(binary.LittleEndian.Uint32(b[off+4:]))
		body := b[off+8 : min(off+8+n, len(b))]
		switch id {
		case "fmt ":
			w.channels = int(binary.LittleEndian.Uint16(body[2:]))
			w.rate = int(binary.LittleEndian.Uint32(body[4:]))
			w.bits = int(binary.LittleEndian.Uint16(body[14:]))
		case "data":
			width := (w.bits + 7) / 8
			w.samples = make([]int32, len(body)/width)
			for i := range w.samples {
				p := body[i*width:]
				switch width {
				case 1:
					w.samples[i] = int32(p[0]) - 128
				case 2:
					w.samples[i] = int32(int16(binary.LittleEndian.Uint16(p)))
				case 3:
					w.samples[i] = int32(uint32(p[0])<<8|uint32(p[1])<<16|uint32(p[2])<<24) >> 8
				case 4:
					w.samples[i] = int32(binary.LittleEndian.Uint32(p))
				}
			}
			return w, nil
		}
		off += 8 + n + n&1
	}
	return nil, fmt.Errorf("%s: no data chunk", path)
}

// scaled returns the samples as kweigh's decoders deliver them: value /
// 2^(bits-1).
func (w *sourceWAV) scaled() []float64 {
	out := make([]float64, len(w.samples))
	full := float64(int64(1) << (w.bits - 1))
	for i, v := range w.samples {
		out[i] = float64(v) / full
	}
	return out
}
