package decode_test

import (
	"bytes"
	"encoding/binary"
	"errors"
	"io"
	"os"
	"path/filepath"
	"slices"
	"strings"
	"testing"

	"github.com/kweigh/kweigh/decode"
	_ "github.com/kweigh/kweigh/decode/wav"
)

// tinyWAV is a 16-bit mono PCM WAV of two samples, laid out per Microsoft's
// WAVEFORMATEX documentation.
func tinyWAV() []byte {
	le := binary.LittleEndian
	b := []byte("RIFF")
	b = le.AppendUint32(b, 4+24+12)
	b = append(b, "WAVEfmt "...)
	b = le.AppendUint32(b, 16)
	for _, v := range []uint16{1, 1} { // PCM, mono
		b = le.AppendUint16(b, v)
	}
	b = le.AppendUint32(b, 8000)
	b = le.AppendUint32(b, 16000)
	b = le.AppendUint16(b, 2)
	b = le.AppendUint16(b, 16)
	b = append(b, "data"...)
	b = le.AppendUint32(b, 4)
	return append(b, 0x00, 0x40, 0x00, 0xC0) // 16384, -16384
}

func TestNew(t *testing.T) {
	// An empty file is a FormatError at byte 0.
	_, err := decode.New(bytes.NewReader(nil))
	var fe *decode.FormatError
	if !errors.As(err, &fe) || fe.Offset != 0 || !strings.Contains(err.Error(), "empty") {
		t.Errorf("empty: err = %v, want a FormatError at byte 0", err)
	}
	// Content no registered format claims.
	for _, content := range []string{"plain text, not audio", "RIFF\x10\x00\x00\x00AVI LIST", "\x00"} {
		if _, err := decode.New(bytes.NewReader([]byte(content))); !errors.Is(err, decode.ErrUnknownFormat) {
			t.Errorf("%q: err = %v, want ErrUnknownFormat", content, err)
		}
	}
	// A WAV is found by its content, and decodes: 16384/2^15 = 0.5.
	d, err := decode.New(bytes.NewReader(tinyWAV()))
	if err != nil {
		t.Fatal(err)
	}
	buf := make([]float64, 4)
	if n, err := d.ReadFrames(buf); n != 2 || err != nil || buf[0] != 0.5 || buf[1] != -0.5 {
		t.Errorf("ReadFrames = %d, %v, %v; want 2 frames 0.5 -0.5", n, err, buf[:n])
	}
	if !slices.Contains(decode.Formats(), "wav") {
		t.Errorf("Formats() = %v, want wav registered", decode.Formats())
	}
}

func TestOpen(t *testing.T) {
	dir := t.TempDir()
	wavPath := filepath.Join(dir, "take.audio") // the extension does not matter
	textPath := filepath.Join(dir, "notes.wav")
	if err := os.WriteFile(wavPath, tinyWAV(), 0o644); err != nil {
		t.Fatal(err)
	}
	if err := os.WriteFile(textPath, []byte("running order for Tuesday"), 0o644); err != nil {
		t.Fatal(err)
	}
	f, err := decode.Open(wavPath)
	if err != nil {
		t.Fatal(err)
	}
	if info := f.Info(); info.Container != "wav" || info.Frames != 2 {
		t.Errorf("Info = %+v", info)
	}
	if err := f.Close(); err != nil {
		t.Error(err)
	}
	tests := []struct {
		path string
		is   error
		want string
	}{
		{textPath, decode.ErrUnknownFormat, textPath},
		{dir, nil, "is a directory"},
		{filepath.Join(dir, "missing.wav"), os.ErrNotExist, "missing.wav"},
	}
	for _, tt := range tests {
		_, err := decode.Open(tt.path)
		if err == nil || !strings.Contains(err.Error(), tt.want) || (tt.is != nil && !errors.Is(err, tt.is)) {
			t.Errorf("Open(%q) = %v, want an error containing %q", tt.path, err, tt.want)
		}
	}
}

// TestFormatErrorUnwrap checks that a FormatError exposes its cause.
func TestFormatErrorUnwrap(t *testing.T) {
	_, err := decode.New(bytes.NewReader([]byte("RIFF\x00\x00")))
	var fe *decode.FormatError
	if !errors.As(err, &fe) || !errors.Is(err, io.ErrUnexpectedEOF) {
		t.Errorf("truncated RIFF header: err = %v, want a FormatError wrapping io.ErrUnexpectedEOF", err)
	}
}
