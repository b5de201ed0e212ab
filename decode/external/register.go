package external

import (
	"io"

	"github.com/kweigh/kweigh/decode"
)

// Extensions are the file-name extensions of the containers the bridge
// reads.
var Extensions = []string{"m4a", "m4b", "mp4", "mov", "qt", "mxf", "aac", "adts", "ac3", "ec3", "eac3", "ogg", "oga", "mka", "mkv", "webm"}

func init() {
	decode.Register(decode.Format{
		Name:       "external",
		Extensions: Extensions,
		Match:      func(r io.ReaderAt, size int64) bool { return Detect(r, size) != "" },
		New: func(src decode.Source, size int64, opt decode.Options) (decode.Decoder, error) {
			d, err := New(src, size, Detect(src, size), opt)
			if err != nil {
				return nil, err
			}
			return d, nil
		},
	})
}
