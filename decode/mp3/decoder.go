package mp3

import (
	"fmt"
	"io"
	"strings"

	"github.com/kweigh/kweigh/decode"
	"github.com/kweigh/kweigh/decode/mp3/internal/layer3"
)

func init() {
	decode.Register(decode.Format{
		Name:       "mp3",
		Extensions: []string{"mp3"},
		Match:      Match,
		New: func(src decode.Source, size int64, opt decode.Options) (decode.Decoder, error) {
			return New(src, size)
		},
	})
}

// SynthesisDelay is the delay, in samples, of the Layer III decoder's
// hybrid and polyphase synthesis filter banks: the first sample the encoder
// was given comes out of the decoder this many samples (plus the encoder
// delay) after the start of the first audio frame. 529 is the figure gapless
// players use (common practice, no published source); TestSynthesisDelay
// measures it against the source of every fixture.
const SynthesisDelay = 529

// Decoder decodes one MPEG-1, MPEG-2 or MPEG-2.5 Layer III stream with
// kweigh's own Layer III decoder (package layer3). It implements
// decode.Decoder and decode.Noter.
type Decoder struct {
	info decode.Info
	feed *frameFeed
	mp3  *layer3.Decoder

	pcm       []float64 // decoded samples of the current frame, interleaved
	pcmOff    int       // samples of pcm already delivered or dropped
	skip      int64     // decoded frames still to drop at the start
	remaining int64     // frames still to deliver; -1 when the end is unknown
	delivered int64

	damaged      int   // frames whose data was damaged (decoded as silence or in part)
	firstDamage  int64 // file offset of the first of them
	damageReason string

	notes []string
	err   error // damage to report once after the last frame
	done  bool

	// For sections (section.go): the stream's source, its end and first
	// header, the index of its frames (nil when the walk found damage),
	// and the samples dropped at its start (delay + SynthesisDelay, or 0).
	src       decode.Source
	end       int64
	first     frameHeader
	index     *frameIndex
	startSkip int64
	// A section decoder stops at its last frame without walking the rest,
	// and does not report damage in its first quiet frames (the pre-roll,
	// whose output it drops).
	section bool
	quiet   int64
	frameNo int64 // frames decoded so far
}

// New reads the first frame header, the Xing/Info header and the encoder
// extension of src (size bytes), walks the frame headers of the whole
// stream once (the stream, not the Xing/Info header, decides what is
// audio), and returns a Decoder ready for ReadFrames. It returns a
// *decode.FormatError when src holds no MPEG audio frame, and a
// *decode.UnsupportedError for free format and layers I/II.
func New(src decode.Source, size int64) (*Decoder, error) {
	start, end, tags := taggedBounds(src, size)
	off, ok := firstFrame(src, start, end)
	if !ok {
		return nil, &decode.FormatError{Format: "mp3", Offset: start, Problem: "no MPEG audio frame header where the audio should start"}
	}
	var hb [headerSize]byte
	if _, err := src.ReadAt(hb[:], off); err != nil {
		return nil, &decode.FormatError{Format: "mp3", Offset: off, Problem: "file ends inside the first frame header"}
	}
	h, err := parseHeader(hb[:])
	if err != nil {
		return nil, &decode.FormatError{Format: "mp3", Offset: off, Problem: err.Error()}
	}
	if why := h.unsupported(); why != "" {
		return nil, &decode.UnsupportedError{Format: "mp3", What: why}
	}
	first := make([]byte, h.frameLen())
	if off+int64(len(first)) > end {
		return nil, &decode.FormatError{Format: "mp3", Offset: off, Problem: fmt.Sprintf("file ends inside the first frame (%d of %d bytes)", end-off, len(first))}
	}
	if _, err := src.ReadAt(first, off); err != nil {
		return nil, &decode.FormatError{Format: "mp3", Offset: off, Problem: fmt.Sprintf("reading the first frame: %v", err)}
	}

	d := &Decoder{
		info: decode.Info{
			Container:  "mp3",
			Codec:      h.codec(),
			SampleRate: h.sampleRate,
			Channels:   h.channels(),
			Layout:     decode.DefaultLayout(h.channels()),
			// A lossy stream has no bit depth: the decoder's output
			// resolution is not a property of the file.
			BitsPerSample: 0,
			SampleFormat:  decode.Float,
			Frames:        -1,
			BitRate:       h.bitRate,
			Mode:          h.mode.String(),
			Tags:          tags,
		},
		pcm:       make([]float64, 0, h.samplesPerFrame()*h.channels()),
		mp3:       layer3.NewDecoder(&layer3.Window),
		remaining: -1,
	}
	audioStart, declared := off, int64(-1)
	x, hasXing := parseXing(first, h)
	if hasXing {
		audioStart += int64(len(first))
		if x.hasFrames {
			declared = int64(x.frames)
		}
	}
	scan := newFrameFeed(src, audioStart, end, h, declared)
	scan.index = &frameIndex{}
	scan.drain()
	d.src, d.end, d.first = src, end, h
	if scan.stop == nil && scan.gaps == 0 {
		d.index = scan.index
	}
	if scan.note != "" {
		d.notes = append(d.notes, scan.note)
	}
	d.describeRate(h, x, hasXing, scan)
	if hasXing {
		d.applyXing(x, h, scan.frames, scan.gaps > 0)
	} else {
		d.info.Frames = scan.frames * int64(h.samplesPerFrame())
		d.notes = append(d.notes, fmt.Sprintf("no Xing/Info header: the encoder delay and end padding are unknown, so the audio was measured untrimmed (it starts with the decoder's %d-sample delay plus the encoder's)", SynthesisDelay))
	}
	d.feed = newFrameFeed(src, audioStart, end, h, declared)
	d.feed.known = scan
	d.startSkip = d.skip
	return d, nil
}

