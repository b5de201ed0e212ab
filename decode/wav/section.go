package wav

import (
	"fmt"

	"github.com/kweigh/kweigh/decode"
	"github.com/kweigh/kweigh/internal/filemap"
)

// SplitFrames returns the number of frames when the data chunk is whole,
// and 0 when it is truncated or ends in a partial frame (then the damage
// is reported by ReadFrames in one pass). See decode.Splitter.
func (d *decoder) SplitFrames() int64 {
	if d.damage != nil {
		return 0
	}
	return d.readable / d.blockAlign
}

// Section returns a decoder for frames [from, to) that reads the same
// source at its own position. See decode.Splitter.
func (d *decoder) Section(from, to int64) (decode.Decoder, error) {
	if from < 0 || to < from || to > d.SplitFrames() {
		return nil, fmt.Errorf("wav: section %d–%d outside the %d splittable frames", from, to, d.SplitFrames())
	}
	s := &decoder{
		src:        d.src,
		info:       d.info,
		convert:    d.convert,
		channels:   d.channels,
		blockAlign: d.blockAlign,
		dataOffset: d.dataOffset,
		pos:        from * d.blockAlign,
		readable:   to * d.blockAlign,
	}
	s.mapAudio(filemap.Open(d.src, d.dataOffset+s.pos, d.dataOffset+s.readable))
	return s, nil
}
