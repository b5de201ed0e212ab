package fix

import (
	"bytes"
	"encoding/binary"
	"testing"
)

// FuzzScanLayout feeds arbitrary bytes to the WAV and AIFF chunk scans the
// writers rely on: they must never panic, and whatever they accept must
// describe audio inside the file (offset and size within it, whole
// samples). The seed corpus (testdata/fuzz/FuzzScanLayout) holds a BWF with
// chunks on both sides of the audio, an RF64 with ds64, an AIFF and an
// AIFF-C sowt file, all written by this package's test helpers or by hand.
func FuzzScanLayout(f *testing.F) {
	f.Add(minimalWAV(), 24)
	f.Fuzz(func(t *testing.T, data []byte, bits int) {
		r := bytes.NewReader(data)
		size := int64(len(data))
		for _, scan := range []func() (*pcmLayout, error){
			func() (*pcmLayout, error) { return scanWAV(r, size, bits) },
			func() (*pcmLayout, error) { return scanAIFF(r, size, bits%2 == 0, bits) },
		} {
			l, err := scan()
			if err != nil {
				continue
			}
			if l.dataOffset < 0 || l.dataSize < 0 || l.dataOffset+l.dataSize > size {
				t.Fatalf("audio at %d+%d in a %d-byte file", l.dataOffset, l.dataSize, size)
			}
			if l.blockAlign <= 0 || l.bytes <= 0 || l.blockAlign%l.bytes != 0 {
				t.Fatalf("block align %d, %d bytes per sample", l.blockAlign, l.bytes)
			}
			if l.bextBody >= 0 && l.bextBody > size {
				t.Fatalf("bext at %d beyond %d", l.bextBody, size)
			}
		}
	})
}

// minimalWAV is a 4-frame 24-bit stereo WAV.
func minimalWAV() []byte {
	le := binary.LittleEndian
	var b []byte
	b = append(b, "RIFF"...)
	b = le.AppendUint32(b, 36+24)
	b = append(b, "WAVEfmt "...)
	b = le.AppendUint32(b, 16)
	b = le.AppendUint16(b, 1)
	b = le.AppendUint16(b, 2)
	b = le.AppendUint32(b, 48000)
	b = le.AppendUint32(b, 48000*6)
	b = le.AppendUint16(b, 6)
	b = le.AppendUint16(b, 24)
	b = append(b, "data"...)
	b = le.AppendUint32(b, 24)
	return append(b, make([]byte, 24)...)
}