// describeRate fills BitRate and BitRateMode from the frames the scan
// walked and from the encoder extension. A stream whose frames all have
// one bit rate shows that rate; otherwise the average over the audio
// frames. The mode is the extension's when it has a valid CRC and does not
// contradict the frames (a "cbr" claim over frames of varying rates), else
// "cbr" for frames of one rate and "vbr" for varying ones.
func (d *Decoder) describeRate(h frameHeader, x xingHeader, hasXing bool, scan *frameFeed) {
	constant := scan.frames == 0 || scan.minBitRate == scan.maxBitRate
	if scan.frames > 0 {
		if constant {
			d.info.BitRate = scan.minBitRate
		} else {
			seconds := float64(scan.frames*int64(h.samplesPerFrame())) / float64(h.sampleRate)
			d.info.BitRate = int(float64(scan.bytes)*8/seconds + 0.5)
		}
	}
	mode := ""
	if hasXing && x.extension && x.extensionCRCOK {
		mode = x.rateMode()
	}
	switch {
	case mode == "cbr" && !constant, mode == "":
		if constant {
			mode = "cbr"
		} else {
			mode = "vbr"
		}
	}
	d.info.BitRateMode = mode
}

// applyXing sets the trimming and the length from the Xing/Info header x
// found in the first frame, given the number of audio frames the stream
// really holds. The delay and padding are applied only when the header's
// frame count agrees with the stream: a header that declares fewer frames
// would otherwise hide the rest of the programme, and one that declares
// more describes a stream that is not there.
//
// A stream with damaged stretches skipped between frames (gapped) holds
// fewer frames than the header declares; its start and end are still the
// encoder's, so the delay and padding are applied to the frames there.
func (d *Decoder) applyXing(x xingHeader, h frameHeader, counted int64, gapped bool) {
	spf := int64(h.samplesPerFrame())
	d.info.Frames = counted * spf
	if !x.hasFrames {
		d.notes = append(d.notes, "the Xing/Info header does not give the frame count: the audio was measured untrimmed")
		return
	}
	frames := int64(x.frames)
	switch {
	case gapped && counted < frames && x.extension && x.extensionCRCOK:
		total := counted*spf - int64(x.delay) - int64(x.padding)
		if total < 0 {
			d.notes = append(d.notes, fmt.Sprintf("the encoder delay (%d) and padding (%d) exceed the %d decoded samples: the audio was measured untrimmed", x.delay, x.padding, counted*spf))
			break
		}
		d.skip = int64(x.delay) + SynthesisDelay
		d.remaining = total
		d.info.Frames = total
	case frames != counted:
		d.notes = append(d.notes, fmt.Sprintf("the Xing/Info header declares %d audio frames but the stream holds %d: every frame was measured, and the header's encoder delay and padding were not applied (the audio is untrimmed)", frames, counted))
	case x.extension && x.extensionCRCOK:
		total := frames*spf - int64(x.delay) - int64(x.padding)
		if total < 0 {
			d.notes = append(d.notes, fmt.Sprintf("the encoder delay (%d) and padding (%d) exceed the %d decoded samples: the audio was measured untrimmed", x.delay, x.padding, frames*spf))
			break
		}
		d.skip = int64(x.delay) + SynthesisDelay
		d.remaining = total
		d.info.Frames = total
	case x.extension:
		d.notes = append(d.notes, "the encoder extension of the Xing/Info header fails its CRC: its delay and padding were ignored and the audio was measured untrimmed")
	default:
		d.notes = append(d.notes, "the Xing/Info header has no encoder delay and padding: the audio was measured untrimmed")
	}
}

// Info returns the stream description.
func (d *Decoder) Info() decode.Info { return d.info }

// ReadFrames decodes up to len(dst)/Channels frames into dst, scaled so that
// the decoder's full scale is ±1 and never clamped (decoded overs are kept).
// It returns 0, io.EOF at the end; a damaged stream yields its decodable
// frames, then one *decode.IntegrityError, then io.EOF.
func (d *Decoder) ReadFrames(dst []float64) (int, error) {
	ch := d.info.Channels
	if len(dst)%ch != 0 {
		return 0, fmt.Errorf("mp3: ReadFrames buffer of %d samples is not a multiple of %d channels", len(dst), ch)
	}
	want := len(dst) / ch
	n := 0
	for n < want && !d.done {
		if d.pcmOff == len(d.pcm) && !d.refill() {
			break
		}
		n += d.take(dst[n*ch:want*ch], ch)
	}
	if n > 0 {
		return n, nil
	}
	if d.err != nil {
		err := d.err
		d.err = nil
		return 0, err
	}
	return 0, io.EOF
}

