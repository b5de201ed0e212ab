package aiff

import (
	"io"

	"github.com/kweigh/kweigh/decode"
)

func init() {
	decode.Register(decode.Format{
		Name:       "aiff",
		Extensions: []string{"aif", "aiff", "aifc"},
		Match:      match,
		New: func(src decode.Source, size int64, opt decode.Options) (decode.Decoder, error) {
			return NewDecoder(src, size)
		},
	})
}

// match reports whether r starts with an IFF FORM of type AIFF or AIFC.
func match(r io.ReaderAt, size int64) bool {
	var b [12]byte
	if n, _ := r.ReadAt(b[:], 0); n < len(b) {
		return false
	}
	return string(b[:4]) == "FORM" && (string(b[8:]) == "AIFF" || string(b[8:]) == "AIFC")
}
