package flac

import (
	"bytes"
	"crypto/md5"
	"errors"
	"fmt"
	"io"
	"sync"

	"github.com/kweigh/kweigh/decode"
)

// Decoder streams the samples of one FLAC stream. It implements
// decode.Decoder and decode.Noter.
type Decoder struct {
	in    *input
	si    streamInfo
	info  decode.Info
	opts  Options
	scale float64 // 1 / 2^(bits-1)
	fd    frameDecoder

	curLen, curPos int // samples per channel of the frame being delivered, and delivered

	lowWater   int  // bytes buffered before each frame is decoded
	fixedBlock int  // block size of a fixed-block-size stream, 0 until known
	variable   bool // the stream numbers its frames by sample
	strategy   bool // variable is known (a frame has been decoded)
	frameIndex int  // frames looked at so far, good or bad, for messages
	nextFrame  uint64
	nextSample uint64 // stream position of the next frame: decoded + lost
	decoded    uint64 // samples per channel delivered from good frames

	searching   bool           // looking for the next valid frame after damage
	lostAt      int64          // where the damage being skipped starts
	lostFrame   int            // its frame index
	lostWhy     string         // what was wrong there
	lostHdr     bool           // a frame sync code was there
	damage      []damageRecord // the first maxDamageRecords stretches
	damageCount int
	lostTotal   uint64
	lostUnknown bool // the stream ends in damage and gives no length

	hash     *sampleHash // nil when MD5 is not checked
	verified bool

	src        decode.Source // for Section, read with ReadAt only
	size       int64
	audioStart int64
	seekAt     int64 // SEEKTABLE body and points (see locate)
	seekPoints int64
	splitOnce  sync.Once
	splitTotal int64  // SplitFrames
	probeBuf   []byte // scratch of probe
	chainOnce  sync.Once
	chain      *md5Chain    // the MD5 of sections (see section.go)
	sec        *sectionSpan // set for a decoder made by Section
	finished   bool         // no more frames will be read
	finishErr  error        // returned once the delivered frames run out
	notes      []string
}

// damageRecord is one damaged stretch of the stream.
type damageRecord struct {
	offset  int64 // where the damage starts
	frame   int   // index of the frame expected there
	problem string
	lost    uint64 // samples per channel lost
	known   bool   // lost is known (false: the stream ends and gives no length)
	resume  int64  // offset of the next good frame, -1 if none
}

// NewDecoder reads the metadata of the FLAC stream in src (size bytes
// long, possibly behind an ID3v2 tag) and returns a decoder ready for
// ReadFrames. It returns a *decode.FormatError, with the byte offset, when
// src is not a readable FLAC stream; metadata cut short wraps
// io.ErrUnexpectedEOF.
func NewDecoder(src decode.Source, size int64, opts Options) (*Decoder, error) {
	start, ok := streamStart(src, size)
	if !ok {
		return nil, formatError(0, `no "fLaC" signature at the start of the file (nor after an ID3v2 tag)`, nil)
	}
	md, err := readMetadata(src, start, size)
	if err != nil {
		var me *metadataError
		if errors.As(err, &me) {
			return nil, formatError(me.offset, me.problem, me.err)
		}
		return nil, err
	}
	si := md.info
	switch {
	case si.bits < 4:
		return nil, formatError(start+8+12, fmt.Sprintf("STREAMINFO declares %d bits per sample; FLAC allows 4 to 32", si.bits), nil)
	case si.sampleRate == 0:
		return nil, formatError(start+8+10, "STREAMINFO declares a sample rate of 0 Hz", nil)
	case si.maxBlock < 16:
		return nil, formatError(start+8+2, fmt.Sprintf("STREAMINFO declares a largest block of %d samples; FLAC requires at least 16", si.maxBlock), nil)
	}
	if _, err := src.Seek(md.audioStart, io.SeekStart); err != nil {
		return nil, err
	}
	layout, mask, note := channelLayout(md, si.channels)
	d := &Decoder{
		in:         newInput(src, md.audioStart, size),
		si:         si,
		opts:       opts,
		src:        src,
		size:       size,
		audioStart: md.audioStart,
		seekAt:     md.seekAt,
		seekPoints: md.seekPoints,
		scale:      1 / float64(int64(1)<<(si.bits-1)),
		info: decode.Info{
			Container:     "flac",
			Codec:         "flac",
			SampleRate:    si.sampleRate,
			Channels:      si.channels,
			Layout:        layout,
			ChannelMask:   mask,
			BitsPerSample: si.bits,
			SampleFormat:  decode.Int,
			Frames:        -1,
		},
	}
	// Buffered before each frame: twice the largest frame when STREAMINFO
	// says, else 64 KB. A frame that needs more reads more (tryFrame).
	d.lowWater = 64 << 10
	if si.maxFrame > 0 {
		d.lowWater = max(16<<10, min(2*si.maxFrame, frameLimit(si.channels, si.maxBlock)))
	}
	if note != "" {
		d.notes = append(d.notes, note)
	}
	if si.samples > 0 {
		d.info.Frames = int64(si.samples)
		seconds := float64(si.samples) / float64(si.sampleRate)
		d.info.BitRate = int(float64(size*8)/seconds + 0.5)
	}
	switch {
	case !opts.VerifyMD5:
		d.notes = append(d.notes, "FLAC MD5 verification turned off: only the frame checksums were checked")
	case si.md5 == [md5.Size]byte{}:
		d.notes = append(d.notes, "the FLAC file carries no MD5 signature (all zero): the decoded audio could only be checked against the frame checksums")
	default:
		d.hash = newSampleHash(si.bits)
	}
	return d, nil
}

