package mp3

import (
	"bufio"
	"encoding/binary"
	"fmt"
	"io"
	"strings"

	"github.com/kweigh/kweigh/decode"
)

// frameFeed hands the Layer III decoder whole, validated frames and nothing
// else: it walks the frames itself, so it knows where every frame starts
// and stops cleanly at the first byte that is not a frame of the stream
// (decoders that skip bytes until something looks like a header read
// damage and trailing tags as audio). Why it stopped is kept in stop
// (damage) or note (harmless trailing bytes).
type frameFeed struct {
	src   io.ReaderAt
	in    *bufio.Reader
	pos   int64 // file offset of the next byte of in
	end   int64 // file offset where the trailing tags begin
	first frameHeader

	frame      []byte // the frame being handed out
	served     int    // bytes of frame already handed out
	frameStart int64  // file offset of frame

	frames     int64 // audio frames handed out so far
	bytes      int64 // their total length
	declared   int64 // audio frames the Xing header declares, -1 if none
	minBitRate int
	maxBitRate int
	done       bool
	stop       *decode.IntegrityError
	note       string
	stopOff    int64 // where the frames ended, once done

	// known is a feed that already walked the same frames (New's scan of
	// the stream): this feed stops where it stopped, with its verdict, so
	// the bytes after the last frame are examined once, not twice.
	known *frameFeed
	// resyncReads counts the reads resync made (for tests of its cost).
	resyncReads int
	resyncBuf   []byte // resync's window, made on first use

	// Stretches of bytes skipped between frames to resume the stream
	// (damage between frames, see skipTo): how many, their bytes, the
	// frames they are estimated to have held, where the first began, and
	// the first few described for the report.
	gaps       int
	gapBytes   int64
	gapFrames  int64
	firstGap   int64
	gapDetails []string
	// index, when set, gets the offset of every frame handed out.
	index *frameIndex
	// afterGap says that the frame handed out last follows a skipped
	// stretch (the decoder must not use main data from before it).
	afterGap bool
}

// maxGapDetails is how many skipped stretches the report describes one by
// one; the rest are only counted.
const maxGapDetails = 4

// maxFrameLen is the longest frame any valid header describes: Layer II
// at 160 kbit/s and 8 kHz (MPEG-2.5) with padding, 144 × 160000 / 8000 + 1
// = 2 881 bytes [calc]. The Layer III streams decoded here stay below
// 1 441 bytes (320 kbit/s at 32 kHz, padded). FuzzHeader checks the bound.
const maxFrameLen = 2881

// newFrameFeed returns a feed of the frames between off and end of src,
// all of which must belong to the stream first describes.
func newFrameFeed(src io.ReaderAt, off, end int64, first frameHeader, declared int64) *frameFeed {
	return &frameFeed{
		src:        src,
		in:         bufio.NewReaderSize(io.NewSectionReader(src, off, end-off), 64<<10),
		pos:        off,
		end:        end,
		first:      first,
		frame:      make([]byte, 0, maxFrameLen),
		declared:   declared,
		minBitRate: first.bitRate,
		maxBitRate: first.bitRate,
		frameStart: off,
	}
}

// Read implements io.Reader over the frames (the test oracle go-mp3 reads
// the stream this way). It returns io.EOF after the last whole frame.
func (f *frameFeed) Read(p []byte) (int, error) {
	if f.served == len(f.frame) {
		if !f.next() {
			return 0, io.EOF
		}
	}
	n := copy(p, f.frame[f.served:])
	f.served += n
	return n, nil
}

