package flac

import (
	"bytes"
	"crypto/md5"
	"encoding/binary"
	"fmt"
	"hash"
	"io"
	"sync"

	"github.com/kweigh/kweigh/decode"
)

// Sections: one FLAC stream decoded on several cores (decode.Splitter).
//
// FLAC frames decode independently, so a section starts at the frame that
// holds its first sample: found through the SEEKTABLE when the stream has
// one and its point checks out, narrowed by bisection on byte offsets
// (each probe a search for a frame whose sync code, header CRC-8, full
// decode with CRC-16 and the header of the frame after it all hold), and
// the samples before the section's start decoded and dropped. A section
// reads the shared source with ReadAt only and does not resynchronise:
// damage in it makes package measure read the file again in one pass,
// which reports the damage in order.
//
// The MD5 of STREAMINFO covers the whole stream in order, so sections
// cannot each check it. They hand their frames, laid out as the MD5
// wants them, to one md5Chain: a section whose frames continue what is
// hashed hashes them itself; the others' bytes wait, copied, until the
// hash reaches them, and a goroutine of the chain hashes them then,
// beside the sections still decoding. Only one goroutine hashes at a time
// (the chain's busy token). MaxSectionFrames keeps a section to
// maxSectionBytes of MD5 bytes, only a section's own samples are kept
// (not those of the frames before its start that it decodes to reach
// it), and a section waits while the hash is at work and the chunks in
// use pass maxHeldBytes, so memory stays within chainMemoryBound however
// long the stream. Once every section is read, CheckSections
// compares the hash with STREAMINFO and returns exactly the
// *decode.IntegrityError one pass would have returned at its end.

// maxSectionBytes bounds the MD5 bytes (ceil(bits/8) per sample) of a
// section: what waits in memory while an earlier section is being hashed.
// 8 MiB is 29 s of 48 kHz stereo 24-bit audio, 9.7 s of 5.1.
const maxSectionBytes = 8 << 20

// seekPointSize is the size of a SEEKTABLE point (RFC 9639, section 8.5):
// sample number, byte offset from the first frame, samples in the frame.
const seekPointSize = 18

// placeholderPoint marks an unused seek point.
const placeholderPoint = ^uint64(0)

// SplitFrames returns the stream's length in samples per channel when
// STREAMINFO gives it and the stream can be cut into sections, else 0:
// then the file is read in one pass. A fixed-block-size stream whose first
// frame contradicts STREAMINFO's block size (frame numbers would not give
// sample positions) is read in one pass too. See decode.Splitter.
func (d *Decoder) SplitFrames() int64 {
	if d.sec != nil || d.si.samples == 0 {
		return 0
	}
	d.splitOnce.Do(func() {
		var fd frameDecoder
		p, ok := d.probe(&fd, nil, d.audioStart, d.audioStart+1)
		if ok && p.first == 0 && (p.h.variable || p.h.blockSize == d.si.maxBlock || uint64(p.h.blockSize) >= d.si.samples) {
			d.splitTotal = int64(d.si.samples)
		}
	})
	return d.splitTotal
}

// MaxSectionFrames returns the longest section, in samples per channel,
// whose MD5 bytes stay within maxSectionBytes, or 0 (no limit) when the
// MD5 is not checked. See decode.SectionChecker.
func (d *Decoder) MaxSectionFrames() int64 {
	if d.hash == nil {
		return 0
	}
	return maxSectionBytes / int64(d.si.channels*d.hash.width)
}

// CheckSections reports the MD5 check of a stream read in sections that
// covered it from its first sample to its last: nil when it matches (or is
// not checked), the *decode.IntegrityError one pass returns when it does
// not, and an error when the sections did not cover the stream. See
// decode.SectionChecker.
func (d *Decoder) CheckSections() error {
	c := d.chain
	if d.hash == nil || c == nil {
		return nil
	}
	c.mu.Lock()
	defer c.mu.Unlock()
	c.wait()
	if len(c.waiting) > 0 || c.next != d.si.samples {
		return fmt.Errorf("flac: the sections reached sample %d of %d in order; the MD5 was not checked", c.next, d.si.samples)
	}
	var got [md5.Size]byte
	c.h.Sum(got[:0])
	if err := d.md5Error(got); err != nil {
		return err
	}
	d.verified = true
	return nil
}

