package serve

import (
	"bytes"
	"encoding/binary"
	"math"
	"os"
	"path/filepath"
	"testing"
)

// tone describes a test WAV: a 997 Hz sine on the left and the same sine a
// quarter period later on the right (so the channels are neither dual mono
// nor correlated, and each carries the sine's full power), 48 kHz, 16-bit.
type tone struct {
	seconds float64
	dBFS    float64 // peak amplitude of each channel's sine
	// cut, when > 0, keeps only this fraction of the audio bytes while the
	// header still declares all of them: a truncated, damaged delivery.
	cut float64
}

// wav returns the file's bytes.
func (tn tone) wav() []byte {
	const rate, channels = 48000, 2
	frames := int(tn.seconds * rate)
	amp := math.Pow(10, tn.dBFS/20)
	data := make([]byte, frames*channels*2)
	for i := range frames {
		ph := 2 * math.Pi * 997 * float64(i) / rate
		l := int16(math.Round(amp * math.Sin(ph) * 32767))
		r := int16(math.Round(amp * math.Cos(ph) * 32767))
		binary.LittleEndian.PutUint16(data[4*i:], uint16(l))
		binary.LittleEndian.PutUint16(data[4*i+2:], uint16(r))
	}
	declared := len(data)
	if tn.cut > 0 {
		data = data[:int(float64(len(data))*tn.cut)&^3]
	}
	var b bytes.Buffer
	le := func(v any) { binary.Write(&b, binary.LittleEndian, v) }
	b.WriteString("RIFF")
	le(uint32(36 + declared))
	b.WriteString("WAVEfmt ")
	le(uint32(16))
	le(uint16(1)) // PCM
	le(uint16(channels))
	le(uint32(rate))
	le(uint32(rate * channels * 2))
	le(uint16(channels * 2))
	le(uint16(16))
	b.WriteString("data")
	le(uint32(declared))
	b.Write(data)
	return b.Bytes()
}

// file writes the WAV into dir and returns its path.
func (tn tone) file(t testing.TB, dir, name string) string {
	t.Helper()
	p := filepath.Join(dir, name)
	if err := os.WriteFile(p, tn.wav(), 0o600); err != nil {
		t.Fatal(err)
	}
	return p
}

// The signals the tests upload, and what kweigh must say of them against
// ebu-r128 (-23.0 LUFS ±1.0 LU, ≤ -1 dBTP: EBU R 128 v4.0 (2020)).
var (
	// EBU Tech 3341 case 1: a stereo 1 kHz sine at -23 dBFS in each channel
	// reads -23.0 LUFS (±0.1 LU); 997 Hz reads the same within 0.01 LU.
	passTone = tone{seconds: 4, dBFS: -23}
	// -22.1 LUFS is inside ±1.0 LU but 0.1 LU from its edge, within the
	// 0.2 LU warning margin (kweigh's choice, common practice, no
	// published source).
	warnTone = tone{seconds: 4, dBFS: -22.1}
	// -18 LUFS is 5 LU above the target: a failure.
	failTone = tone{seconds: 4, dBFS: -18}
	// The header declares 4 s, the file holds 2 s: damaged, judged, failed.
	damagedTone = tone{seconds: 4, dBFS: -23, cut: 0.5}
)

// notAudio is a text file sent as an upload.
var notAudio = []byte("Saltmarsh FM running order, Thursday\n1. jingle\n2. news\n")