// frameLimit is the largest frame the decoder reads: twice a frame of
// verbatim subframes of 33-bit samples (the widest a channel can be), plus
// the header. Encoders fall back to verbatim subframes when coding would
// be larger, so a longer frame is damage (a run of zero bits the unary
// decoder would follow through the rest of the file).
func frameLimit(channels, blockSize int) int {
	verbatim := maxHeaderSize + channels*(6+(blockSize*33+7)/8) + 2
	return 2*verbatim + 4096
}

// Info returns the stream description read from STREAMINFO.
func (d *Decoder) Info() decode.Info { return d.info }

// Notes returns remarks about the stream: MD5 verification skipped, a
// channel-mask tag that could not be used, bytes ignored after the last
// frame, each damaged stretch skipped.
func (d *Decoder) Notes() []string { return append([]string(nil), d.notes...) }

// MD5Verified reports whether the stream was decoded to its end and the MD5
// of the decoded samples matched the STREAMINFO signature.
func (d *Decoder) MD5Verified() bool { return d.verified }

// ReadFrames decodes up to len(dst)/channels frames into dst, interleaved
// and scaled so that integer full scale is ±1. See decode.Decoder. After
// damage it resynchronises and goes on delivering the good frames that
// follow; the *decode.IntegrityError describing every damaged stretch comes
// with the last of them, then io.EOF.
func (d *Decoder) ReadFrames(dst []float64) (int, error) {
	ch := d.info.Channels
	if len(dst)%ch != 0 {
		return 0, fmt.Errorf("flac: ReadFrames buffer of %d samples is not a multiple of %d channels", len(dst), ch)
	}
	want := len(dst) / ch
	n := 0
	for n < want {
		if d.curPos == d.curLen {
			if d.finished {
				break
			}
			if err := d.next(); err != nil {
				d.finished, d.finishErr = true, err
				d.curLen, d.curPos = 0, 0
			}
			continue
		}
		k := min(want-n, d.curLen-d.curPos)
		d.deliver(dst[n*ch:(n+k)*ch], d.curPos, k)
		d.curPos += k
		n += k
	}
	if d.finished && d.curPos == d.curLen {
		err := d.finishErr
		d.finishErr = io.EOF
		if n > 0 && err == io.EOF {
			return n, nil
		}
		return n, err
	}
	return n, nil
}

// deliver writes k samples per channel of the current frame, from sample
// pos on, into dst as interleaved scaled floats.
func (d *Decoder) deliver(dst []float64, pos, k int) {
	s := d.scale
	switch ch := d.info.Channels; ch {
	case 1:
		src := d.fd.samples[0][pos : pos+k]
		dst = dst[:len(src)]
		for i, v := range src {
			dst[i] = float64(v) * s
		}
	case 2:
		l := d.fd.samples[0][pos : pos+k]
		r := d.fd.samples[1][pos : pos+k]
		r = r[:len(l)]
		dst = dst[:2*len(l)]
		for i, v := range l {
			dst[2*i] = float64(v) * s
			dst[2*i+1] = float64(r[i]) * s
		}
	default:
		for c := range ch {
			j := c
			for _, v := range d.fd.samples[c][pos : pos+k] {
				dst[j] = float64(v) * s
				j += ch
			}
		}
	}
}