// md5Error is the damage report for a stream whose decoded audio hashes
// to got, or nil when that is STREAMINFO's MD5.
func (d *Decoder) md5Error(got [md5.Size]byte) error {
	if got == d.si.md5 {
		return nil
	}
	return &decode.IntegrityError{Format: "flac", Offset: -1,
		Problem: fmt.Sprintf("MD5 of the decoded audio is %x, STREAMINFO says %x: the audio is not what was encoded", got, d.si.md5)}
}

// Section returns a decoder for samples [from, to) of the stream (per
// channel) that shares only the source, read with ReadAt. See
// decode.Splitter.
func (d *Decoder) Section(from, to int64) (decode.Decoder, error) {
	total := d.SplitFrames()
	if from < 0 || to < from || to > total {
		return nil, fmt.Errorf("flac: section %d–%d outside the %d samples of the stream", from, to, total)
	}
	s := &Decoder{
		si:         d.si,
		info:       d.info,
		opts:       d.opts,
		scale:      d.scale,
		lowWater:   d.lowWater,
		src:        d.src,
		size:       d.size,
		audioStart: d.audioStart,
		seekAt:     d.seekAt,
		seekPoints: d.seekPoints,
		sec:        &sectionSpan{from: uint64(from), to: uint64(to)},
	}
	if from == to {
		s.finished, s.finishErr = true, io.EOF
		return s, nil
	}
	off, first := s.locate(uint64(from))
	s.nextSample = first
	s.in = newInput(io.NewSectionReader(d.src, off, d.size-off), off, d.size)
	if d.hash != nil {
		d.chainOnce.Do(func() { d.chain = newMD5Chain(d.si.channels * d.hash.width) })
		s.hash = &sampleHash{width: d.hash.width}
		s.sec.chain = d.chain
		d.chain.noteSection(uint64(to - from))
	}
	return s, nil
}

// sectionSpan is what a section decoder delivers, and where its MD5
// bytes go.
type sectionSpan struct {
	from, to uint64 // samples per channel
	chain    *md5Chain
	part     md5Part
}

// within returns the frame length and start position to deliver of a
// frame of n samples starting at sample first: the part inside the
// section.
func (s *sectionSpan) within(first uint64, n int) (length, pos int) {
	end := min(first+uint64(n), s.to)
	start := min(max(first, s.from), end)
	return int(end - first), int(start - first)
}

// feed hands the part of frame h (laid out, n samples from sample first)
// inside the section to the MD5 chain. The samples before the section's
// start are left out: the section before it delivers them, and the frame
// a section starts at may come a probe span of file bytes before its
// start (locate), which in a stream of tiny frames is minutes of audio
// whose bytes would otherwise wait beside the section's own.
func (s *sectionSpan) feed(h *sampleHash, first uint64, n int) {
	start, end := max(first, s.from), min(first+uint64(n), s.to)
	if start >= end {
		return
	}
	fb := s.chain.frameBytes
	s.chain.feed(&s.part, start, h.buf[int(start-first)*fb:int(end-first)*fb])
}

// md5Chain is the MD5 of a stream decoded in sections (see the top of
// this file).
type md5Chain struct {
	mu         sync.Mutex
	cond       sync.Cond // signalled when busy ends or waiting bytes are hashed
	h          hash.Hash // written by the holder of busy only
	frameBytes int       // MD5 bytes per sample of all channels
	next       uint64    // samples per channel hashed so far
	busy       bool      // a goroutine is hashing
	waiting    []*md5Part
	inUse      int      // chunks in waiting parts and in the hands of drain
	free       [][]byte // drained chunks, for reuse

	// For the memory bound's tests: the high-water marks of the chunks
	// held (in use and in reserve) and of a section's MD5 bytes, and the
	// times a section waited for the hash.
	chunksMost, sectionMost, waits int
}

// maxHeldBytes bounds the chunks in use in a chain while the hash is at
// work: a section whose bytes would take more waits. When nothing is
// hashing, only the sections still being read hold chunks (see
// chainMemoryBound).
const maxHeldBytes = 2 * maxSectionBytes

func newMD5Chain(frameBytes int) *md5Chain {
	c := &md5Chain{h: md5.New(), frameBytes: frameBytes}
	c.cond.L = &c.mu
	return c
}

