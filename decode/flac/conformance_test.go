package flac

import (
	"bytes"
	"encoding/binary"
	"errors"
	"io"
	"reflect"
	"runtime"
	"strings"
	"testing"

	"github.com/kweigh/kweigh/decode"
	"github.com/kweigh/kweigh/internal/audiotest"
)

// TestTruncatedAtEveryBoundary cuts a stream at every structure boundary
// (and one byte either side): inside and between the metadata blocks, at
// each frame start, after each frame header, before each frame's CRC-16.
// A cut signature is a FormatError, metadata cuts FormatErrors wrapping
// io.ErrUnexpectedEOF; frame cuts
// deliver exactly the frames before the cut and then an IntegrityError
// naming the samples lost.
func TestTruncatedAtEveryBoundary(t *testing.T) {
	data := withVorbisComment(audiotest.Fixture(t, "stereo24-48k.flac"), "TITLE=boundary test")
	full, err, _ := decodeAll(t, data, DefaultOptions(), 4096)
	if err != nil {
		t.Fatal(err)
	}
	offs := frameOffsets(t, data)
	var cuts []int
	// Signature, STREAMINFO header and body, the comment's header and body.
	for _, c := range []int{0, 4, 8, 8 + 34, 8 + 34 + 4, int(offs[0])} {
		cuts = append(cuts, c-1, c, c+1)
	}
	for k := range len(offs) - 1 {
		h, problem := parseHeader(data[offs[k]:])
		if problem != "" {
			t.Fatal(problem)
		}
		for _, c := range []int{int(offs[k]), int(offs[k]) + h.size, int(offs[k+1]) - 2} {
			cuts = append(cuts, c-1, c, c+1)
		}
	}
	for _, cut := range cuts {
		if cut <= 0 || cut >= len(data) {
			continue
		}
		got, err, _ := decodeAll(t, data[:cut], DefaultOptions(), 4096)
		if cut < 4 {
			if !isFormat(err) {
				t.Errorf("cut at %d (signature): err = %v, want a FormatError", cut, err)
			}
			continue
		}
		if cut < int(offs[0]) {
			if !isFormat(err) || !errors.Is(err, io.ErrUnexpectedEOF) {
				t.Errorf("cut at %d (metadata): err = %v, want a FormatError wrapping io.ErrUnexpectedEOF", cut, err)
			}
			continue
		}
		k := 0
		for k+1 < len(offs) && int(offs[k+1]) <= cut {
			k++
		}
		delivered := min(k*4096, 28800)
		if !isIntegrity(err) || !strings.Contains(err.Error(), "are lost") {
			t.Errorf("cut at %d (in frame %d): err = %v, want an IntegrityError naming the loss", cut, k, err)
			continue
		}
		if len(got) != 2*delivered || len(got) > 0 && !reflect.DeepEqual(got, full[:2*delivered]) {
			t.Errorf("cut at %d: delivered %d frames, want the %d before the cut", cut, len(got)/2, delivered)
		}
	}
}

// streamInfoBlock returns "fLaC" and a STREAMINFO block with the given
// fields (RFC 9639, section 8.2), not marked last.
func streamInfoBlock(minBlock, maxBlock, rate, channels, bits int, samples uint64) []byte {
	var b bytes.Buffer
	b.WriteString("fLaC")
	b.Write([]byte{0, 0, 0, 34})
	binary.Write(&b, binary.BigEndian, uint16(minBlock))
	binary.Write(&b, binary.BigEndian, uint16(maxBlock))
	b.Write(make([]byte, 6))
	binary.Write(&b, binary.BigEndian, uint64(rate)<<44|uint64(channels-1)<<41|uint64(bits-1)<<36|samples)
	b.Write(bytes.Repeat([]byte{0xAB}, 16))
	return b.Bytes()
}

