package flac

import (
	"crypto/md5"
	"hash"

	"github.com/mewkiz/flac/frame"
)

// sampleHash is the running MD5 of the decoded samples as the FLAC format
// defines it for STREAMINFO: every sample of every channel, interleaved,
// signed little-endian in ceil(bits/8) bytes (FLAC format, METADATA_BLOCK_
// STREAMINFO, "MD5 signature of the unencoded audio data"). It packs each
// frame into one reused buffer and hashes it with a single Write, where
// frame.Frame.Hash would call Write once per sample.
type sampleHash struct {
	h     hash.Hash
	width int // bytes per sample
	buf   []byte
}

func newSampleHash(bitsPerSample int) *sampleHash {
	return &sampleHash{h: md5.New(), width: (bitsPerSample + 7) / 8}
}

// addFrame hashes the samples of a decoded frame.
func (s *sampleHash) addFrame(f *frame.Frame) {
	n := int(f.BlockSize) * len(f.Subframes) * s.width
	if cap(s.buf) < n {
		s.buf = make([]byte, n)
	}
	buf := s.buf[:n]
	step := len(f.Subframes) * s.width
	for c, sub := range f.Subframes {
		j := c * s.width
		switch s.width {
		case 1:
			for _, v := range sub.Samples {
				buf[j] = byte(v)
				j += step
			}
		case 2:
			for _, v := range sub.Samples {
				buf[j] = byte(v)
				buf[j+1] = byte(v >> 8)
				j += step
			}
		default:
			for _, v := range sub.Samples {
				buf[j] = byte(v)
				buf[j+1] = byte(v >> 8)
				buf[j+2] = byte(v >> 16)
				j += step
			}
		}
	}
	s.h.Write(buf)
}

// sum returns the MD5 of everything hashed so far.
func (s *sampleHash) sum() [md5.Size]byte {
	var out [md5.Size]byte
	s.h.Sum(out[:0])
	return out
}