// noteSection records a section of n samples per channel. c.mu is not held.
func (c *md5Chain) noteSection(n uint64) {
	c.mu.Lock()
	c.sectionMost = max(c.sectionMost, int(n)*c.frameBytes)
	c.mu.Unlock()
}

// md5Part is the bytes of one section that wait for the hash to reach
// them: frames from sample first on.
type md5Part struct {
	first uint64
	pend  [][]byte // chunks of chunkBytes capacity, filled in order
	size  int      // bytes in pend
}

// chunkBytes is the size of the chunks waiting bytes are kept in; at most
// maxFreeChunks drained ones are kept for reuse.
const (
	chunkBytes    = 1 << 20
	maxFreeChunks = 8
)

// chainMemoryBound is the most memory, in bytes of chunks in use and in
// reserve, an md5Chain holds while a stream is read the way package
// measure reads it: in rounds of at most sections sections at once, each
// round started once every section of the round before has been read, no
// section of more than sectionBytes MD5 bytes (its samples times
// frameBytes). It does not grow with the stream's length.
//
// Derivation. The chain keeps one invariant: when no goroutine is hashing
// (busy is false) no waiting part is one the hash has reached (every
// place that ends busy, or adds a part, checks reachable under c.mu, and
// only the holder of busy moves next). Chunks are taken only by
// md5Chain.add in feed, in one of two states:
//
//   - busy: the section first waits until busy ends or inUse·chunkBytes +
//     len(data) ≤ maxHeldBytes. The add takes at most ⌈len(data)/chunkBytes⌉
//     new chunks, so afterwards inUse·chunkBytes < maxHeldBytes +
//     chunkBytes, and as both sides are whole chunks (maxHeldBytes is one),
//     inUse ≤ maxHeldBytes/chunkBytes.
//   - not busy: the sections of earlier rounds have all been read and
//     cover the stream up to the current round's start; had any of
//     their bytes not been hashed, the part holding sample next would be
//     reachable, against the invariant. So every chunk in use (none is in
//     drain's hands either) belongs to a part of a section of the current
//     round, one part per section, filled in order: at most
//     ⌈sectionBytes/chunkBytes⌉ each, sections·⌈sectionBytes/chunkBytes⌉
//     in all.
//
// Chunks are given back only by drain, so inUse never exceeds the larger
// of the two; the reserve adds maxFreeChunks (drain moves chunks from use
// to the reserve, add back, so only a new chunk raises the sum). Chunks
// drained beyond the reserve are dropped to the collector and not
// counted.
func chainMemoryBound(sections, sectionBytes int) int {
	perSection := (sectionBytes + chunkBytes - 1) / chunkBytes
	inUse := max(maxHeldBytes/chunkBytes, sections*perSection)
	return (inUse + maxFreeChunks) * chunkBytes
}

// add appends data to p's chunks, taking chunks from c's reserve or making
// them. c.mu is held.
func (c *md5Chain) add(p *md5Part, data []byte) {
	p.size += len(data)
	for len(data) > 0 {
		if k := len(p.pend); k == 0 || len(p.pend[k-1]) == chunkBytes {
			var b []byte
			if f := len(c.free); f > 0 {
				b, c.free = c.free[f-1], c.free[:f-1]
			} else {
				b = make([]byte, 0, chunkBytes)
			}
			p.pend = append(p.pend, b)
			c.inUse++
			c.chunksMost = max(c.chunksMost, c.inUse+len(c.free))
		}
		last := &p.pend[len(p.pend)-1]
		n := min(len(data), chunkBytes-len(*last))
		*last = append(*last, data[:n]...)
		data = data[n:]
	}
}

