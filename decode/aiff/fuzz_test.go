package aiff

import (
	"bytes"
	"io"
	"math"
	"os"
	"path/filepath"
	"testing"
)

// FuzzAIFF feeds arbitrary bytes to the AIFF parser and decoder. Whatever
// the input, it must not panic, must return typed errors, must end with
// io.EOF, and integer samples must stay within full scale. Seeds: the sox
// fixtures (cut short) and testdata/fuzz/FuzzAIFF.
func FuzzAIFF(f *testing.F) {
	for _, name := range []string{"stereo16-44k.aifc", "stereo16-44k-fl32.aifc", "mono24-48k.aiff"} {
		b, err := os.ReadFile(filepath.Join("testdata", name))
		if err != nil {
			f.Fatal(err)
		}
		f.Add(b[:min(len(b), 600)])
	}
	f.Add(buildAIFF(aiffSpec{aifc: true, compression: "sowt", channels: 3, bits: 20, rate: 8000, ints: make([]int32, 30), commFrames: -1, formSize: -1, ssndOffset: 3}))
	// A COMM frame count covering half of SSND, and audio after the FORM.
	f.Add(buildAIFF(aiffSpec{channels: 1, bits: 16, rate: 8000, ints: make([]int32, 40), commFrames: 20, formSize: -1}))
	f.Add(append(buildAIFF(aiffSpec{channels: 1, bits: 16, rate: 8000, ints: make([]int32, 20), commFrames: -1, formSize: -1}),
		0x81, 0x7F, 0x81, 0x7F, 0x81, 0x7F, 0x81, 0x7F, 0x81, 0x7F))
	f.Fuzz(func(t *testing.T, data []byte) {
		d, err := NewDecoder(bytes.NewReader(data), int64(len(data)))
		if err != nil {
			if k := errorKind(err); k != "format" && k != "unsupported" {
				t.Fatalf("NewDecoder: %s error %v", k, err)
			}
			return
		}
		info := d.Info()
		if info.Channels < 1 || info.SampleRate < 1 {
			t.Fatalf("info %+v", info)
		}
		if u := info.Undeclared; u != nil && (u.Bytes <= 0 || u.Offset < 0 || u.Offset+u.Bytes > int64(len(data)) || !(u.Seconds >= 0)) {
			t.Fatalf("implausible undeclared data %+v in a %d-byte file", *u, len(data))
		}
		buf := make([]float64, 256*info.Channels)
		for calls := 0; ; calls++ {
			if calls > 1<<16 {
				t.Fatal("no io.EOF")
			}
			n, err := d.ReadFrames(buf)
			if info.SampleFormat == "int" {
				for _, v := range buf[:n*info.Channels] {
					if v < -1 || v >= 1 || math.IsNaN(v) {
						t.Fatalf("integer sample %v outside [-1, 1)", v)
					}
				}
			}
			if err == io.EOF {
				return
			}
			if err != nil && errorKind(err) != "integrity" {
				t.Fatalf("ReadFrames: %s error %v", errorKind(err), err)
			}
		}
	})
}
