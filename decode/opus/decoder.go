package opus

import (
	"errors"
	"fmt"
	"io"
	"math"

	"github.com/thesyncim/gopus"

	"github.com/kweigh/kweigh/decode"
)

// Rate is the sample rate every Opus stream decodes at.
const Rate = 48000

// maxPacketSamples is the longest Opus packet: 120 ms at 48 kHz (RFC 6716
// section 3.2.5).
const maxPacketSamples = 5760

// Decoder decodes one Ogg Opus file.
type Decoder struct {
	src  io.ReaderAt
	size int64
	info decode.Info
	head *Head

	serial  uint32
	seq     uint32
	codec   *gopus.MultistreamDecoder
	gain    float32
	next    *page // the page after the current one, nil at the end
	nextErr error
	partial []byte
	links   int
	eos     bool // the current link has ended

	skip      int   // samples still to drop from the start of the link
	decoded   int64 // samples decoded in this link (granule units)
	firstPage bool  // the next audio page is the link's first

	pcm    []float32
	out    []float32 // decoded, trimmed samples waiting for ReadFrames
	ended  bool
	damage error
	notes  []string
	others map[uint32]bool // serials of skipped logical streams
}

// Match reports whether r starts with an Ogg page whose first packet is an
// Opus identification header.
func Match(r io.ReaderAt, size int64) bool {
	var b [64]byte
	n, _ := r.ReadAt(b[:], 0)
	if n < 28 || string(b[:4]) != "OggS" || b[4] != 0 {
		return false
	}
	start := 27 + int(b[26])
	return start+8 <= n && string(b[start:start+8]) == "OpusHead"
}

// New reads the headers of the Ogg Opus file in src (size bytes).
func New(src io.ReaderAt, size int64) (*Decoder, error) {
	d := &Decoder{src: src, size: size, others: map[uint32]bool{}}
	p, err := readPage(src, 0, size)
	if err != nil {
		return nil, formatErr(0, "reading the first page", err)
	}
	if p.flags&flagBOS == 0 {
		return nil, formatErr(0, "the first page does not begin a stream", nil)
	}
	if err := d.startLink(p); err != nil {
		return nil, err
	}
	d.info = decode.Info{
		Container:    "ogg",
		Codec:        "opus",
		SampleRate:   Rate,
		Channels:     d.head.Channels,
		Layout:       d.head.Layout(),
		SampleFormat: decode.Float,
		Frames:       -1,
	}
	if last := lastGranule(src, size, d.serial); last >= 0 && d.head.PreSkip <= int(last) {
		d.info.Frames = last - int64(d.head.PreSkip)
	}
	if br := d.bitRate(); br > 0 {
		d.info.BitRate = br
	}
	if d.head.InputRate > 0 && d.head.InputRate != Rate {
		d.notes = append(d.notes, fmt.Sprintf("the encoder's input was %d Hz (OpusHead); Opus decodes at 48000 Hz", d.head.InputRate))
	}
	if d.head.OutputGainQ8 != 0 {
		d.notes = append(d.notes, fmt.Sprintf("the header's output gain of %+.2f dB was applied", float64(d.head.OutputGainQ8)/256))
	}
	return d, nil
}

func formatErr(off int64, what string, err error) error {
	if errors.Is(err, io.EOF) {
		err = io.ErrUnexpectedEOF
	}
	return &decode.FormatError{Format: "opus", Offset: off, Problem: what, Err: err}
}