// feed hashes data (whole frames from sample first on) if it continues
// the hash and nobody else is hashing, else keeps a copy in p to be hashed
// when the hash gets there. Bytes of samples already hashed (a section's
// pre-roll overlaps the section before it) are skipped. Parts the hash
// reaches are hashed by a goroutine of the chain's (drain), so a section
// that finishes does not wait for the bytes of the next: the hashing goes
// on beside the sections of the next round. While the hash is at work, a
// section whose bytes would take the chunks in use beyond maxHeldBytes
// waits first; it waits only while the hash is being worked on (busy
// always ends), so a section never waits on one that stopped.
//
// After that wait the state is looked at afresh: the hash may have gone
// idle and reached p's bytes meanwhile, and a part left waiting then
// would have nobody to hash it, so its bytes (and every later section's)
// would pile up until some section happened to continue the hash itself.
func (c *md5Chain) feed(p *md5Part, first uint64, data []byte) {
	c.mu.Lock()
	for c.busy && c.inUse*chunkBytes+len(data) > maxHeldBytes {
		c.waits++
		c.cond.Wait()
	}
	if c.busy || len(p.pend) > 0 || first > c.next {
		if len(p.pend) == 0 {
			p.first = first
			c.waiting = append(c.waiting, p)
		}
		c.add(p, data)
		if c.busy || c.reachable() < 0 {
			c.mu.Unlock()
			return
		}
		// Nobody is hashing and the hash has reached p (its bytes
		// waited from before the wait above ended).
		c.busy = true
		c.mu.Unlock()
		go c.drain()
		return
	}
	c.busy = true
	c.mu.Unlock()
	c.write(first, len(data), data)
	c.mu.Lock()
	if c.reachable() < 0 {
		c.busy = false
		c.cond.Broadcast()
		c.mu.Unlock()
		return
	}
	c.mu.Unlock()
	go c.drain()
}

// reachable returns the index of a waiting part the hash has reached, or
// -1. c.mu is held.
func (c *md5Chain) reachable() int {
	for i, p := range c.waiting {
		if p.first <= c.next {
			return i
		}
	}
	return -1
}

// write hashes what the chunks (size bytes in all, whole frames from
// sample first on) hold past the samples hashed; first is at most c.next.
// Only the holder of busy calls it.
func (c *md5Chain) write(first uint64, size int, chunks ...[]byte) {
	end := first + uint64(size/c.frameBytes)
	c.mu.Lock()
	next := c.next
	c.mu.Unlock()
	if end <= next {
		return
	}
	skip := int(next-first) * c.frameBytes
	for _, b := range chunks {
		if skip >= len(b) {
			skip -= len(b)
			continue
		}
		c.h.Write(b[skip:])
		skip = 0
	}
	c.mu.Lock()
	c.next = end
	c.mu.Unlock()
}

// drain, run by the holder of busy, hashes every waiting part the hash
// has reached, then gives up busy.
func (c *md5Chain) drain() {
	c.mu.Lock()
	for {
		i := c.reachable()
		if i < 0 {
			c.busy = false
			c.cond.Broadcast()
			c.mu.Unlock()
			return
		}
		p := c.waiting[i]
		c.waiting = append(c.waiting[:i], c.waiting[i+1:]...)
		chunks, first, size := p.pend, p.first, p.size
		p.pend, p.size = nil, 0
		c.mu.Unlock()
		c.write(first, size, chunks...)
		c.mu.Lock()
		c.inUse -= len(chunks)
		for _, b := range chunks {
			if len(c.free) < maxFreeChunks {
				c.free = append(c.free, b[:0])
			}
		}
		c.cond.Broadcast()
	}
}

// wait returns once no goroutine is hashing. c.mu is held.
func (c *md5Chain) wait() {
	for c.busy {
		c.cond.Wait()
	}
}

// probed is a frame found by probe.
type probed struct {
	off   int64 // where it starts
	h     frameHeader
	first uint64 // its first sample
}

// locate returns the offset and first sample of a frame at or before the
// one holding sample target, close enough that decoding from it to target
// costs little: the SEEKTABLE's point when it checks out, then bisection.
// Every candidate is a frame verified by probe; the first frame of the
// stream is the fallback.
func (d *Decoder) locate(target uint64) (int64, uint64) {
	lo, loFirst := d.audioStart, uint64(0)
	hi := d.size
	if off, next, ok := d.seekPoint(target); ok {
		if p, ok := d.probe(&d.fd, &d.probeBuf, off, off+1); ok && p.first <= target {
			lo, loFirst = off, p.first
			if next > off {
				hi = min(hi, next)
			}
		}
	}
	span := d.probeSpan()
	for hi-lo > int64(span) {
		mid := lo + (hi-lo)/2
		p, ok := d.probe(&d.fd, &d.probeBuf, mid, min(hi, mid+int64(span)))
		if !ok || p.first > target {
			hi = mid
			continue
		}
		lo, loFirst = p.off, p.first
		if p.first+uint64(p.h.blockSize) > target {
			break
		}
	}
	return lo, loFirst
}

