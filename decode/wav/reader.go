package wav

import (
	"fmt"
	"io"

	"github.com/kweigh/kweigh/decode"
)

// rawBufferSize is the size of the byte buffer each decoder reads the data
// chunk through. It is fixed whatever the file declares, so memory does not
// grow with the length of the file.
const rawBufferSize = 64 << 10

// decoder streams the data chunk of one file. It implements decode.Decoder
// and decode.Noter.
type decoder struct {
	src        io.ReaderAt
	info       decode.Info
	convert    converter
	channels   int
	blockAlign int64

	dataOffset int64 // file offset of the first sample byte
	pos        int64 // bytes of the data chunk consumed so far
	readable   int64 // bytes of whole frames the file really holds

	damage *decode.IntegrityError // returned once after the last whole frame
	err    error                  // sticky: io.EOF or a read error
	raw    []byte                 // reused for every read
	notes  []string
}

// New reads the header of a WAVE-family file of the given size from src
// and returns a decoder positioned at the first frame. It reads the chunk
// headers and the fmt, ds64 and bext chunks only; the audio is read by
// ReadFrames.
//
// Errors are *decode.FormatError for a broken or truncated header (with the
// byte offset; errors.Is(err, io.ErrUnexpectedEOF) when the file ends inside
// a structure) and *decode.UnsupportedError for a coding this package does
// not read.
func New(src decode.Source, size int64) (decode.Decoder, error) {
	h, err := readHeader(src, size)
	if err != nil {
		return nil, err
	}
	l := h.layout
	d := &decoder{
		src:        src,
		convert:    converterFor(l),
		channels:   l.channels,
		blockAlign: int64(l.blockAlign),
		dataOffset: h.dataOffset,
		notes:      h.notes,
	}
	d.info = decode.Info{
		Container:     h.container,
		Codec:         "pcm",
		SampleRate:    l.sampleRate,
		Channels:      l.channels,
		Layout:        decode.LayoutFromMask(l.channelMask, l.channels),
		ChannelMask:   l.channelMask,
		BitsPerSample: l.validBits,
		SampleFormat:  decode.Int,
		Frames:        h.frames(),
		Bext:          h.bext,
		IXML:          h.ixml,
		Undeclared:    h.undeclared,
	}
	if l.float {
		d.info.Codec, d.info.SampleFormat = "ieee-float", decode.Float
	}

	// What the file really holds: the declared size, unless the file ends
	// first; only whole frames are decoded.
	available := min(h.dataSize, uint64(size-h.dataOffset))
	d.readable = int64(available) - int64(available)%d.blockAlign
	frameSize := uint64(l.blockAlign)
	switch {
	case available < h.dataSize:
		missing := float64((h.dataSize-uint64(d.readable))/frameSize) / float64(l.sampleRate)
		d.damage = &decode.IntegrityError{Format: h.container, Offset: size, Problem: fmt.Sprintf(
			"data chunk declares %d bytes but file ends after %d: audio truncated by %.3f s", h.dataSize, available, missing)}
	case h.dataSize%frameSize != 0:
		d.damage = &decode.IntegrityError{Format: h.container, Offset: h.dataOffset + d.readable, Problem: fmt.Sprintf(
			"data chunk size %d is not a whole number of %d-byte frames: the last %d bytes are a partial frame",
			h.dataSize, frameSize, h.dataSize%frameSize)}
	}
	d.raw = make([]byte, max(rawBufferSize/l.blockAlign, 1)*l.blockAlign)
	return d, nil
}

// Info returns the stream description read from the header.
func (d *decoder) Info() decode.Info { return d.info }

// Notes returns remarks about the file that are not errors: ignored
// duplicate chunks, stray trailing bytes, an unset data size.
func (d *decoder) Notes() []string { return d.notes }

// ReadFrames decodes up to len(dst)/channels frames into dst, interleaved.
// It returns 0, io.EOF at the end of the audio. When the data chunk is cut
// short it returns the last whole frames together with a
// *decode.IntegrityError, and io.EOF after that.
func (d *decoder) ReadFrames(dst []float64) (int, error) {
	if len(dst)%d.channels != 0 {
		return 0, fmt.Errorf("wav: ReadFrames buffer of %d samples is not a multiple of %d channels", len(dst), d.channels)
	}
	if d.err != nil {
		return 0, d.err
	}
	frames := 0
	want := int64(len(dst) / d.channels)
	for int64(frames) < want && d.pos < d.readable {
		n := min(want-int64(frames), int64(len(d.raw))/d.blockAlign, (d.readable-d.pos)/d.blockAlign)
		raw := d.raw[:n*d.blockAlign]
		got, err := d.src.ReadAt(raw, d.dataOffset+d.pos)
		whole := int64(got) / d.blockAlign
		out := dst[frames*d.channels : (frames+int(whole))*d.channels]
		d.convert(out, raw[:whole*d.blockAlign])
		frames += int(whole)
		d.pos += whole * d.blockAlign
		if whole < n {
			// The file is shorter than it was when the header was read,
			// or the read failed.
			d.readable = d.pos
			if err == nil || err == io.EOF {
				d.damage = &decode.IntegrityError{Format: d.info.Container, Offset: d.dataOffset + d.pos,
					Problem: "file ended while reading audio (did it shrink while being read?)"}
			} else {
				d.err = fmt.Errorf("wav: reading audio at byte %d: %w", d.dataOffset+d.pos, err)
				return frames, d.err
			}
		}
	}
	if d.pos >= d.readable {
		d.err = io.EOF
		if d.damage != nil {
			return frames, d.damage
		}
		if frames == 0 {
			return 0, io.EOF
		}
	}
	return frames, nil
}
