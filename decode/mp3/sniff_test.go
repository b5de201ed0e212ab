package mp3

import (
	"bytes"
	"encoding/binary"
	"math/rand/v2"
	"testing"

	"github.com/kweigh/kweigh/decode"
	"github.com/kweigh/kweigh/internal/audiotest"
)

func TestMatchFixtures(t *testing.T) {
	// Every MPEG stream is recognised, the unsupported ones too (New then
	// says why).
	for _, file := range []string{
		"music-s48-128.mp3", "music-s48-192.mp3", "music-s48-v2.mp3", "speech-m44-128.mp3",
		"speech-m44-v2.mp3", "hot-s44-128.mp3", "tagged-id3v2-id3v1.mp3", "no-info-header.mp3",
		"mpeg2-22k.mp3", "mpeg25-8k.mp3", "free-format.mp3", "truncated.mp3",
	} {
		b := audiotest.Fixture(t, file)
		if !Match(bytes.NewReader(b), int64(len(b))) {
			t.Errorf("%s: not matched", file)
		}
	}
}

// wavOf wraps data in a minimal 16-bit stereo PCM WAV header.
func wavOf(data []byte) []byte {
	b := []byte("RIFF")
	b = binary.LittleEndian.AppendUint32(b, uint32(36+len(data)))
	b = append(b, "WAVEfmt "...)
	b = binary.LittleEndian.AppendUint32(b, 16)
	b = binary.LittleEndian.AppendUint16(b, 1)
	b = binary.LittleEndian.AppendUint16(b, 2)
	b = binary.LittleEndian.AppendUint32(b, 48000)
	b = binary.LittleEndian.AppendUint32(b, 48000*4)
	b = binary.LittleEndian.AppendUint16(b, 4)
	b = binary.LittleEndian.AppendUint16(b, 16)
	b = append(b, "data"...)
	b = binary.LittleEndian.AppendUint32(b, uint32(len(data)))
	return append(b, data...)
}

func TestMatchRejects(t *testing.T) {
	mp3 := audiotest.Fixture(t, "music-s48-128.mp3")
	one := header(mpeg1, 3, 9, 1, false, modeStereo)
	tests := map[string][]byte{
		"empty":       {},
		"one header":  one,
		"FLAC source": audiotest.Fixture(t, "music-s48.flac"),
		// A WAV whose samples are MP3 bytes: full of valid frame headers.
		"WAV holding MP3 bytes": wavOf(mp3),
		"AIFF":                  append([]byte("FORM\x00\x00\x10\x00AIFFCOMM"), mp3...),
		// Junk before the frames: without an ID3v2 tag the stream must
		// start at byte 0 (after zero padding at most).
		"text then frames": append([]byte("Saltmarsh Audio Works\n"), mp3...),
		// A valid header whose successor is not where its length says.
		"broken chain": append(append([]byte(nil), mp3[:384+100]...), bytes.Repeat([]byte{0x55}, 2000)...),
		// A chain of only one frame that ends at the end of the file.
		"single frame": mp3[384 : 2*384],
	}
	for name, b := range tests {
		if Match(bytes.NewReader(b), int64(len(b))) {
			t.Errorf("%s: matched", name)
		}
	}
}

func TestMatchRandom(t *testing.T) {
	// Random bytes starting with a plausible frame header: the chance that
	// three more valid headers sit exactly where the lengths predict is
	// negligible, so none of them may match.
	rng := rand.New(rand.NewPCG(3, 7))
	b := make([]byte, 8192)
	for i := range 5000 {
		for j := range b {
			b[j] = byte(rng.Uint32())
		}
		b[0], b[1] = 0xFF, 0xFB
		if i%2 == 0 {
			b[2] = 0x90 // 128 kbit/s, 44.1 kHz: a valid header
		}
		if Match(bytes.NewReader(b), int64(len(b))) {
			t.Fatalf("random data %d matched: % x", i, b[:8])
		}
	}
}

func TestMatchLeadingZeros(t *testing.T) {
	mp3 := audiotest.Fixture(t, "no-info-header.mp3")
	b := append(make([]byte, 1000), mp3...)
	if !Match(bytes.NewReader(b), int64(len(b))) {
		t.Error("1000 zero bytes before the first frame: not matched")
	}
	b = append(make([]byte, maxLeadingZeros+10), mp3...)
	if Match(bytes.NewReader(b), int64(len(b))) {
		t.Error("more zero bytes than maxLeadingZeros: matched")
	}
}

func TestRegistered(t *testing.T) {
	b := audiotest.Fixture(t, "speech-m44-128.mp3")
	d, err := decode.New(bytes.NewReader(b))
	if err != nil {
		t.Fatal(err)
	}
	if _, ok := d.(*Decoder); !ok || d.Info().Container != "mp3" {
		t.Errorf("decode.New returned %T %+v", d, d.Info())
	}
	found := false
	for _, name := range decode.Formats() {
		found = found || name == "mp3"
	}
	if !found {
		t.Errorf("mp3 not in %v", decode.Formats())
	}
}