// startLink reads the headers of the logical stream that begins with the
// BOS page p, and the header pages of any stream multiplexed with it.
func (d *Decoder) startLink(p *page) error {
	pk, tail := p.packets(nil)
	if len(pk) != 1 || len(tail) != 0 {
		return formatErr(p.offset, "the OpusHead header must be alone on its page", nil)
	}
	h, err := ParseHead(pk[0])
	if err != nil {
		var u *decode.UnsupportedError
		if errors.As(err, &u) {
			return err
		}
		return formatErr(p.offset, err.Error(), nil)
	}
	if d.head != nil && (h.Channels != d.head.Channels || h.MappingFamily != d.head.MappingFamily) {
		return &decode.UnsupportedError{Format: "opus", What: fmt.Sprintf(
			"chained stream at byte %d has %d channels (family %d) after %d (family %d): the links cannot be one measurement",
			p.offset, h.Channels, h.MappingFamily, d.head.Channels, d.head.MappingFamily)}
	}
	codec, err := gopus.NewMultistreamDecoder(Rate, h.Channels, h.Streams, h.CoupledStreams, h.Mapping)
	if err != nil {
		return formatErr(p.offset, "the decoder refuses the header's channel mapping", err)
	}
	d.head, d.codec, d.serial, d.seq = h, codec, p.serial, p.seq
	d.gain = float32(math.Pow(10, float64(h.OutputGainQ8)/(256*20)))
	d.skip, d.decoded, d.firstPage, d.partial = h.PreSkip, 0, true, nil
	d.links++
	if d.pcm == nil {
		d.pcm = make([]float32, maxPacketSamples*h.Channels)
	}
	// The BOS pages of every multiplexed stream come first, then the
	// OpusTags packet of ours.
	off := p.offset + p.size()
	var tags []byte
	for tags == nil {
		q, err := readPage(d.src, off, d.size)
		if err != nil {
			return formatErr(off, "reading the header pages", err)
		}
		off += q.size()
		if q.serial != d.serial {
			if q.flags&flagBOS != 0 {
				if qp, _ := q.packets(nil); len(qp) > 0 && len(qp[0]) >= 8 && string(qp[0][:8]) == "OpusHead" {
					return &decode.UnsupportedError{Format: "opus", What: fmt.Sprintf(
						"a second Opus stream (serial %08x) is multiplexed with the first: kweigh measures one", q.serial)}
				}
				if !d.others[q.serial] {
					d.others[q.serial] = true
					d.notes = append(d.notes, fmt.Sprintf("a non-Opus logical stream (serial %08x) was skipped", q.serial))
				}
			}
			continue
		}
		d.seq = q.seq
		done, tail := q.packets(d.partial)
		d.partial = tail
		if len(done) > 0 {
			tags = done[0]
			if len(done) > 1 {
				return formatErr(q.offset, "audio data on the OpusTags page", nil)
			}
		}
	}
	if _, err := checkTags(tags); err != nil {
		return formatErr(off, err.Error(), nil)
	}
	d.partial = nil
	d.next, d.nextErr = readPage(d.src, off, d.size)
	return nil
}

// lastGranule returns the granule position of the file's last page when
// it belongs to serial (a chained or multiplexed file's length is left to
// the decoding), or -1.
func lastGranule(r io.ReaderAt, size int64, serial uint32) int64 {
	start := max(0, size-65536)
	buf := make([]byte, size-start)
	n, _ := r.ReadAt(buf, start)
	buf = buf[:n]
	for i := len(buf) - 27; i >= 0; i-- {
		if string(buf[i:i+4]) != "OggS" {
			continue
		}
		p, err := readPage(r, start+int64(i), size)
		if err == nil {
			if p.serial == serial && p.granule >= 0 {
				return p.granule
			}
			return -1
		}
	}
	return -1
}

// bitRate estimates the average bit rate from the file size and length.
func (d *Decoder) bitRate() int {
	if d.info.Frames <= 0 {
		return 0
	}
	return int(float64(d.size*8) / (float64(d.info.Frames) / Rate))
}

// Info returns the stream description.
func (d *Decoder) Info() decode.Info { return d.info }

// Notes returns what the decoder found worth telling.
func (d *Decoder) Notes() []string {
	if d.links > 1 {
		return append(d.notes, fmt.Sprintf("chained file: %d Opus streams decoded one after another", d.links))
	}
	return d.notes
}

// ReadFrames delivers decoded frames.
func (d *Decoder) ReadFrames(dst []float64) (int, error) {
	ch := d.head.Channels
	for len(d.out) == 0 {
		if d.ended {
			if d.damage != nil {
				err := d.damage
				d.damage = nil
				return 0, err
			}
			return 0, io.EOF
		}
		if err := d.decodePage(); err != nil {
			var integ *decode.IntegrityError
			if errors.As(err, &integ) {
				d.ended, d.damage = true, err
				continue
			}
			return 0, err
		}
	}
	n := min(len(dst)/ch, len(d.out)/ch)
	for i, v := range d.out[:n*ch] {
		dst[i] = float64(v)
	}
	d.out = d.out[n*ch:]
	return n, nil
}

