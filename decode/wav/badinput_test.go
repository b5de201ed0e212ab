package wav_test

import (
	"bytes"
	"encoding/binary"
	"errors"
	"io"
	"runtime"
	"strings"
	"testing"

	"github.com/kweigh/kweigh/decode"
	"github.com/kweigh/kweigh/decode/wav"
	"github.com/kweigh/kweigh/internal/audiotest"
)

// Offsets in the files of these tests: RIFF header 12 bytes, chunk header
// 8, so the first chunk body starts at byte 20; fmt fields at +2 channels,
// +4 sample rate, +12 block align (Microsoft WAVEFORMATEX layout).
const firstBody = 20

// TestBadHeaders feeds broken headers to New: each must fail with a
// *decode.FormatError at the right byte offset, never panic.
func TestBadHeaders(t *testing.T) {
	data, _ := stereo16(4)
	fmt16 := fmtChunk(1, 2, 48000, 16)
	full := wavFile("RIFF", fmt16, chunk("data", data))
	tests := []struct {
		name       string
		file       []byte
		offset     int64
		problem    string // part of the message
		unexpected bool   // errors.Is(err, io.ErrUnexpectedEOF)
	}{
		{"empty file", nil, 0, "empty", false},
		{"4 bytes", []byte("RIFF"), 0, "too short", true},
		{"truncated RIFF header", []byte("RIFF\x24\x00\x00"), 0, "too short", true},
		{"not WAVE", []byte("RIFF\x04\x00\x00\x00WAVX"), 8, "WAVE", false},
		{"ends inside chunk header", full[:16], 12, "chunk header", true},
		{"ends inside fmt chunk", full[:30], 12, `"fmt "`, true},
		{"missing fmt", wavFile("RIFF", chunk("data", data)), int64(len(wavFile("RIFF", chunk("data", data)))), "no fmt", true},
		{"missing data", wavFile("RIFF", fmt16), 36, "no data", true},
		{"fmt too short", wavFile("RIFF", chunk("fmt ", make([]byte, 14)), chunk("data", data)), firstBody, "at least 16", false},
		{"zero channels", wavFile("RIFF", chunk("fmt ", fmtBody(1, 0, 48000, 4, 16)), chunk("data", data)), firstBody + 2, "0 channels", false},
		{"absurd channel count", wavFile("RIFF", chunk("fmt ", fmtBody(1, 65535, 48000, 4, 16)), chunk("data", data)), firstBody + 2, "65535 channels", false},
		{"zero sample rate", wavFile("RIFF", chunk("fmt ", fmtBody(1, 2, 0, 4, 16)), chunk("data", data)), firstBody + 4, "0 Hz", false},
		{"absurd sample rate", wavFile("RIFF", chunk("fmt ", fmtBody(1, 2, 10_000_000, 4, 16)), chunk("data", data)), firstBody + 4, "10000000 Hz", false},
		{"block align mismatch", wavFile("RIFF", chunk("fmt ", fmtBody(1, 2, 48000, 6, 16)), chunk("data", data)), firstBody + 12, "block align 6", false},
		{"zero bits", wavFile("RIFF", chunk("fmt ", fmtBody(1, 2, 48000, 4, 0)), chunk("data", data)), firstBody + 14, "0 bits", false},
		{"extensible too short", wavFile("RIFF", chunk("fmt ", fmtBody(0xFFFE, 2, 48000, 4, 16)), chunk("data", data)), firstBody, "40 are needed", false},
		{"valid bits above container", wavFile("RIFF", extensibleChunk(2, 48000, 16, 20, 3, 1), chunk("data", data)), firstBody + 18, "20 valid bits", false},
		{"RF64 without ds64", wavFile("RF64", fmt16, chunk("data", data).declaring(0xFFFFFFFF)), 40, "no ds64", false},
		{"ds64 too short", wavFile("RF64", chunk("ds64", make([]byte, 12)), fmt16, chunk("data", data)), firstBody, "ds64", false},
		{"chunk larger than file before data", wavFile("RIFF", fmt16, chunk("LIST", []byte("INFO")).declaring(1<<30), chunk("data", data)), 36, `"LIST" declares 1073741824 bytes`, true},
		{"not a RIFF file", []byte("OggS and then some bytes"), 0, "expected RIFF", false},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			_, err := wav.New(bytes.NewReader(tt.file), int64(len(tt.file)))
			var fe *decode.FormatError
			if !errors.As(err, &fe) {
				t.Fatalf("err = %v (%T), want *decode.FormatError", err, err)
			}
			if fe.Offset != tt.offset || !strings.Contains(err.Error(), tt.problem) {
				t.Errorf("err = %q at offset %d, want offset %d and %q", err, fe.Offset, tt.offset, tt.problem)
			}
			if errors.Is(err, io.ErrUnexpectedEOF) != tt.unexpected {
				t.Errorf("errors.Is(err, io.ErrUnexpectedEOF) = %v, want %v", !tt.unexpected, tt.unexpected)
			}
		})
	}
}

