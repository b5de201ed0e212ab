package wav

import (
	"fmt"
	"io"
	"unsafe"

	"github.com/kweigh/kweigh/decode"
	"github.com/kweigh/kweigh/internal/filemap"
)

// readBlock is how many bytes the decoder asks the file for at once: a
// quarter of a megabyte, so that a long file takes few read calls (one per
// 1.4 s of 48 kHz stereo 24-bit audio) while the bytes just read still sit
// in the core's cache when they are converted. It is fixed whatever the
// file declares, so memory does not grow with the length of the file.
const readBlock = 256 << 10

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
	// failed is a read error met by a read that still brought whole
	// frames: returned, as err, once those frames are delivered.
	failed error
	raw    []byte // reused for every read: whole frames, made by fill
	next   int    // raw[next:have] are read but not yet converted
	have   int
	notes  []string
	// view maps the audio of a regular file (nil: read calls); see
	// readMapped.
	view *filemap.View
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
	d.mapAudio(filemap.Open(src, h.dataOffset, h.dataOffset+d.readable))
	return d, nil
}

// mapAudio makes d convert from view when there is one (nil: read calls).
func (d *decoder) mapAudio(view *filemap.View) {
	d.view = view
	filemap.UnmapWhenCollected(d, view)
}

// Info returns the stream description read from the header.
func (d *decoder) Info() decode.Info { return d.info }

// Notes returns remarks about the file that are not errors: ignored
// duplicate chunks, stray trailing bytes, an unset data size.
func (d *decoder) Notes() []string { return d.notes }

// rawSize is the size of the read buffer for frames of blockAlign bytes:
// readBlock in whole frames, at least one.
func rawSize(blockAlign int) int { return max(readBlock/blockAlign, 1) * blockAlign }

// ReadFrames decodes up to len(dst)/channels frames into dst, interleaved.
// It returns 0, io.EOF at the end of the audio. When the data chunk is cut
// short it returns the last whole frames together with a
// *decode.IntegrityError, and io.EOF after that.
//
// A regular file's audio is converted straight from a mapping of the file
// (readMapped). Other sources are read readBlock bytes at a time and
// converted from there, a call's worth at a time; a call that asks for
// more than readBlock of audio at once has it read straight into dst and
// converted in place (see convertInPlace), without the buffer.
func (d *decoder) ReadFrames(dst []float64) (int, error) {
	if len(dst)%d.channels != 0 {
		return 0, fmt.Errorf("wav: ReadFrames buffer of %d samples is not a multiple of %d channels", len(dst), d.channels)
	}
	if d.err != nil {
		return 0, d.err
	}
	if d.view != nil {
		return d.readMapped(dst)
	}
	frames := 0
	want := len(dst) / d.channels
	for frames < want {
		if d.next == d.have {
			if d.failed != nil || d.pos >= d.readable {
				break
			}
			if rest := int64(want-frames) * d.blockAlign; rest >= readBlock {
				// A large request: straight into dst.
				frames += d.readInPlace(dst[frames*d.channels:])
				continue
			}
			d.fill()
			continue
		}
		n := min(want-frames, (d.have-d.next)/int(d.blockAlign))
		raw := d.raw[d.next : d.next+n*int(d.blockAlign)]
		d.convert(dst[frames*d.channels:(frames+n)*d.channels], raw)
		d.next += len(raw)
		frames += n
	}
	if d.next == d.have {
		if d.failed != nil {
			d.err = d.failed
			return frames, d.err
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
	}
	return frames, nil
}

// fill reads the next readBlock (or what is left of the audio) into raw,
// which is made on first use (no larger than the audio).
func (d *decoder) fill() {
	if d.raw == nil {
		d.raw = make([]byte, min(int64(rawSize(int(d.blockAlign))), d.readable-d.pos))
	}
	n := min(int64(len(d.raw)), d.readable-d.pos)
	got := d.readAt(d.raw[:n])
	d.next, d.have = 0, got
}

// readInPlace reads whole frames, as many as dst holds and the audio has,
// into dst itself and converts them there; it returns the frames.
func (d *decoder) readInPlace(dst []float64) int {
	frames := min(int64(len(dst)/d.channels), (d.readable-d.pos)/d.blockAlign)
	dst = dst[:frames*int64(d.channels)]
	bytes := unsafe.Slice((*byte)(unsafe.Pointer(unsafe.SliceData(dst))), 8*len(dst))
	// The raw samples go to the end of dst's bytes, so converting from the
	// front never overwrites a sample not yet read (convertInPlace).
	size := frames * d.blockAlign
	tail := bytes[int64(len(bytes))-size:]
	got := d.readAt(tail)
	done := got / int(d.blockAlign) * d.channels
	convertInPlace(d.convert, dst[:done], tail[:got])
	return got / int(d.blockAlign)
}

// readAt reads len(raw) bytes (whole frames) of audio at the current
// position and returns how many bytes of whole frames it got, advancing the
// position by them. A short read ends the readable audio there: damage
// when the file ended (it shrank since the header was read), else the read
// error, kept in failed.
func (d *decoder) readAt(raw []byte) int {
	got, err := d.src.ReadAt(raw, d.dataOffset+d.pos)
	whole := got - got%int(d.blockAlign)
	d.pos += int64(whole)
	if whole < len(raw) {
		d.readable = d.pos
		if err == nil || err == io.EOF {
			d.damage = &decode.IntegrityError{Format: d.info.Container, Offset: d.dataOffset + d.pos,
				Problem: "file ended while reading audio (did it shrink while being read?)"}
		} else {
			d.failed = fmt.Errorf("wav: reading audio at byte %d: %w", d.dataOffset+d.pos, err)
		}
	}
	return whole
}
