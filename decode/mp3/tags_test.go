package mp3

import (
	"bytes"
	"encoding/binary"
	"testing"

	"github.com/kweigh/kweigh/internal/audiotest"
)

func bytesReaderAt(b []byte) *bytes.Reader { return bytes.NewReader(b) }

// apeTag returns an APEv2 tag with header and footer around one item.
func apeTag() []byte {
	item := []byte("\x0b\x00\x00\x00\x00\x00\x00\x00Title\x00Tide Tables")
	headerFooter := func(isHeader bool) []byte {
		b := []byte("APETAGEX")
		b = binary.LittleEndian.AppendUint32(b, 2000)
		b = binary.LittleEndian.AppendUint32(b, uint32(len(item)+32))
		b = binary.LittleEndian.AppendUint32(b, 1)
		flags := uint32(1 << 31)
		if isHeader {
			flags |= 1 << 29
		}
		b = binary.LittleEndian.AppendUint32(b, flags)
		return append(b, make([]byte, 8)...)
	}
	out := append(headerFooter(true), item...)
	return append(out, headerFooter(false)...)
}

// id3v1 returns a 128-byte ID3v1 tag.
func id3v1() []byte {
	b := make([]byte, 128)
	copy(b, "TAGTide Tables")
	return b
}

// id3v24 returns an ID3v2.4 tag of n payload bytes, with a footer when
// footer is true.
func id3v24(n int, footer bool) []byte {
	size := []byte{byte(n >> 21 & 0x7F), byte(n >> 14 & 0x7F), byte(n >> 7 & 0x7F), byte(n & 0x7F)}
	flags := byte(0)
	if footer {
		flags = id3v2FooterFlag
	}
	b := append([]byte{'I', 'D', '3', 4, 0, flags}, size...)
	b = append(b, make([]byte, n)...)
	if footer {
		b = append(b, '3', 'D', 'I', 4, 0, flags)
		b = append(b, size...)
	}
	return b
}

func TestAudioBoundsFixture(t *testing.T) {
	b := audiotest.Fixture(t, "tagged-id3v2-id3v1.mp3")
	start, end := audioBounds(bytesReaderAt(b), int64(len(b)))
	// ID3v2 header: size bytes 00 00 03 6C = 3·128 + 108 = 492, plus the
	// 10-byte header = 502 (syncsafe rule of the ID3v2 description [desc]);
	// ID3v1 is the last 128 bytes [desc].
	if start != 502 || end != int64(len(b))-128 {
		t.Errorf("audio bounds %d..%d, want 502..%d", start, end, len(b)-128)
	}
}

func TestAudioBoundsBuilt(t *testing.T) {
	audio := audiotest.Fixture(t, "no-info-header.mp3")
	var b []byte
	b = append(b, id3v24(300, true)...)
	b = append(b, id3v24(20, false)...)
	wantStart := len(b)
	b = append(b, audio...)
	wantEnd := len(b)
	b = append(b, apeTag()...)
	b = append(b, id3v24(40, true)...)
	b = append(b, id3v1()...)
	start, end := audioBounds(bytesReaderAt(b), int64(len(b)))
	if start != int64(wantStart) || end != int64(wantEnd) {
		t.Errorf("audio bounds %d..%d, want %d..%d", start, end, wantStart, wantEnd)
	}
}

func TestAudioBoundsImplausible(t *testing.T) {
	// A tag that claims more bytes than the file has is left in place.
	b := id3v24(10, false)
	b[9] = 0x7F
	start, end := audioBounds(bytesReaderAt(b), int64(len(b)))
	if start != 0 || end != int64(len(b)) {
		t.Errorf("got %d..%d", start, end)
	}
	// Non-syncsafe size bytes are not an ID3v2 size.
	b = id3v24(10, false)
	b[8] = 0x80
	if start, _ := audioBounds(bytesReaderAt(b), int64(len(b))); start != 0 {
		t.Errorf("non-syncsafe size accepted: start %d", start)
	}
}
