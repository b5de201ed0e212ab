package wav_test

import (
	"bytes"
	"encoding/binary"
	"io"
	"math"
	"math/rand/v2"
	"strings"
	"testing"

	"github.com/kweigh/kweigh/decode"
	"github.com/kweigh/kweigh/decode/wav"
)

// loudPCM returns seconds of 48 kHz mono 16-bit noise near full scale: the
// kind of audio a lying header hides.
func loudPCM(seconds int, seed uint64) []byte {
	rng := rand.New(rand.NewPCG(seed, 1))
	v := make([]int32, seconds*48000)
	for i := range v {
		v[i] = int32(rng.IntN(60000) - 30000)
	}
	return encodeInts(v, 16, 16)
}

// openWAV opens b with the WAV reader, reads it to the end and returns its
// Info, the frames delivered and its notes.
func openWAV(t *testing.T, b []byte) (decode.Info, int, []string) {
	t.Helper()
	d, err := wav.New(bytes.NewReader(b), int64(len(b)))
	if err != nil {
		t.Fatal(err)
	}
	buf := make([]float64, 4096)
	frames := 0
	for {
		n, err := d.ReadFrames(buf)
		frames += n
		if err == io.EOF {
			break
		}
		if err != nil {
			t.Fatal(err)
		}
	}
	return d.Info(), frames, d.(decode.Noter).Notes()
}

// TestHeaderDeclaresLess: a data chunk (and RIFF form) that declares 10 s
// of a file holding 20 s delivers the declared 10 s and reports the other
// 10 s as undeclared data, with offset and length; legitimate chunks and
// tags after the audio, inside or outside the RIFF form, stay silent.
func TestHeaderDeclaresLess(t *testing.T) {
	audio := loudPCM(20, 1)
	half := uint32(len(audio) / 2)
	fmt16 := fmtChunk(1, 1, 48000, 16)
	const dataAt = 12 + 8 + 16 + 8 // RIFF header, fmt chunk, data chunk header

	dataHalved := wavFile("RIFF", fmt16, chunk("data", audio).declaring(half))
	bothHalved := bytes.Clone(dataHalved)
	binary.LittleEndian.PutUint32(bothHalved[4:], 4+8+16+8+half)

	id3v2 := append([]byte("ID3\x04\x00\x00\x00\x00\x01\x00"), make([]byte, 128)...) // sync-safe size 128
	id3v1 := append([]byte("TAG"), make([]byte, 125)...)
	full := wavFile("RIFF", fmt16, chunk("data", audio[:half]),
		chunk("LIST", []byte("INFOINAM\x0a\x00\x00\x00Tidewater\x00")), chunk("id3 ", make([]byte, 300)),
		chunk("JUNK", make([]byte, 28)), chunk("PAD ", make([]byte, 4000)), chunk("iXML", []byte("<BWFXML/>")),
		chunk("cue ", make([]byte, 4)), chunk("bext", make([]byte, 602)))
	appended := append(append(append(bytes.Clone(full), "id3 \x20\x00\x00\x00"...), make([]byte, 32)...), id3v2...)
	appended = append(appended, id3v1...)

	for _, tc := range []struct {
		name     string
		file     []byte
		offset   int64   // of the undeclared data; -1: none
		seconds  float64 // its length as audio
		tol      float64
		noteWord string // a note that must appear ("" none)
	}{
		{"data size halved", dataHalved, dataAt + int64(half), 10, 1e-9, ""},
		{"data and RIFF size halved", bothHalved, dataAt + int64(half), 10, 1e-9, ""},
		{"trailing chunks", full, -1, 0, 0, ""},
		{"tags after the RIFF form", appended, -1, 0, 0, ""},
		{"100 garbage bytes", append(bytes.Clone(full), bytes.Repeat([]byte{0x81}, 100)...), int64(len(full)), 100.0 / 2 / 48000, 1e-3, ""},
		{"5 stray bytes", append(bytes.Clone(full), 1, 2, 3, 4, 5), -1, 0, 0, "5 stray bytes"},
	} {
		t.Run(tc.name, func(t *testing.T) {
			info, frames, notes := openWAV(t, tc.file)
			u := info.Undeclared
			if frames != int(half/2) {
				t.Errorf("%d frames delivered, want the declared %d", frames, half/2)
			}
			switch {
			case tc.offset < 0 && u != nil:
				t.Errorf("undeclared %+v, want none", *u)
			case tc.offset >= 0 && u == nil:
				t.Errorf("no undeclared data reported, want %.3f s at byte %d", tc.seconds, tc.offset)
			case u != nil:
				if u.Offset != tc.offset || math.Abs(u.Seconds-tc.seconds) > tc.tol || u.Bytes != int64(len(tc.file))-tc.offset {
					t.Errorf("undeclared %+v, want %.3f s at byte %d", *u, tc.seconds, tc.offset)
				}
			}
			joined := strings.Join(notes, "; ")
			if tc.noteWord != "" && !strings.Contains(joined, tc.noteWord) || tc.noteWord == "" && len(notes) > 0 {
				t.Errorf("notes %q, want %q", joined, tc.noteWord)
			}
		})
	}
}