// next decodes the next good frame into d.fd. Past damage it searches for
// the next frame whose header and frame checksums hold and whose number
// continues the stream. At the end of the stream it returns io.EOF, or an
// *decode.IntegrityError when anything was damaged, missing or failed the
// MD5 check.
func (d *Decoder) next() error {
	if d.sec != nil && d.nextSample >= d.sec.to {
		return io.EOF
	}
	for {
		d.in.fill(d.lowWater)
		if d.in.err != nil {
			return fmt.Errorf("flac: reading at byte %d: %w", d.in.offset(), d.in.err)
		}
		b := d.in.bytes()
		if len(b) == 0 {
			if d.sec != nil {
				return fmt.Errorf("flac: the stream ends at sample %d, inside the section that ends at %d", d.nextSample, d.sec.to)
			}
			return d.endOfStream()
		}
		if d.searching && (len(b) < 2 || b[0] != 0xFF || b[1]&0xFE != 0xF8) {
			d.seekSync()
			continue
		}
		off := d.in.offset()
		problem, isFrame := d.tryFrame()
		if problem == "" {
			return nil
		}
		if d.sec != nil {
			// A section does not resynchronise: one pass reports the
			// damage in order.
			return fmt.Errorf("flac: frame at byte %d: %s", off, problem)
		}
		if !d.searching {
			d.searching = true
			d.lostAt, d.lostFrame, d.lostWhy, d.lostHdr = off, d.frameIndex, problem, isFrame
			d.frameIndex++
		}
		d.in.advance(1)
	}
}

// seekSync advances the input past the current byte (which does not start
// a frame) to the next byte 0xFF (the start of a frame sync code), or to
// the end of the file.
func (d *Decoder) seekSync() {
	d.in.advance(1)
	for {
		b := d.in.bytes()
		if i := bytes.IndexByte(b, 0xFF); i >= 0 {
			d.in.advance(i)
			d.in.fill(maxHeaderSize)
			return
		}
		d.in.advance(len(b))
		d.in.fill(d.lowWater)
		if len(d.in.bytes()) == 0 {
			return
		}
	}
}

// tryFrame decodes the frame at the input position. It returns "" when the
// frame is good (its samples are then in d.fd and the input past it), or
// what is wrong, and whether a frame sync code was there at all.
func (d *Decoder) tryFrame() (problem string, isFrame bool) {
	off := d.in.offset()
	b := d.in.bytes()
	h, problem := parseHeader(b)
	if problem != "" {
		// Damage in a header still leaves its sync code.
		return problem, len(b) >= 2 && b[0] == 0xFF && b[1]&0xFE == 0xF8
	}
	if problem := d.checkHeader(&h); problem != "" {
		return problem, true
	}
	first, problem := d.position(&h)
	if problem != "" {
		return problem, true
	}
	bits := h.bits
	if bits == 0 {
		bits = d.si.bits
	}
	limit := frameLimit(h.channels, h.blockSize)
	var n int
	for {
		b := d.in.bytes()
		var err error
		n, err = d.fd.decode(b, &h, bits)
		if err == nil {
			break
		}
		if err != errShort {
			return err.Error(), true
		}
		if d.in.eof || len(b) >= limit {
			if len(b) >= limit {
				return fmt.Sprintf("the frame would be longer than %d bytes", limit), true
			}
			return "the file ends inside the frame", true
		}
		d.in.fill(min(2*len(b), limit))
		if len(d.in.bytes()) == len(b) {
			return "the file ends inside the frame", true
		}
	}
	spread := d.fd.finish(d.hash, h.channels, h.blockSize)
	if bits < 32 && spread>>(bits-1) != 0 {
		return d.outOfRange(h.channels, h.blockSize, bits), true
	}
	// A good frame: account for what was skipped to reach it. A frame
	// that comes later than expected without any damage before it means
	// frames are missing (cut out of the file).
	if d.searching || first > d.nextSample {
		rec := damageRecord{offset: off, frame: d.frameIndex, resume: off, known: true, lost: first - d.nextSample}
		if d.searching {
			rec.offset, rec.frame, rec.problem = d.lostAt, d.lostFrame, d.lostWhy
		} else {
			rec.problem = fmt.Sprintf("the stream jumps from sample %d to %d", d.nextSample, first)
		}
		d.record(rec)
		d.searching = false
	}
	d.in.advance(n)
	if 2*n > d.lowWater {
		d.lowWater = min(2*n, limit) // so the next frame of this size needs one decode
	}
	if !d.strategy {
		d.strategy, d.variable = true, h.variable
		if !h.variable {
			d.fixedBlock = h.blockSize
		}
	}
	if d.hash != nil && d.damageCount == 0 {
		if d.sec != nil {
			d.sec.feed(d.hash, first, h.blockSize)
		} else {
			d.hash.write()
		}
	}
	d.nextFrame = h.number + 1
	d.nextSample = first + uint64(h.blockSize)
	d.decoded += uint64(h.blockSize)
	d.frameIndex++
	d.curLen, d.curPos = h.blockSize, 0
	if d.sec != nil {
		d.curLen, d.curPos = d.sec.within(first, h.blockSize)
	}
	return "", true
}

