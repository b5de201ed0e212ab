package flac

import (
	"bytes"
	"crypto/md5"
	"errors"
	"fmt"
	"io"
	"strings"

	"github.com/kweigh/kweigh/decode"
	mewflac "github.com/mewkiz/flac"
	"github.com/mewkiz/flac/frame"
)

// maxBitsPerSample is the widest sample this package decodes. FLAC 1.4
// allows up to 32 bits; mewkiz/flac v1.0.14 does not decode them reliably
// (a 32-bit side channel needs 33 bits), so they are refused.
const maxBitsPerSample = 24

// Decoder streams the samples of one FLAC stream. It implements
// decode.Decoder and decode.Noter.
type Decoder struct {
	in     *countedReader
	stream *mewflac.Stream
	info   decode.Info
	opts   Options
	scale  float64 // 1 / 2^(bits-1)

	cur    *frame.Frame // frame being delivered; nil before the first
	curPos int          // frames of cur already delivered

	hash      *sampleHash // nil when MD5 is not checked
	wantMD5   [md5.Size]byte
	verified  bool
	declared  uint64 // samples per channel STREAMINFO declares, 0 = unknown
	decoded   uint64 // samples per channel decoded so far
	frameNum  int    // frames decoded so far
	finished  bool   // no more frames will be read
	finishErr error  // error to return once the delivered frames run out
	notes     []string
}

// NewDecoder reads the STREAMINFO of the FLAC stream in src (size bytes
// long, possibly behind an ID3v2 tag) and returns a decoder ready for
// ReadFrames. It returns a *decode.FormatError when src is not a readable
// FLAC stream and a *decode.UnsupportedError for samples wider than 24 bits.
func NewDecoder(src decode.Source, size int64, opts Options) (*Decoder, error) {
	start, ok := streamStart(src, size)
	if !ok {
		return nil, formatError(0, `no "fLaC" signature at the start of the file (nor after an ID3v2 tag)`)
	}
	if _, err := src.Seek(start, io.SeekStart); err != nil {
		return nil, err
	}
	silenceLibraryLog()
	in := newCountedReader(src, start)
	stream, err := mewflac.New(in.Reader)
	if err != nil {
		if errors.Is(err, io.EOF) || errors.Is(err, io.ErrUnexpectedEOF) {
			return nil, formatError(in.offset(), "the file ends inside the metadata blocks")
		}
		return nil, formatError(in.offset(), "reading the metadata blocks: "+libraryMessage(err))
	}
	si := stream.Info
	bits := int(si.BitsPerSample)
	switch {
	case bits > maxBitsPerSample:
		return nil, &decode.UnsupportedError{Format: "flac", What: fmt.Sprintf("%d-bit samples (kweigh decodes FLAC up to %d bits)", bits, maxBitsPerSample)}
	case bits < 4:
		return nil, formatError(start+8, fmt.Sprintf("STREAMINFO declares %d bits per sample; FLAC allows 4 to 32", bits))
	}
	channels := int(si.NChannels)
	layout, mask, note := channelLayout(src, start, size, channels)
	d := &Decoder{
		in:       in,
		stream:   stream,
		opts:     opts,
		scale:    1 / float64(int64(1)<<(bits-1)),
		wantMD5:  si.MD5sum,
		declared: si.NSamples,
		info: decode.Info{
			Container:     "flac",
			Codec:         "flac",
			SampleRate:    int(si.SampleRate),
			Channels:      channels,
			Layout:        layout,
			ChannelMask:   mask,
			BitsPerSample: bits,
			SampleFormat:  decode.Int,
			Frames:        -1,
		},
	}
	if note != "" {
		d.notes = append(d.notes, note)
	}
	if si.NSamples > 0 {
		d.info.Frames = int64(si.NSamples)
		seconds := float64(si.NSamples) / float64(si.SampleRate)
		d.info.BitRate = int(float64(size*8)/seconds + 0.5)
	}
	switch {
	case !opts.VerifyMD5:
		d.notes = append(d.notes, "FLAC MD5 verification turned off: only the frame checksums were checked")
	case d.wantMD5 == [md5.Size]byte{}:
		d.notes = append(d.notes, "the FLAC file carries no MD5 signature (all zero): the decoded audio could only be checked against the frame checksums")
	default:
		d.hash = newSampleHash(bits)
	}
	return d, nil
}

// Info returns the stream description read from STREAMINFO.
func (d *Decoder) Info() decode.Info { return d.info }

// Notes returns remarks about the stream: MD5 verification skipped, a
// channel-mask tag that could not be used, bytes ignored after the last
// frame.
func (d *Decoder) Notes() []string { return append([]string(nil), d.notes...) }

// MD5Verified reports whether the stream was decoded to its end and the MD5
// of the decoded samples matched the STREAMINFO signature.
func (d *Decoder) MD5Verified() bool { return d.verified }

// ReadFrames decodes up to len(dst)/channels frames into dst, interleaved
// and scaled so that integer full scale is ±1. See decode.Decoder.
func (d *Decoder) ReadFrames(dst []float64) (int, error) {
	ch := d.info.Channels
	want := len(dst) / ch
	n := 0
	for n < want {
		if d.cur == nil || d.curPos == int(d.cur.BlockSize) {
			if d.finished {
				break
			}
			if err := d.nextFrame(); err != nil {
				d.finished = true
				d.finishErr = err
				d.cur = nil
			}
			continue
		}
		k := min(want-n, int(d.cur.BlockSize)-d.curPos)
		for c, sub := range d.cur.Subframes {
			j := n*ch + c
			for _, v := range sub.Samples[d.curPos : d.curPos+k] {
				dst[j] = float64(v) * d.scale
				j += ch
			}
		}
		d.curPos += k
		n += k
	}
	if d.finished && (d.cur == nil || d.curPos == int(d.cur.BlockSize)) {
		err := d.finishErr
		d.finishErr = io.EOF
		if n > 0 && err == io.EOF {
			return n, nil
		}
		return n, err
	}
	return n, nil
}

