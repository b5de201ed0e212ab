package wav

import (
	"io"

	"github.com/kweigh/kweigh/decode"
)

func init() {
	decode.Register(decode.Format{Name: "wav", Extensions: []string{"wav", "bwf", "rf64", "bw64", "w64"}, Match: Match, New: func(src decode.Source, size int64, _ decode.Options) (decode.Decoder, error) { return New(src, size) }})
}

// riffMagics are the first FourCCs of the containers this package reads (and
// of big-endian RIFX, which it recognises only to refuse it clearly).
var riffMagics = [...]string{"RIFF", "RF64", "BW64", "RIFX"}

// Match reports whether r starts like a WAVE-family file: one of the RIFF,
// RF64, BW64 or RIFX FourCCs followed by the form type "WAVE". A file too
// short to hold the form type matches on its first FourCC alone, so that New
// can report the truncated header instead of an unknown format.
func Match(r io.ReaderAt, size int64) bool {
	var head [12]byte
	n, _ := r.ReadAt(head[:], 0)
	if n < 4 {
		return false
	}
	known := false
	for _, m := range riffMagics {
		if string(head[:4]) == m {
			known = true
		}
	}
	if !known {
		return false
	}
	if n < 12 {
		return size < 12
	}
	return string(head[8:12]) == "WAVE"
}