// TestAbsurdSizesAllocateLittle gives the decoder declared sizes far beyond
// the file: it must refuse them (or find the stream short) without
// allocating anything like what they declare.
func TestAbsurdSizesAllocateLittle(t *testing.T) {
	last := func(b []byte) []byte { b = clone(b); b[4] |= 0x80; return b }
	si := streamInfoBlock(4096, 4096, 48000, 2, 16, 1000)
	comment := func(body []byte) []byte {
		n := len(body)
		return append(append(clone(si), 0x84, byte(n>>16), byte(n>>8), byte(n)), body...)
	}
	le := func(v uint32) []byte { return binary.LittleEndian.AppendUint32(nil, v) }
	// A frame header declaring 65535 samples on 8 channels, then nothing.
	bigFrame := []byte{0xFF, 0xF8, 0x70, 0x70, 0x00, 0xFF, 0xFE}
	bigFrame = append(bigFrame, crc8(bigFrame))
	tests := []struct {
		name string
		data []byte
		want string
	}{
		{"metadata block of 16 MB", append(clone(si), 0x81, 0xFF, 0xFF, 0xFF, 1, 2, 3), "declares 16777215 bytes"},
		{"STREAMINFO length 16 MB", append([]byte("fLaC\x80\xff\xff\xff"), make([]byte, 40)...), "must be 34"},
		{"vendor string of 4 GB", comment(le(0xFFFFFFFF)), "vendor string declares"},
		{"4 billion comments", comment(append(le(0), le(0xFFFFFFFF)...)), "declares 4294967295 comments"},
		{"comment of 4 GB", comment(append(append(le(0), le(1)...), le(0xFFFFFFF0)...)), "comment 0 declares"},
		{"65535-sample 8-channel frame in a tiny file", append(last(streamInfoBlock(16, 65535, 48000, 8, 16, 1<<30)), bigFrame...), "the file ends inside the frame"},
		{"4096 metadata blocks of nothing", append(clone(si), bytes.Repeat([]byte{1, 0, 0, 0}, maxMetadataBlocks)...), "more than 4096 metadata blocks"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			var before, after runtime.MemStats
			runtime.GC()
			runtime.ReadMemStats(&before)
			d, err := NewDecoder(bytes.NewReader(tc.data), int64(len(tc.data)), DefaultOptions())
			var notes string
			if err == nil {
				_, err = audiotest.ReadAll(t, d, 4096)
				notes = strings.Join(d.Notes(), "\n")
			}
			runtime.ReadMemStats(&after)
			if err == nil && !strings.Contains(notes, tc.want) || err != nil && !strings.Contains(err.Error()+notes, tc.want) {
				t.Errorf("err = %v, notes %q; want %q", err, notes, tc.want)
			}
			// 8 channels × 65535 samples × 4 bytes is 2 MB of sample
			// buffers; the allowance is far below any declared size.
			if alloc := after.TotalAlloc - before.TotalAlloc; alloc > 4<<20 {
				t.Errorf("allocated %d bytes", alloc)
			}
		})
	}
}

// TestReadFramesMisuse: a buffer that is not a whole number of frames is
// an error, not a panic or a partial frame; an empty buffer reads nothing;
// reading after io.EOF gives io.EOF again.
func TestReadFramesMisuse(t *testing.T) {
	data := audiotest.Fixture(t, "stereo24-48k.flac")
	d, err := NewDecoder(bytes.NewReader(data), int64(len(data)), DefaultOptions())
	if err != nil {
		t.Fatal(err)
	}
	if n, err := d.ReadFrames(make([]float64, 4097)); n != 0 || err == nil || !strings.Contains(err.Error(), "not a multiple of 2 channels") {
		t.Errorf("odd buffer: %d, %v", n, err)
	}
	if n, err := d.ReadFrames(nil); n != 0 || err != nil {
		t.Errorf("empty buffer: %d, %v", n, err)
	}
	got, err := audiotest.ReadAll(t, d, 1000)
	if err != nil || len(got) != 2*28800 {
		t.Fatalf("after misuse: %d samples, %v; want the whole stream", len(got), err)
	}
	for range 3 {
		if n, err := d.ReadFrames(make([]float64, 100)); n != 0 || err != io.EOF {
			t.Errorf("after the end: %d, %v; want 0, io.EOF", n, err)
		}
	}
	var _ decode.Decoder = d
}