// TestUnsupported checks that codings the reader does not decode are
// refused by name. Format tags from Microsoft mmreg.h (WAVE_FORMAT_ADPCM
// 0x0002, WAVE_FORMAT_ALAW 0x0006, WAVE_FORMAT_MULAW 0x0007,
// WAVE_FORMAT_DVI_ADPCM/IMA 0x0011, WAVE_FORMAT_MPEGLAYER3 0x0055).
func TestUnsupported(t *testing.T) {
	data := make([]byte, 16)
	// A SubFormat GUID whose last 12 bytes are not the KSDATAFORMAT tail;
	// named in the usual text form (Data1 uint32, Data2 and Data3 uint16,
	// all little-endian, then Data4 as stored).
	unknownGUID := extensibleChunk(2, 48000, 16, 16, 3, 1)
	copy(unknownGUID.body[28:], "not-a-ksguid")
	tests := []struct {
		name string
		file []byte
		want string
	}{
		{"µ-law", wavFile("RIFF", fmtChunk(7, 1, 8000, 8), chunk("data", data)), "µ-law (format tag 0x0007)"},
		{"A-law", wavFile("RIFF", fmtChunk(6, 1, 8000, 8), chunk("data", data)), "A-law (format tag 0x0006)"},
		{"MS ADPCM", wavFile("RIFF", chunk("fmt ", fmtBody(2, 2, 44100, 2048, 4)), chunk("data", data)), "Microsoft ADPCM (format tag 0x0002)"},
		{"IMA ADPCM", wavFile("RIFF", chunk("fmt ", fmtBody(0x11, 1, 44100, 1024, 4)), chunk("data", data)), "IMA ADPCM (format tag 0x0011)"},
		{"MP3 in WAV", wavFile("RIFF", chunk("fmt ", fmtBody(0x55, 2, 44100, 1, 0)), chunk("data", data)), "MPEG-1 Layer 3 (MP3) (format tag 0x0055)"},
		{"unknown tag", wavFile("RIFF", fmtChunk(0x1234, 2, 44100, 16), chunk("data", data)), "unknown sample coding (format tag 0x1234)"},
		{"µ-law in extensible", wavFile("RIFF", extensibleChunk(1, 8000, 8, 8, 4, 7), chunk("data", data)), "µ-law (WAVE_FORMAT_EXTENSIBLE SubFormat 0x0007)"},
		{"unknown GUID", wavFile("RIFF", unknownGUID, chunk("data", data)), "unknown SubFormat GUID 00000001-6f6e-2d74-612d-6b7367756964"},
		{"16-bit float", wavFile("RIFF", fmtChunk(3, 2, 48000, 16), chunk("data", data)), "16-bit IEEE float"},
		{"64-bit integer", wavFile("RIFF", fmtChunk(1, 2, 48000, 64), chunk("data", data)), "64-bit integer PCM"},
		{"big-endian RIFX", append([]byte("RIFX\x00\x00\x00\x24WAVE"), make([]byte, 36)...), "big-endian RIFX"},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			_, err := wav.New(bytes.NewReader(tt.file), int64(len(tt.file)))
			var ue *decode.UnsupportedError
			if !errors.As(err, &ue) || !strings.Contains(ue.What, tt.want) {
				t.Fatalf("err = %v (%T), want *decode.UnsupportedError naming %q", err, err, tt.want)
			}
			// Detection goes through the registry too.
			if _, err := decode.New(bytes.NewReader(tt.file)); !errors.As(err, &ue) {
				t.Errorf("decode.New: err = %v, want *decode.UnsupportedError", err)
			}
		})
	}
}

// TestTruncatedData checks damage in the data chunk: the whole frames that
// are there are delivered, then a *decode.IntegrityError saying how much
// audio is missing, then io.EOF.
func TestTruncatedData(t *testing.T) {
	data, want := stereo16(1000) // 4000 bytes at 8 kHz
	full := wavFile("RIFF", fmtChunk(1, 2, 8000, 16), chunk("data", data))
	huge := wavFile("RIFF", fmtChunk(1, 2, 8000, 16), chunk("data", data).declaring(0xFFFFFFF0))
	rf64Huge := wavFile("RF64", ds64Chunk(0, 1<<62, 0, nil), fmtChunk(1, 2, 8000, 16), chunk("data", data).declaring(0xFFFFFFFF))
	partial := wavFile("RIFF", fmtChunk(1, 2, 8000, 16), chunk("data", data[:3999]))
	tests := []struct {
		name    string
		file    []byte
		frames  int64 // Info.Frames: the declared length
		deliver int   // whole frames delivered
		problem string
	}{
		// 600 frames of 1000 remain, the file cut inside frame 601:
		// (1000-600) frames / 8000 Hz = 0.050 s missing.
		{"cut mid-frame", full[:44+2402], 1000, 600, "data chunk declares 4000 bytes but file ends after 2402: audio truncated by 0.050 s"},
		// 0xFFFFFFF0 = 4294967280 bytes = 1073741820 frames of which 1000
		// exist: 1073740820 / 8000 = 134217.6025 s.
		{"data size larger than file", huge, 1073741820, 1000, "data chunk declares 4294967280 bytes but file ends after 4000: audio truncated by 134217.603 s"},
		{"RF64 absurd ds64 size", rf64Huge, 1 << 60, 1000, "declares 4611686018427387904 bytes"},
		{"partial last frame", partial, 999, 999, "the last 3 bytes are a partial frame"},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			var before runtime.MemStats
			runtime.ReadMemStats(&before)
			d := open(t, tt.file)
			var after runtime.MemStats
			runtime.ReadMemStats(&after)
			// Small structures only (the read buffer is made on the first
			// read, at most 256 KiB); nothing sized by the declared length.
			if grew := after.TotalAlloc - before.TotalAlloc; grew > 256<<10 {
				t.Errorf("New allocated %d bytes", grew)
			}
			if d.Info().Frames != tt.frames {
				t.Errorf("Info().Frames = %d, want %d", d.Info().Frames, tt.frames)
			}
			got, err := audiotest.ReadAll(t, d, 256)
			var ie *decode.IntegrityError
			if !errors.As(err, &ie) || !strings.Contains(err.Error(), tt.problem) {
				t.Fatalf("err = %v, want *decode.IntegrityError with %q", err, tt.problem)
			}
			sameBits(t, got, want[:2*tt.deliver])
		})
	}
}

