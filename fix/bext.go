package fix

import (
	"encoding/binary"
	"fmt"
	"math"
	"os"

	"github.com/kweigh/kweigh/measure"
)

// Byte offsets in the bext chunk body (EBU Tech 3285 v2, 2011, §2.3):
// version uint16 at 346; the loudness fields int16, round(100 × value), at
// 412 (integrated, LUFS), 414 (loudness range, LU), 416 (maximum true peak,
// dBTP), 418 (maximum momentary, LUFS) and 420 (maximum short-term, LUFS);
// 0x7FFF means "not set".
const (
	bextVersionAt  = 346
	bextLoudnessAt = 412
	bextEnd        = 422
	bextNotSet     = 0x7FFF
)

// patchBext writes the output's measured loudness into the bext chunk body
// at off (size bytes) of f and raises the version to 2 when it is lower.
// A chunk too short to hold the fields (shorter than the 602-byte fixed
// part the standard requires) is left alone and reported.
func patchBext(f *os.File, off, size int64, m *measure.Measurement) error {
	if size < bextEnd {
		return fmt.Errorf("bext chunk at byte %d is %d bytes, too short for loudness fields; left as it was", off, size)
	}
	var v [2]byte
	if _, err := f.ReadAt(v[:], off+bextVersionAt); err != nil {
		return err
	}
	if binary.LittleEndian.Uint16(v[:]) < 2 {
		binary.LittleEndian.PutUint16(v[:], 2)
		if _, err := f.WriteAt(v[:], off+bextVersionAt); err != nil {
			return err
		}
	}
	var b [10]byte
	for i, p := range []*float64{m.IntegratedLUFS, m.LoudnessRangeLU, m.TruePeakDBTP, m.MaxMomentaryLUFS, m.MaxShortTermLUFS} {
		binary.LittleEndian.PutUint16(b[2*i:], uint16(bextValue(p)))
	}
	_, err := f.WriteAt(b[:], off+bextLoudnessAt)
	return err
}

// bextValue codes a figure as Tech 3285 v2 does: round(100 × value) as
// int16, 0x7FFF for an undefined figure (and clamped into int16).
func bextValue(p *float64) int16 {
	if p == nil {
		return bextNotSet
	}
	v := math.Round(*p * 100)
	switch {
	case v >= bextNotSet:
		return bextNotSet - 1
	case v < math.MinInt16:
		return math.MinInt16
	}
	return int16(v)
}