// take copies decoded samples into dst after dropping the leading delay and
// stopping at the declared end; it returns the frames written.
func (d *Decoder) take(dst []float64, ch int) int {
	avail := int64(len(d.pcm)-d.pcmOff) / int64(ch)
	if d.skip > 0 {
		drop := min(d.skip, avail)
		d.skip -= drop
		d.pcmOff += int(drop) * ch
		avail -= drop
	}
	n := min(avail, int64(len(dst)/ch))
	if d.remaining >= 0 {
		n = min(n, d.remaining)
		d.remaining -= n
	}
	copy(dst, d.pcm[d.pcmOff:d.pcmOff+int(n)*ch])
	d.pcmOff += int(n) * ch
	d.delivered += n
	if d.remaining == 0 {
		d.finish()
	}
	return int(n)
}

// refill decodes the next frame into pcm and reports whether it got any.
// A frame whose data is damaged (CRC mismatch, main data that is not at
// hand, a granule longer than its data) still yields its frame of samples
// (silence where the data was bad), so the timing of what follows holds;
// it is counted and reported after the last frame.
func (d *Decoder) refill() bool {
	d.pcm, d.pcmOff = d.pcm[:cap(d.pcm)], 0
	if !d.feed.next() {
		d.pcm = d.pcm[:0]
		d.finish()
		return false
	}
	if d.feed.afterGap {
		d.mp3.Resume()
	}
	n, err := d.mp3.Frame(d.feed.frame, d.pcm)
	damage, isDamage := err.(*layer3.Damage)
	d.frameNo++
	switch {
	case isDamage && d.frameNo <= d.quiet:
		// A section's pre-roll frame: its output is dropped.
	case isDamage:
		if d.damaged == 0 {
			d.firstDamage, d.damageReason = d.feed.frameStart, damage.Problem
		}
		d.damaged++
	case err != nil:
		// The feed hands out only frames whose headers belong to the
		// stream, so this is a decoder limit, not the file's damage.
		d.err = &decode.IntegrityError{Format: "mp3", Offset: d.feed.frameStart, Problem: err.Error()}
		d.pcm = d.pcm[:0]
		d.finish()
		return false
	}
	d.pcm = d.pcm[:n*d.info.Channels]
	return n > 0
}

// finish runs once at the end of the delivered audio: it walks the frames
// left after the declared end and collects what the feed found.
func (d *Decoder) finish() {
	if d.done {
		return
	}
	d.done = true
	if d.section {
		// The rest of the stream belongs to other sections (the whole
		// stream's walk found it sound); only this section's frames count.
		if d.err == nil && d.damaged > 0 {
			d.err = &decode.IntegrityError{Format: "mp3", Offset: d.firstDamage,
				Problem: fmt.Sprintf("%d audio frames are damaged and were decoded as silence where their data was bad (first: %s)", d.damaged, d.damageReason)}
		}
		return
	}
	if d.err == nil {
		d.feed.drain()
		d.err = d.damage()
	}
	if d.err == nil && d.info.Frames >= 0 && d.delivered < d.info.Frames {
		d.notes = append(d.notes, fmt.Sprintf("the stream decoded to %d samples per channel, %d fewer than its frames hold", d.delivered, d.info.Frames-d.delivered))
	}
}

// damage is the one *decode.IntegrityError for everything the walk and
// the decoding found wrong, or nil: the damaged frames, the stretches
// skipped between frames, and what ended the stream early, at the offset
// of the first of them.
func (d *Decoder) damage() error {
	var parts []string
	off := int64(-1)
	at := func(o int64) {
		if off < 0 || o < off {
			off = o
		}
	}
	if d.damaged > 0 {
		parts = append(parts, fmt.Sprintf("%d of %d audio frames are damaged and were decoded as silence where their data was bad (first: %s)", d.damaged, d.feed.frames, d.damageReason))
		at(d.firstDamage)
	}
	if g := d.feed.gapReport(); g != "" {
		parts = append(parts, g)
		at(d.feed.firstGap)
	}
	if s := d.feed.stop; s != nil {
		if len(parts) == 0 {
			return s
		}
		parts = append(parts, s.Problem)
		at(s.Offset)
	}
	if len(parts) == 0 {
		return nil
	}
	return &decode.IntegrityError{Format: "mp3", Offset: off, Problem: strings.Join(parts, "; ")}
}

// Notes returns what decoding found that the user must be told: missing
// gapless information and ignored trailing bytes. Call it after ReadFrames
// returned io.EOF.
func (d *Decoder) Notes() []string {
	return append([]string(nil), d.notes...)
}