// probeSpan is how far probe searches for a frame: twice the largest frame
// STREAMINFO declares, at least 64 KB.
func (d *Decoder) probeSpan() int {
	return max(64<<10, min(2*d.si.maxFrame, frameLimit(d.si.channels, d.si.maxBlock)))
}

// seekPoint returns the file offset of the last SEEKTABLE point at or
// before sample target and the offset of the point after it (0 if none),
// reading the points it needs by bisection with ReadAt (RFC 9639, section
// 8.5: points ascend by sample number, placeholders last).
func (d *Decoder) seekPoint(target uint64) (off, next int64, ok bool) {
	point := func(i int64) (sample, offset uint64, good bool) {
		var b [seekPointSize]byte
		if n, _ := d.src.ReadAt(b[:], d.seekAt+i*seekPointSize); n < len(b) {
			return 0, 0, false
		}
		sample, offset = binary.BigEndian.Uint64(b[0:]), binary.BigEndian.Uint64(b[8:])
		return sample, offset, sample != placeholderPoint && offset < uint64(d.size-d.audioStart)
	}
	if d.seekAt == 0 || d.seekPoints == 0 {
		return 0, 0, false
	}
	lo, hi := int64(-1), d.seekPoints // point lo ≤ target < point hi
	for hi-lo > 1 {
		mid := lo + (hi-lo)/2
		sample, _, good := point(mid)
		if good && sample <= target {
			lo = mid
		} else {
			hi = mid
		}
	}
	if lo < 0 {
		return 0, 0, false
	}
	_, offset, good := point(lo)
	if !good {
		return 0, 0, false
	}
	if hi < d.seekPoints {
		if _, o, g := point(hi); g && o > offset {
			next = d.audioStart + int64(o)
		}
	}
	return d.audioStart + int64(offset), next, true
}

// probe searches [at, until) for the start of a frame whose header and
// CRC-8 hold, agree with STREAMINFO, whose full decode (into fd) passes the
// CRC-16, and which is followed by the end of the stream or by a frame
// header that continues it. It reads with ReadAt only, into *scratch
// (grown as needed) or, when scratch is nil, a buffer of its own.
func (d *Decoder) probe(fd *frameDecoder, scratch *[]byte, at, until int64) (probed, bool) {
	span := until - at
	limit := frameLimit(d.si.channels, d.si.maxBlock)
	want := int(min(int64(d.probeSpan()+limit+maxHeaderSize), d.size-at))
	var buf []byte
	if scratch != nil && cap(*scratch) >= want {
		buf = (*scratch)[:want]
	} else {
		buf = make([]byte, want)
		if scratch != nil {
			*scratch = buf
		}
	}
	n, _ := d.src.ReadAt(buf, at)
	buf = buf[:n]
	for i := 0; int64(i) < span && i < len(buf); i++ {
		j := bytes.IndexByte(buf[i:], 0xFF)
		if j < 0 || int64(i+j) >= span {
			break
		}
		i += j
		b := buf[i:]
		if len(b) < 2 || b[1]&0xFE != 0xF8 {
			continue
		}
		h, problem := parseHeader(b)
		if problem != "" || d.checkHeader(&h) != "" {
			continue
		}
		bits := h.bits
		if bits == 0 {
			bits = d.si.bits
		}
		size, err := fd.decode(b, &h, bits)
		if err != nil {
			continue
		}
		fd.assignment = independent // the samples are not wanted
		first := h.number
		if !h.variable && h.number > 0 {
			first = h.number * uint64(d.si.maxBlock)
		}
		end := first + uint64(h.blockSize)
		if first >= d.si.samples || end > d.si.samples {
			continue
		}
		if end < d.si.samples {
			// The header after it must continue the stream.
			h2, problem := parseHeader(b[size:])
			if problem != "" || d.checkHeader(&h2) != "" || h2.variable != h.variable ||
				!h.variable && h2.number != h.number+1 || h.variable && h2.number != end {
				continue
			}
		}
		return probed{off: at + int64(i), h: h, first: first}, true
	}
	return probed{}, false
}
