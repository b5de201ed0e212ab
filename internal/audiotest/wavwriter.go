package audiotest

import (
	"encoding/binary"
	"math"
)

// PCMWAV builds a plain integer PCM WAV file (format tag 1, 16 or 24 bits)
// from interleaved samples at full scale ±1.0, rounded and clamped, as
// Microsoft's RIFF/WAVE description lays it out: "RIFF" size "WAVE", a
// 16-byte "fmt " chunk and the "data" chunk. Tests that need a delivery
// file build it with this instead of committing one.
func PCMWAV(rate, channels, bits int, samples []float64) []byte {
	bytesPer := bits / 8
	data := make([]byte, 0, len(samples)*bytesPer)
	full := math.Ldexp(1, bits-1)
	for _, v := range samples {
		q := int64(math.Round(v * full))
		q = max(-int64(full), min(int64(full)-1, q))
		for b := 0; b < bytesPer; b++ {
			data = append(data, byte(q>>(8*b)))
		}
	}
	out := []byte("RIFF\x00\x00\x00\x00WAVE")
	out = append(out, "fmt "...)
	out = binary.LittleEndian.AppendUint32(out, 16)
	out = binary.LittleEndian.AppendUint16(out, 1)
	out = binary.LittleEndian.AppendUint16(out, uint16(channels))
	out = binary.LittleEndian.AppendUint32(out, uint32(rate))
	out = binary.LittleEndian.AppendUint32(out, uint32(rate*channels*bytesPer))
	out = binary.LittleEndian.AppendUint16(out, uint16(channels*bytesPer))
	out = binary.LittleEndian.AppendUint16(out, uint16(bits))
	out = append(out, "data"...)
	out = binary.LittleEndian.AppendUint32(out, uint32(len(data)))
	out = append(out, data...)
	if len(data)%2 == 1 {
		out = append(out, 0) // RIFF chunks are padded to an even size
	}
	binary.LittleEndian.PutUint32(out[4:], uint32(len(out)-8))
	return out
}

// Sine returns seconds of interleaved samples at rate: a sine of freq Hz
// with amplitude amps[c] (linear, full scale 1.0) in channel c, with 10 ms
// linear fades so that starting and stopping adds no clicks.
func Sine(rate int, seconds, freq float64, amps ...float64) []float64 {
	n := int(seconds * float64(rate))
	nc := len(amps)
	out := make([]float64, n*nc)
	fade := float64(rate) / 100
	for i := 0; i < n; i++ {
		g := math.Min(1, math.Min(float64(i)/fade, float64(n-1-i)/fade))
		s := g * math.Sin(2*math.Pi*freq*float64(i)/float64(rate))
		for c, a := range amps {
			out[i*nc+c] = a * s
		}
	}
	return out
}

// DBFS converts a level in dB relative to full scale to a linear
// amplitude.
func DBFS(db float64) float64 { return math.Pow(10, db/20) }