func damaged(off int64, problem string) error {
	return &decode.IntegrityError{Format: "opus", Offset: off, Problem: problem}
}

// decodePage decodes the packets that end on the next page of the stream,
// trimming the start (pre-skip, or a granule position that says the
// stream begins later) and the end (the last page's granule position).
func (d *Decoder) decodePage() error {
	for {
		p, err := d.next, d.nextErr
		if p == nil && err == io.EOF {
			d.ended = true
			return nil
		}
		if err != nil {
			at := int64(-1)
			if p != nil {
				at = p.offset
			}
			if errors.Is(err, io.ErrUnexpectedEOF) {
				return damaged(at, "the file ends inside an Ogg page (truncated)")
			}
			if errors.Is(err, errBadCRC) {
				return damaged(at, "Ogg page checksum mismatch")
			}
			return damaged(at, err.Error())
		}
		off := p.offset + p.size()
		d.next, d.nextErr = readPage(d.src, off, d.size)
		if d.nextErr != nil && d.nextErr != io.EOF && d.next == nil {
			d.next = &page{offset: off} // where the damage is
		}
		if p.serial != d.serial || d.eos {
			if p.flags&flagBOS == 0 || p.serial == d.serial || d.others[p.serial] {
				continue // another stream's page, or a stray after our end
			}
			if d.eos {
				d.eos = false
				return d.startLink(p) // a chained link
			}
			if pk, _ := p.packets(nil); len(pk) > 0 && len(pk[0]) >= 8 && string(pk[0][:8]) == "OpusHead" {
				return &decode.UnsupportedError{Format: "opus", What: fmt.Sprintf(
					"a second Opus stream (serial %08x) begins at byte %d before the first ended: kweigh measures one", p.serial, p.offset)}
			}
			d.others[p.serial] = true
			d.notes = append(d.notes, fmt.Sprintf("a non-Opus logical stream (serial %08x) was skipped", p.serial))
			continue
		}
		if p.seq != d.seq+1 {
			return damaged(p.offset, fmt.Sprintf("Ogg page %d follows page %d: pages are missing", p.seq, d.seq))
		}
		d.seq = p.seq
		last := p.flags&flagEOS != 0 || d.next == nil || d.nextErr != nil
		done, tail := p.packets(d.partial)
		d.partial = tail
		start := len(d.out)
		var got int64
		for _, pk := range done {
			if len(pk) == 0 {
				continue
			}
			n, err := d.codec.Decode(pk, d.pcm)
			if err != nil {
				return damaged(p.offset, fmt.Sprintf("the Opus decoder rejects a packet: %v", err))
			}
			d.out = append(d.out, d.pcm[:n*d.head.Channels]...)
			got += int64(n)
		}
		d.decoded += got
		ch := d.head.Channels
		page := d.out[start:]
		if p.granule >= 0 && got > 0 {
			if last && d.decoded > p.granule {
				cut := min(int64(len(page)/ch), d.decoded-p.granule)
				page = page[:len(page)-int(cut)*ch]
			} else if d.firstPage && !last && d.decoded > p.granule {
				// RFC 7845 section 4.5: the stream starts later than
				// its first sample; the difference is dropped.
				d.skip += int(d.decoded - p.granule)
			}
		}
		if got > 0 {
			d.firstPage = false
		}
		if d.skip > 0 {
			s := min(d.skip, len(page)/ch)
			page = page[s*ch:]
			d.skip -= s
		}
		if d.gain != 1 {
			for i := range page {
				page[i] *= d.gain
			}
		}
		d.out = append(d.out[:start], page...)
		d.eos = p.flags&flagEOS != 0
		if len(d.out) > 0 || last {
			if last && d.next == nil {
				d.ended = true
			}
			return nil
		}
	}
}