// nextFrame decodes the next frame into d.cur. At the end of the stream it
// returns io.EOF, or an *decode.IntegrityError when the stream is short or
// its MD5 does not match.
func (d *Decoder) nextFrame() error {
	off := d.in.offset()
	f, err := d.stream.Next()
	if err == io.EOF {
		return d.endOfStream(off)
	}
	if err != nil {
		if d.declared > 0 && d.decoded == d.declared && errors.Is(err, frame.ErrInvalidSync) {
			// Trailing bytes after a complete stream (an ID3v1 tag, say).
			d.notes = append(d.notes, fmt.Sprintf("ignored the bytes after the last FLAC frame (from byte %d)", off))
			return d.endOfStream(off)
		}
		return d.damaged(off, fmt.Sprintf("frame %d header: %v", d.frameNum, libraryMessage(err)))
	}
	if problem := d.checkHeader(f); problem != "" {
		return d.damaged(off, fmt.Sprintf("frame %d header: %s", d.frameNum, problem))
	}
	if f.BitsPerSample == 0 {
		f.BitsPerSample = uint8(d.info.BitsPerSample)
	}
	if err := f.Parse(); err != nil {
		return d.damaged(off, fmt.Sprintf("frame %d: %v", d.frameNum, libraryMessage(err)))
	}
	if problem := d.checkSamples(f); problem != "" {
		return d.damaged(off, fmt.Sprintf("frame %d %s", d.frameNum, problem))
	}
	if d.hash != nil {
		d.hash.addFrame(f)
	}
	d.decoded += uint64(f.BlockSize)
	d.frameNum++
	d.cur, d.curPos = f, 0
	return nil
}

// checkHeader returns what is wrong with a frame header that contradicts
// STREAMINFO, or "".
func (d *Decoder) checkHeader(f *frame.Frame) string {
	switch {
	case f.Channels.Count() != d.info.Channels:
		return fmt.Sprintf("%d channels, STREAMINFO declares %d", f.Channels.Count(), d.info.Channels)
	case f.BitsPerSample != 0 && int(f.BitsPerSample) != d.info.BitsPerSample:
		return fmt.Sprintf("%d bits per sample, STREAMINFO declares %d", f.BitsPerSample, d.info.BitsPerSample)
	case f.SampleRate != 0 && int(f.SampleRate) != d.info.SampleRate:
		return fmt.Sprintf("sample rate %d Hz, STREAMINFO declares %d Hz", f.SampleRate, d.info.SampleRate)
	}
	return ""
}

// checkSamples returns what is wrong with the decoded samples of f, or "":
// every channel must hold BlockSize samples, each within the stream's bit
// depth. A damaged frame whose CRC happens to pass can decode to values no
// encoder could have written (the predictor overflows); they are refused
// here rather than delivered as audio beyond full scale.
func (d *Decoder) checkSamples(f *frame.Frame) string {
	hi := int32(1)<<(d.info.BitsPerSample-1) - 1
	lo := -hi - 1
	for c, sub := range f.Subframes {
		if len(sub.Samples) != int(f.BlockSize) {
			return fmt.Sprintf("channel %d decoded %d samples, the header declares %d", c, len(sub.Samples), f.BlockSize)
		}
		for i, v := range sub.Samples {
			if v < lo || v > hi {
				return fmt.Sprintf("channel %d sample %d decodes to %d, outside the %d-bit range", c, i, v, d.info.BitsPerSample)
			}
		}
	}
	return ""
}

// endOfStream checks the complete stream against STREAMINFO.
func (d *Decoder) endOfStream(off int64) error {
	if d.declared > 0 && d.decoded != d.declared {
		return d.damaged(off, fmt.Sprintf("the stream holds %d samples per channel, STREAMINFO declares %d", d.decoded, d.declared))
	}
	if d.hash != nil {
		got := d.hash.sum()
		if !bytes.Equal(got[:], d.wantMD5[:]) {
			return &decode.IntegrityError{Format: "flac", Offset: -1,
				Problem: fmt.Sprintf("MD5 of the decoded audio is %x, STREAMINFO says %x: the audio is not what was encoded", got, d.wantMD5)}
		}
		d.verified = true
	}
	return io.EOF
}

func (d *Decoder) damaged(off int64, problem string) error {
	return &decode.IntegrityError{Format: "flac", Offset: off, Problem: problem}
}

func formatError(off int64, problem string) error {
	return &decode.FormatError{Format: "flac", Offset: off, Problem: problem}
}

// libraryMessage returns the text of an error from mewkiz/flac without the
// Go function name it starts with ("frame.Frame.Parse: CRC-16 checksum
// mismatch; …" becomes "CRC-16 checksum mismatch; …"); a mid-frame io.EOF
// reads as io.ErrUnexpectedEOF.
func libraryMessage(err error) string {
	if err == io.EOF {
		err = io.ErrUnexpectedEOF
	}
	msg := err.Error()
	if name, rest, ok := strings.Cut(msg, ": "); ok && !strings.Contains(name, " ") && strings.Count(name, ".") >= 2 {
		return rest
	}
	return msg
}
