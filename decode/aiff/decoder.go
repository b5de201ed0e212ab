package aiff

import (
	"fmt"
	"io"
	"math"

	"github.com/kweigh/kweigh/decode"
	"github.com/kweigh/kweigh/internal/filemap"
)

// readBufferSize bounds the bytes read from the file per conversion step,
// whatever the size of the caller's buffer.
const readBufferSize = 64 << 10

// Decoder streams the sample frames of one AIFF or AIFF-C file. It
// implements decode.Decoder and decode.Noter.
type Decoder struct {
	src        io.ReaderAt
	h          *header
	info       decode.Info
	convert    converter
	frameBytes int64
	present    int64 // whole frames the file holds (≤ declared unless declared is 0)
	pos        int64 // frames delivered
	buf        []byte
	errSent    bool
	readErr    error // a failed read of sample data, nil if none
	notes      []string
	// view maps the sound data of a regular file (nil: read calls); see
	// readMapped.
	view *filemap.View
}

// NewDecoder reads the header of the AIFF or AIFF-C file in src (size bytes
// long) and returns a decoder ready for ReadFrames. It returns a
// *decode.FormatError for a header it cannot read and a
// *decode.UnsupportedError for a compression type it does not decode.
func NewDecoder(src io.ReaderAt, size int64) (*Decoder, error) {
	h, err := readHeader(src, size)
	if err != nil {
		return nil, err
	}
	d := &Decoder{
		src:        src,
		h:          h,
		convert:    converterFor(h.coding, h.width),
		frameBytes: int64(h.channels * h.width),
	}
	d.present = h.dataLen / d.frameBytes
	rate := math.Round(h.rate)
	if rate != h.rate {
		d.notes = append(d.notes, fmt.Sprintf("COMM sample rate %v Hz rounded to %v Hz", h.rate, rate))
	}
	d.info = decode.Info{
		Container:     h.container,
		Codec:         "pcm",
		SampleRate:    int(rate),
		Channels:      h.channels,
		BitsPerSample: h.sampleSize,
		SampleFormat:  decode.Int,
		Frames:        h.frames,
	}
	if h.coding == bigEndianFloat {
		d.info.Codec, d.info.SampleFormat = "ieee-float", decode.Float
	}
	switch {
	case h.frames == 0 && d.present > 0:
		d.info.Frames = -1
		d.notes = append(d.notes, fmt.Sprintf("COMM declares 0 sample frames; measuring the %d frames the SSND chunk holds", d.present))
	case d.present > h.frames:
		d.present = h.frames // COMM's count decides what is played
	}
	d.info.Undeclared = d.undeclared(size)
	d.mapSound(filemap.Open(src, h.dataOff, h.dataOff+d.present*d.frameBytes))
	return d, nil
}

// undeclared reports the data the header does not declare: whole frames in
// SSND beyond COMM's count, and bytes after the chunks and tags that are
// neither; at least one frame (and 8 bytes) of it, else nil.
func (d *Decoder) undeclared(size int64) *decode.Undeclared {
	h := d.h
	var u decode.Undeclared
	if extra := h.dataLen/d.frameBytes - d.present; h.frames > 0 && extra > 0 {
		u.Offset = h.dataOff + d.present*d.frameBytes
		u.Bytes = extra * d.frameBytes
	}
	if tail := size - h.foreign; tail > 0 {
		if u.Bytes == 0 {
			u.Offset = h.foreign
		}
		u.Bytes += tail
	}
	if u.Bytes < max(8, d.frameBytes) {
		if u.Bytes > 0 {
			d.notes = append(d.notes, fmt.Sprintf("%d stray bytes after the audio (byte %d) ignored", u.Bytes, u.Offset))
		}
		return nil
	}
	u.Seconds = float64(u.Bytes/d.frameBytes) / math.Round(h.rate)
	return &u
}

// Info returns the stream description read from COMM.
func (d *Decoder) Info() decode.Info { return d.info }

// Notes returns remarks about the header (a rounded sample rate, a frame
// count taken from SSND).
func (d *Decoder) Notes() []string { return append([]string(nil), d.notes...) }

// ReadFrames converts up to len(dst)/channels frames into dst. See
// decode.Decoder.
func (d *Decoder) ReadFrames(dst []float64) (int, error) {
	ch := d.h.channels
	want := min(int64(len(dst)/ch), d.present-d.pos)
	var n int64
	if d.view != nil {
		n = d.readMapped(dst, want)
	} else {
		n = d.readCalls(dst, want)
	}
	if d.pos < d.present {
		return int(n), nil
	}
	if !d.errSent && (d.readErr != nil || d.h.frames > 0 && d.pos < d.h.frames) {
		d.errSent = true
		return int(n), &decode.IntegrityError{
			Format: d.h.container,
			Offset: d.h.dataOff + d.pos*d.frameBytes,
			Problem: fmt.Sprintf("the sound data ends after %d of the %d sample frames COMM declares (SSND chunk %s)",
				d.pos, d.h.frames, d.shortfall()),
		}
	}
	if n > 0 {
		return int(n), nil
	}
	return 0, io.EOF
}

// readCalls converts up to want frames into dst through read calls of at
// most readBufferSize bytes and returns the frames it converted.
func (d *Decoder) readCalls(dst []float64, want int64) int64 {
	ch := d.h.channels
	if d.buf == nil && want > 0 {
		d.buf = make([]byte, max(readBufferSize/d.frameBytes, 1)*d.frameBytes)
	}
	bufFrames := int64(len(d.buf)) / d.frameBytes
	n := int64(0)
	for n < want {
		k := min(want-n, bufFrames)
		raw := d.buf[:k*d.frameBytes]
		got, err := d.src.ReadAt(raw, d.h.dataOff+d.pos*d.frameBytes)
		short := int64(got) < int64(len(raw))
		if short {
			// The file shrank under us or the reader failed: keep the
			// whole frames we have and report the rest as missing.
			k = int64(got) / d.frameBytes
			if err == nil || err == io.EOF {
				err = io.ErrUnexpectedEOF
			}
			d.readErr = err
		}
		d.convert(dst[n*int64(ch):(n+k)*int64(ch)], raw[:k*d.frameBytes])
		d.pos += k
		n += k
		if short {
			d.present = d.pos
			break
		}
	}
	return n
}

// shortfall says why the sound data is short.
func (d *Decoder) shortfall() string {
	if d.readErr != nil {
		return fmt.Sprintf("could not be read: %v", d.readErr)
	}
	if d.h.ssndEnd > d.h.dataOff+d.h.dataLen {
		return fmt.Sprintf("runs past the end of the file at byte %d", d.h.dataOff+d.h.dataLen)
	}
	return "is shorter than COMM declares"
}
