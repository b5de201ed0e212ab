package aiff

import (
	"fmt"

	"github.com/kweigh/kweigh/decode"
	"github.com/kweigh/kweigh/internal/filemap"
)

// SplitFrames returns the number of frames when the sound data holds every
// frame COMM declares (or COMM declares none and SSND decides), and 0 when
// it is short (then the damage is reported by ReadFrames in one pass). See
// decode.Splitter.
func (d *Decoder) SplitFrames() int64 {
	if d.h.frames > 0 && d.present < d.h.frames {
		return 0
	}
	return d.present
}

// Section returns a decoder for frames [from, to) that reads the same
// source at its own position. See decode.Splitter.
func (d *Decoder) Section(from, to int64) (decode.Decoder, error) {
	if from < 0 || to < from || to > d.SplitFrames() {
		return nil, fmt.Errorf("aiff: section %d–%d outside the %d splittable frames", from, to, d.SplitFrames())
	}
	// The section's header declares it to end at to, so that reaching to
	// is its clean end, not a shortfall.
	h := *d.h
	if h.frames > 0 {
		h.frames = to
	}
	s := &Decoder{
		src:        d.src,
		h:          &h,
		info:       d.info,
		convert:    d.convert,
		frameBytes: d.frameBytes,
		present:    to,
		pos:        from,
	}
	s.mapSound(filemap.Open(d.src, h.dataOff+from*d.frameBytes, h.dataOff+to*d.frameBytes))
	return s, nil
}