// checkHeader returns what is wrong with a frame header that contradicts
// STREAMINFO or the frames before it, or "".
func (d *Decoder) checkHeader(h *frameHeader) string {
	si := &d.si
	switch {
	case h.channels != si.channels:
		return fmt.Sprintf("frame header declares %d channels, STREAMINFO %d", h.channels, si.channels)
	case h.bits != 0 && h.bits != si.bits:
		return fmt.Sprintf("frame header declares %d bits per sample, STREAMINFO %d", h.bits, si.bits)
	case h.sampleRate != 0 && h.sampleRate != si.sampleRate:
		return fmt.Sprintf("frame header declares %d Hz, STREAMINFO %d Hz", h.sampleRate, si.sampleRate)
	case h.blockSize > si.maxBlock:
		return fmt.Sprintf("frame header declares a block of %d samples, STREAMINFO at most %d", h.blockSize, si.maxBlock)
	case d.strategy && h.variable != d.variable:
		return "the frame header changes the blocking strategy"
	}
	return ""
}

// position returns the stream position of the frame's first sample (a
// fixed-block-size stream numbers frames, a variable one samples; RFC
// 9639, section 9.1.5), or what makes it impossible: a frame before the
// next expected one or beyond the length STREAMINFO declares.
func (d *Decoder) position(h *frameHeader) (uint64, string) {
	first := h.number
	if !h.variable {
		if h.number < d.nextFrame && (d.decoded > 0 || d.searching) {
			return 0, fmt.Sprintf("frame number %d, expected %d or later", h.number, d.nextFrame)
		}
		block := d.fixedBlock
		if block == 0 {
			block = h.blockSize
			if h.number > 0 {
				block = d.si.maxBlock
			}
		}
		first = h.number * uint64(block)
	}
	switch {
	case first < d.nextSample:
		return 0, fmt.Sprintf("the frame starts at sample %d, expected %d or later", first, d.nextSample)
	case d.si.samples > 0 && first >= d.si.samples:
		return 0, fmt.Sprintf("the frame starts at sample %d, past the %d samples STREAMINFO declares", first, d.si.samples)
	}
	return first, ""
}

// outOfRange names the first sample beyond the stream's bit depth. Damage
// whose CRC happens to pass can decode to values no encoder could have
// written (the predictor overflows); such frames are refused rather than
// delivered as audio beyond full scale.
func (d *Decoder) outOfRange(channels, n, bits int) string {
	hi := int32(1)<<(bits-1) - 1
	lo := -hi - 1
	for c := range channels {
		for i, v := range d.fd.samples[c][:n] {
			if v < lo || v > hi {
				return fmt.Sprintf("channel %d sample %d decodes to %d, outside the %d-bit range", c, i, v, bits)
			}
		}
	}
	return "a sample outside the bit depth"
}

// record keeps a damaged stretch.
func (d *Decoder) record(r damageRecord) {
	if len(d.damage) < maxDamageRecords {
		d.damage = append(d.damage, r)
	}
	d.damageCount++
	d.lostTotal += r.lost
	if !r.known && r.resume < 0 {
		d.lostUnknown = true
	}
}

