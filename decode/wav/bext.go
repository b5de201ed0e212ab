package wav

import (
	"bytes"
	"encoding/binary"
	"strings"

	"github.com/kweigh/kweigh/decode"
)

// Byte offsets in the bext chunk body (EBU Tech 3285 v2, 2011, §2.3).
const (
	bextDescription          = 0   // char[256]
	bextOriginator           = 256 // char[32]
	bextOriginatorReference  = 288 // char[32]
	bextOriginationDate      = 320 // char[10] yyyy-mm-dd
	bextOriginationTime      = 330 // char[8] hh:mm:ss
	bextTimeReference        = 338 // uint64 (low, high uint32)
	bextVersion              = 346 // uint16
	bextLoudnessValue        = 412 // int16, round(100 × LUFS), version ≥ 2
	bextLoudnessRange        = 414 // int16, round(100 × LU)
	bextMaxTruePeakLevel     = 416 // int16, round(100 × dBTP)
	bextMaxMomentaryLoudness = 418 // int16, round(100 × LUFS)
	bextMaxShortTermLoudness = 420 // int16, round(100 × LUFS)
	bextCodingHistory        = 602 // char[], to the end of the chunk
)

// bextNotSet is the value of a loudness field that holds no measurement.
const bextNotSet = 0x7FFF

// maxCodingHistory bounds how much of the coding history is read; the rest
// of an absurdly long chunk is skipped.
const maxCodingHistory = 64 << 10

// minBextSize is the shortest bext body still worth reading: everything up
// to and including the version field.
const minBextSize = bextVersion + 2

// parseBext reads a bext chunk body. Fields that the body is too short to
// hold are left empty; the loudness fields are set only from version 2 on
// and when they are not 0x7FFF.
func parseBext(body []byte) *decode.Bext {
	le := binary.LittleEndian
	b := &decode.Bext{
		Description:         bextString(body, bextDescription, 256),
		Originator:          bextString(body, bextOriginator, 32),
		OriginatorReference: bextString(body, bextOriginatorReference, 32),
		OriginationDate:     bextString(body, bextOriginationDate, 10),
		OriginationTime:     bextString(body, bextOriginationTime, 8),
	}
	if len(body) < minBextSize {
		return b
	}
	b.TimeReference = le.Uint64(body[bextTimeReference:])
	b.Version = int(le.Uint16(body[bextVersion:]))
	if b.Version >= 2 && len(body) >= bextMaxShortTermLoudness+2 {
		b.LoudnessValue = bextLoudness(body, bextLoudnessValue)
		b.LoudnessRange = bextLoudness(body, bextLoudnessRange)
		b.MaxTruePeakLevel = bextLoudness(body, bextMaxTruePeakLevel)
		b.MaxMomentaryLoudness = bextLoudness(body, bextMaxMomentaryLoudness)
		b.MaxShortTermLoudness = bextLoudness(body, bextMaxShortTermLoudness)
	}
	if len(body) > bextCodingHistory {
		b.CodingHistory = cleanText(body[bextCodingHistory:], "\x00 \r\n")
	}
	return b
}

// bextString returns the fixed-size text field at off, cut at its first NUL.
func bextString(body []byte, off, size int) string {
	if off >= len(body) {
		return ""
	}
	field := body[off:min(off+size, len(body))]
	if i := bytes.IndexByte(field, 0); i >= 0 {
		field = field[:i]
	}
	return cleanText(field, " ")
}

// cleanText trims cutset from the end of b and makes it valid UTF-8 (the
// fields are ASCII by the standard; anything else is shown, not trusted).
func cleanText(b []byte, cutset string) string {
	s := strings.TrimRight(string(b), cutset)
	s = strings.TrimLeft(s, "\x00")
	return strings.ToValidUTF8(s, "\uFFFD")
}

// bextLoudness reads one int16 loudness field, nil when it is not set.
func bextLoudness(body []byte, off int) *float64 {
	v := int16(binary.LittleEndian.Uint16(body[off:]))
	if v == bextNotSet {
		return nil
	}
	f := float64(v) / 100
	return &f
}