// next loads the following frame and reports whether there is one. A
// frame is taken when its header belongs to the stream and the next
// header is where its length says (or the stream ends there); otherwise the
// bytes from its start are damage, and when frames of the stream link up
// again further on (resync), the stretch is skipped and counted and the
// walk goes on from there.
func (f *frameFeed) next() bool {
	f.afterGap = false
	for {
		if f.done {
			return false
		}
		off := f.pos
		if k := f.known; k != nil && k.done && off == k.stopOff {
			f.done, f.stopOff = true, off
			f.stop, f.note = k.stop, k.note
			return false
		}
		if off == f.end {
			f.finish()
			return false
		}
		f.frame = f.frame[:headerSize]
		n, _ := io.ReadFull(f.in, f.frame)
		f.pos += int64(n)
		h, err := parseHeader(f.frame[:n])
		if err != nil || !f.first.sameStream(h) || h.freeFormat() {
			if resume, ok := f.notAFrame(off, h, err == nil); ok {
				f.skipTo(off, resume)
				continue
			}
			return false
		}
		size := h.frameLen()
		if off+int64(size) > f.end {
			// A damaged header may claim a length past the end with
			// frames still to come.
			if resume, ok := f.resyncRange(off+1, f.end); ok {
				f.skipTo(off, resume)
				continue
			}
			f.stopAt(off, fmt.Sprintf("the last frame is cut short: %d of its %d bytes are present", f.end-off, size))
			return false
		}
		if cap(f.frame) < size {
			f.frame = append(f.frame, make([]byte, size-len(f.frame))...)
		}
		f.frame = f.frame[:size]
		n, err = io.ReadFull(f.in, f.frame[headerSize:])
		f.pos += int64(n)
		if err != nil {
			f.stopAt(off, fmt.Sprintf("reading the frame: %v", err))
			return false
		}
		if !f.linksOn(off + int64(size)) {
			// The next header is not where this one says: either this
			// header is damaged (its length runs over a frame that
			// starts inside it) or bytes that are not frames follow.
			if resume, ok := f.resyncRange(off+1, off+int64(size)); ok {
				f.skipTo(off, resume)
				continue
			}
		}
		f.served = 0
		f.frameStart = off
		if f.index != nil {
			f.index.add(off)
		}
		f.frames++
		f.bytes += int64(size)
		f.minBitRate = min(f.minBitRate, h.bitRate)
		f.maxBitRate = max(f.maxBitRate, h.bitRate)
		return true
	}
}

// linksOn reports whether the stream ends at next or a header of the
// stream starts there (the bytes are peeked, not consumed).
func (f *frameFeed) linksOn(next int64) bool {
	if next == f.end {
		return true
	}
	b, _ := f.in.Peek(headerSize)
	if len(b) < headerSize || !plausibleWord(binary.BigEndian.Uint32(b)) {
		return false
	}
	h, err := parseHeader(b)
	return err == nil && f.first.sameStream(h) && !h.freeFormat()
}

// skipTo skips the damaged bytes from off to resume, where frames of the
// stream link up again: the stretch is counted (with an estimate of the
// frames it held, from the mean length of the frames so far) and the walk
// goes on at resume.
func (f *frameFeed) skipTo(off, resume int64) {
	bytes := resume - off
	mean := int64(f.first.frameLen())
	if f.frames > 0 {
		mean = max(1, f.bytes/f.frames)
	}
	lost := max(1, (bytes+mean/2)/mean)
	if f.gaps == 0 {
		f.firstGap = off
	}
	f.gaps++
	f.gapBytes += bytes
	f.gapFrames += lost
	if len(f.gapDetails) < maxGapDetails {
		f.gapDetails = append(f.gapDetails, fmt.Sprintf("%d bytes at byte %d (frames resume at byte %d)", bytes, off, resume))
	}
	f.in.Reset(io.NewSectionReader(f.src, resume, f.end-resume))
	f.pos = resume
	f.afterGap = true
}

// gapReport describes the skipped stretches for the integrity error, or ""
// when there were none.
func (f *frameFeed) gapReport() string {
	if f.gaps == 0 {
		return ""
	}
	spf := int64(f.first.samplesPerFrame())
	what := strings.Join(f.gapDetails, ", ")
	if f.gaps > len(f.gapDetails) {
		what += fmt.Sprintf(" and %d more", f.gaps-len(f.gapDetails))
	}
	return fmt.Sprintf("%d damaged stretches between frames were skipped, %d bytes that are not audio frames holding about %d frames (%d samples, %.3f s) lost: %s",
		f.gaps, f.gapBytes, f.gapFrames, f.gapFrames*spf, float64(f.gapFrames*spf)/float64(f.first.sampleRate), what)
}

// drain walks the remaining frames without handing them out, so that
// damage and undeclared frames after the last delivered sample are found.
func (f *frameFeed) drain() {
	for f.next() {
	}
}