// maxDamageRecords bounds the damaged stretches kept one by one (and
// listed in the notes); beyond it only the totals are kept.
const maxDamageRecords = 20

// describe says what a damaged stretch was and what it cost.
func (d *Decoder) describe(r damageRecord) string {
	at := fmt.Sprintf("frame %d at byte %d: %s", r.frame, r.offset, r.problem)
	secs := float64(r.lost) / float64(d.si.sampleRate)
	switch {
	case r.resume == r.offset && r.lost == 0:
		return at
	case r.resume >= 0 && r.resume == r.offset:
		return fmt.Sprintf("%s: %d samples per channel (%.3f s) missing", at, r.lost, secs)
	case r.resume >= 0:
		return fmt.Sprintf("%s; resumed at the next valid frame, byte %d: %d samples per channel (%.3f s) lost", at, r.resume, r.lost, secs)
	case r.known:
		return fmt.Sprintf("%s; no valid frame after it: the last %d samples per channel (%.3f s) are lost", at, r.lost, secs)
	default:
		return at + "; no valid frame after it (STREAMINFO gives no length, so how much is lost is unknown)"
	}
}

// endOfStream closes the stream: damage still being skipped, a stream
// shorter than STREAMINFO declares, the MD5 check.
func (d *Decoder) endOfStream() error {
	declared := d.si.samples
	end := d.in.offset()
	switch {
	case d.searching && !d.lostHdr && (declared == 0 || d.nextSample >= declared) && d.decoded > 0:
		// Bytes after a complete stream that hold no frame: a tag, say.
		d.notes = append(d.notes, fmt.Sprintf("ignored the bytes after the last FLAC frame (bytes %d to %d)", d.lostAt, end))
	case d.searching:
		rec := damageRecord{offset: d.lostAt, frame: d.lostFrame, problem: d.lostWhy, resume: -1}
		if declared > d.nextSample {
			rec.lost, rec.known = declared-d.nextSample, true
		}
		d.record(rec)
	case declared > d.nextSample:
		d.record(damageRecord{offset: end, frame: d.frameIndex, resume: -1, known: true, lost: declared - d.nextSample,
			problem: fmt.Sprintf("the stream ends after %d samples per channel, STREAMINFO declares %d", d.nextSample, declared)})
	case declared > 0 && d.nextSample > declared:
		d.record(damageRecord{offset: end, frame: d.frameIndex, resume: end, known: true,
			problem: fmt.Sprintf("the stream holds %d samples per channel, STREAMINFO declares %d", d.nextSample, declared)})
	}
	d.searching = false
	if d.damageCount > 1 {
		for _, r := range d.damage {
			d.notes = append(d.notes, d.describe(r))
		}
		if d.damageCount > len(d.damage) {
			d.notes = append(d.notes, fmt.Sprintf("and %d more damaged stretches", d.damageCount-len(d.damage)))
		}
	}
	if d.damageCount > 0 {
		return d.integrityError()
	}
	if d.hash != nil {
		got := d.hash.sum()
		if got != d.si.md5 {
			return &decode.IntegrityError{Format: "flac", Offset: -1,
				Problem: fmt.Sprintf("MD5 of the decoded audio is %x, STREAMINFO says %x: the audio is not what was encoded", got, d.si.md5)}
		}
		d.verified = true
	}
	return io.EOF
}

// integrityError summarises the damaged stretches.
func (d *Decoder) integrityError() error {
	first := d.damage[0]
	if d.damageCount == 1 {
		return &decode.IntegrityError{Format: "flac", Offset: first.offset, Problem: d.describe(first)}
	}
	unknown := ""
	if d.lostUnknown {
		unknown = " plus an unknown amount at the end"
	}
	return &decode.IntegrityError{Format: "flac", Offset: first.offset, Problem: fmt.Sprintf(
		"%d damaged stretches, %d samples per channel (%.3f s) lost in all%s (each one in the notes); the first: %s",
		d.damageCount, d.lostTotal, float64(d.lostTotal)/float64(d.si.sampleRate), unknown, d.describe(first))}
}

func formatError(off int64, problem string, err error) error {
	return &decode.FormatError{Format: "flac", Offset: off, Problem: problem, Err: err}
}