// TestTruncatedDataOrder checks the exact sequence of returns at the point
// of damage: frames with the error, then (0, io.EOF) for good.
func TestTruncatedDataOrder(t *testing.T) {
	data, _ := stereo16(10)
	file := wavFile("RIFF", fmtChunk(1, 2, 8000, 16), chunk("data", data))
	d := open(t, file[:44+4*6]) // 6 of 10 frames
	buf := make([]float64, 2*4)
	if n, err := d.ReadFrames(buf); n != 4 || err != nil {
		t.Fatalf("first read = %d, %v; want 4, nil", n, err)
	}
	var ie *decode.IntegrityError
	if n, err := d.ReadFrames(buf); n != 2 || !errors.As(err, &ie) || ie.Offset != int64(44+24) {
		t.Fatalf("second read = %d, %v; want 2 frames and an IntegrityError at byte 68", n, err)
	}
	for range 2 {
		if n, err := d.ReadFrames(buf); n != 0 || err != io.EOF {
			t.Fatalf("after damage = %d, %v; want 0, io.EOF", n, err)
		}
	}
	if _, err := d.ReadFrames(make([]float64, 3)); err == nil {
		t.Error("buffer of 3 samples for 2 channels: want an error")
	}
}

// TestCleanEnd checks the clean end: frames, then (0, io.EOF) repeatedly.
func TestCleanEnd(t *testing.T) {
	data, _ := stereo16(3)
	d := open(t, wavFile("RIFF", fmtChunk(1, 2, 8000, 16), chunk("data", data)))
	buf := make([]float64, 8)
	if n, err := d.ReadFrames(buf); n != 3 || err != nil {
		t.Fatalf("read = %d, %v; want 3, nil", n, err)
	}
	for range 2 {
		if n, err := d.ReadFrames(buf); n != 0 || err != io.EOF {
			t.Fatalf("at end = %d, %v; want 0, io.EOF", n, err)
		}
	}
}

// TestUnsetDataSize checks a RIFF data chunk of size 0xFFFFFFFF (left by
// a streaming writer): the audio runs to the end of the file, the length is
// unknown (-1) and a note says so.
func TestUnsetDataSize(t *testing.T) {
	data, want := stereo16(50)
	d := open(t, wavFile("RIFF", fmtChunk(1, 2, 8000, 16), chunk("data", data).declaring(0xFFFFFFFF)))
	if d.Info().Frames != -1 {
		t.Errorf("Frames = %d, want -1", d.Info().Frames)
	}
	got, err := audiotest.ReadAll(t, d, 16)
	if err != nil {
		t.Fatal(err)
	}
	sameBits(t, got, want)
	if notes := d.(decode.Noter).Notes(); len(notes) != 1 || !strings.Contains(notes[0], "unset") {
		t.Errorf("Notes() = %q", notes)
	}
}

// TestAbsurdDS64Table checks that a ds64 table length far beyond the
// chunk does not make the reader allocate by the declared count.
func TestAbsurdDS64Table(t *testing.T) {
	ds := ds64Chunk(0, 4, 1, nil)
	binary.LittleEndian.PutUint32(ds.body[24:], 0xFFFFFFFF)
	file := wavFile("RF64", ds, fmtChunk(1, 1, 8000, 16), chunk("data", []byte{0, 0x80, 0xFF, 0x7F}).declaring(0xFFFFFFFF))
	got, err := audiotest.ReadAll(t, open(t, file), 4)
	if err != nil {
		t.Fatal(err)
	}
	sameBits(t, got, []float64{-1, 32767.0 / 32768}) // 0x8000 and 0x7FFF over 2^15
}
