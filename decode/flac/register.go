package flac

import (
	"bytes"
	"io"

	"github.com/kweigh/kweigh/decode"
)

func init() {
	decode.Register(decode.Format{
		Name:       "flac",
		Extensions: []string{"flac"},
		Match:      match,
		New: func(src decode.Source, size int64, opt decode.Options) (decode.Decoder, error) {
			return NewDecoder(src, size, Options{VerifyMD5: !opt.SkipMD5})
		},
	})
}

// signature opens every FLAC stream (FLAC format, "STREAM").
var signature = []byte("fLaC")

// match reports whether r holds a FLAC stream, possibly behind an ID3v2 tag.
func match(r io.ReaderAt, size int64) bool {
	_, ok := streamStart(r, size)
	return ok
}

// streamStart returns the offset of the "fLaC" signature: 0, or the end of a
// leading ID3v2 tag (ID3v2.4 structure, section 3: a 10-byte header whose
// last four bytes are a synchsafe size, plus a 10-byte footer when flag bit
// 4 is set). Some taggers put such a tag in front of FLAC files.
func streamStart(r io.ReaderAt, size int64) (int64, bool) {
	var head [10]byte
	if n, _ := r.ReadAt(head[:4], 0); n < 4 {
		return 0, false
	}
	if bytes.Equal(head[:4], signature) {
		return 0, true
	}
	if !bytes.Equal(head[:3], []byte("ID3")) {
		return 0, false
	}
	if n, _ := r.ReadAt(head[:], 0); n < len(head) {
		return 0, false
	}
	var tagSize int64
	for _, b := range head[6:10] {
		if b&0x80 != 0 {
			return 0, false // not synchsafe: not an ID3v2 header
		}
		tagSize = tagSize<<7 | int64(b)
	}
	start := 10 + tagSize
	if head[5]&0x10 != 0 {
		start += 10
	}
	var sig [4]byte
	if start+4 > size {
		return 0, false
	}
	if n, _ := r.ReadAt(sig[:], start); n < 4 || !bytes.Equal(sig[:], signature) {
		return 0, false
	}
	return start, true
}