// finish checks a clean end of the stream against the Xing frame count.
func (f *frameFeed) finish() {
	f.done, f.stopOff = true, f.end
	if f.stop == nil && f.gaps == 0 && f.declared >= 0 && f.frames < f.declared {
		f.stopAt(f.end, fmt.Sprintf("the file ends after %d of the %d audio frames its Xing/Info header declares", f.frames, f.declared))
	}
}

// stopAt ends the stream with damage at off.
func (f *frameFeed) stopAt(off int64, problem string) {
	if !f.done {
		f.done, f.stopOff = true, off
	}
	if f.stop == nil {
		f.stop = &decode.IntegrityError{Format: "mp3", Offset: off, Problem: problem}
	}
}

// notAFrame decides what the bytes at off that are not a frame of the
// stream mean: damage to skip when frames of the stream follow them (it
// returns where they resume and true), damage that ends the stream when
// another stream follows or the declared frames are not all there,
// harmless trailing data otherwise.
func (f *frameFeed) notAFrame(off int64, h frameHeader, validHeader bool) (int64, bool) {
	f.done, f.stopOff = true, off
	junk := f.end - off
	if validHeader && !f.first.sameStream(h) && linked(f.src, off, f.end) {
		f.stopAt(off, fmt.Sprintf("the stream changes from %s %d Hz %d-channel to %s %d Hz %d-channel; only the first part was decoded",
			f.first.codec(), f.first.sampleRate, f.first.channels(), h.codec(), h.sampleRate, h.channels()))
		return 0, false
	}
	if validHeader && h.freeFormat() {
		f.stopAt(off, "a free-format frame follows; only the frames before it were decoded")
		return 0, false
	}
	if resume, ok := f.resyncRange(off+1, f.end); ok {
		f.done = false
		return resume, true
	}
	if f.gaps == 0 && f.declared >= 0 && f.frames < f.declared {
		f.stopAt(off, fmt.Sprintf("%d bytes that are not audio frames after %d of the %d declared frames", junk, f.frames, f.declared))
		return 0, false
	}
	if f.declared < 0 && junk >= int64(f.first.frameLen()) {
		f.stopAt(off, fmt.Sprintf("the last %d bytes are not audio frames", junk))
		return 0, false
	}
	f.note = fmt.Sprintf("ignored %d bytes at byte %d after the last audio frame: neither MPEG frames nor a known tag", junk, off)
	return 0, false
}

// resyncWindow is how many bytes resync examines per read. Each read also
// takes chainSpan bytes beyond the window, so that the chain of frames
// after any candidate header in the window is checked in memory.
const resyncWindow = 64 << 10

// resyncRange returns the first offset in [from, limit) where frames of
// the stream link up again. It reads the bytes once, in windows of
// resyncWindow (plus the overlap), and examines them in memory with a test
// that does not allocate, so even megabytes of sync-like bytes (0xFF) cost
// a few reads and linear time.
func (f *frameFeed) resyncRange(from, limit int64) (int64, bool) {
	buf := f.resyncBuf
	if buf == nil {
		buf = make([]byte, resyncWindow+chainSpan)
		f.resyncBuf = buf
	}
	first := f.firstWord()
	for base := from; base < limit; base += resyncWindow {
		n, _ := f.src.ReadAt(buf[:min(int64(len(buf)), f.end-base)], base)
		if n == 0 {
			return 0, false
		}
		f.resyncReads++
		atEnd := base+int64(n) == f.end
		b := buf[:n]
		for i := range min(n, resyncWindow, int(limit-base)) {
			if b[i] != 0xFF || i+headerSize > n {
				continue
			}
			w := binary.BigEndian.Uint32(b[i:])
			if plausibleWord(w) && sameStreamWord(first, w) && linkedBytes(b[i:], atEnd) {
				return base + int64(i), true
			}
		}
		if atEnd {
			break
		}
	}
	return 0, false
}

// firstWord is the header word of the stream's first frame, rebuilt from
// its parsed fields for the comparisons of sameStreamWord.
func (f *frameFeed) firstWord() uint32 {
	h := f.first
	var rate uint32
	for i, r := range sampleRates[h.version] {
		if r == h.sampleRate {
			rate = uint32(i)
		}
	}
	return 0x7FF<<21 | uint32(h.version)<<19 | uint32(4-h.layer)<<17 | rate<<10 | uint32(h.mode)<<6
}
