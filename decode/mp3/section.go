package mp3

import (
	"fmt"

	"github.com/kweigh/kweigh/decode"
	"github.com/kweigh/kweigh/decode/mp3/internal/layer3"
)

// Sections (decode.Splitter): a long MP3 measured on several cores.
//
// A Layer III decoder carries three kinds of state from frame to frame,
// all of it finite: the bit reservoir (a frame's main data may begin up to
// 511 bytes, 255 at the lower sampling frequencies, before its own frame:
// ISO/IEC 11172-3 §2.4.3.4.2, ISO/IEC 13818-3), the overlap of the hybrid
// filter bank (the second half of the last granule's IMDCT blocks, which
// depends on that granule alone), and the polyphase synthesis buffer (16
// blocks of 32 subband samples, less than the 18 blocks of one granule).
// So the state before frame F is that of one pass as soon as the two
// granules before F were decoded from their true main data: frames F−1
// (MPEG-1, two granules) or F−2 and F−1 (MPEG-2 and 2.5, one granule each).
// Their main data is at hand when decoding starts early enough that the
// frames before them supplied the reservoir's full reach. A section decoder
// therefore starts at frame S = F − 2 − r, where the main data of the r
// frames before F − 2 adds up to at least the reservoir's reach (or S = 0),
// decodes from there, and drops every sample before the section's first:
// what it delivers is bit-identical to the one-pass decode
// (TestSectionsBitIdentical). Damage the pre-roll frames report (the
// reservoir they reach into is not there) belongs to the frames dropped
// and is not reported; damage inside the section is, as in one pass.
//
// The frame index this needs comes from the walk of the whole stream that
// New makes anyway. It keeps the offset of every indexStride-th frame only
// (8 bytes per 32 frames, under 10 bytes a second of audio: 75 KB for a
// 2-hour file, where every frame would take 2.4 MB), in chunks of
// indexChunk entries (no reallocation as it grows). A section then starts
// at an indexed frame: the one at least the reservoir's reach of main data
// before the frames whose granules set the filter state, counted from the
// offsets between indexed frames less the fixed part of each frame in
// between (a lower bound of the main data they carry, so the reach is
// always covered), and decodes up to indexStride−1 frames more than it
// strictly needs.

// indexStride is how many frames apart the index's entries are.
const indexStride = 32

// indexChunk is the number of entries per chunk of the index.
const indexChunk = 1024

// frameIndex holds the file offset of every indexStride-th audio frame of
// a stream (frames 0, indexStride, 2·indexStride, …).
type frameIndex struct {
	chunks [][]int64
	n      int64 // frames seen
}

// add notes the offset of the next frame.
func (x *frameIndex) add(off int64) {
	defer func() { x.n++ }()
	if x.n%indexStride != 0 {
		return
	}
	e := x.n / indexStride
	if e%indexChunk == 0 {
		x.chunks = append(x.chunks, make([]int64, 0, indexChunk))
	}
	c := &x.chunks[len(x.chunks)-1]
	*c = append(*c, off)
}

// at returns the offset of frame i, a multiple of indexStride below n.
func (x *frameIndex) at(i int64) int64 {
	e := i / indexStride
	return x.chunks[e/indexChunk][e%indexChunk]
}

// SplitFrames returns the frames Section can reach: every frame the
// stream delivers when the walk of the stream found no damage and its
// length is known, else 0 (the file is read in one pass, which reports the
// damage in order). See decode.Splitter.
func (d *Decoder) SplitFrames() int64 {
	if d.index == nil || d.info.Frames < 0 {
		return 0
	}
	return d.info.Frames
}

// Section returns a decoder for frames [from, to) of the stream (the
// trimmed frames ReadFrames delivers), bit-identical to them: it decodes
// from enough frames earlier for the reservoir, the overlap and the
// synthesis state (see above) and drops what comes before from. It reads
// the same source with ReadAt and does not move d. See decode.Splitter.
func (d *Decoder) Section(from, to int64) (decode.Decoder, error) {
	if from < 0 || to < from || to > d.SplitFrames() {
		return nil, fmt.Errorf("mp3: section %d–%d outside the %d splittable frames", from, to, d.SplitFrames())
	}
	spf := int64(d.first.samplesPerFrame())
	decoded := from + d.startSkip // the section's first sample, counted from the first decoded one
	first := decoded / spf        // the frame it is in
	state := max(0, first-2)      // the frames whose granules set the filter state
	reach := maxReservoir(d.first)
	fixed := int64(headerSize + 2 + d.first.sideInfoLen()) // less than the main data, CRC or not
	// The indexed frame at or before state, then indexed frames further
	// back until the main data between start and that frame (at least the
	// bytes between their offsets less the fixed part of each frame) covers
	// the reach; frames between that frame and state only add to it.
	anchor := state / indexStride * indexStride
	start := anchor
	for start > 0 && d.index.at(anchor)-d.index.at(start)-(anchor-start)*fixed < reach {
		start -= indexStride
	}
	s := &Decoder{
		info:      d.info,
		first:     d.first,
		pcm:       make([]float64, 0, cap(d.pcm)),
		mp3:       layer3.NewDecoder(&layer3.Window),
		skip:      decoded - start*spf,
		remaining: to - from,
		section:   true,
		quiet:     first - start,
	}
	s.feed = newFrameFeed(d.src, d.index.at(start), d.end, d.first, -1)
	return s, nil
}

// maxReservoir is how far back main_data_begin can reach: 9 bits in
// MPEG-1, 8 at the lower sampling frequencies (ISO/IEC 11172-3 §2.4.3.4.2,
// ISO/IEC 13818-3 §2.4.3.4.2), in bytes.
func maxReservoir(h frameHeader) int64 {
	if h.version == mpeg1 {
		return 511
	}
	return 255
}
