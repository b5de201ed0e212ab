package flac

import (
	"crypto/md5"
	"hash"
)

// sampleHash is the running MD5 of the decoded samples as STREAMINFO
// defines it (RFC 9639, section 8.2): every sample of every channel,
// interleaved, signed little-endian in ceil(bits/8) bytes. It packs each
// frame into one reused buffer and hashes it with a single Write.
type sampleHash struct {
	h     hash.Hash
	width int // bytes per sample
	buf   []byte
}

func newSampleHash(bitsPerSample int) *sampleHash {
	return &sampleHash{h: md5.New(), width: (bitsPerSample + 7) / 8}
}

// addFrame hashes the first n samples of each channel.
func (s *sampleHash) addFrame(channels [][]int32, n int) {
	size := n * len(channels) * s.width
	if cap(s.buf) < size {
		s.buf = make([]byte, size)
	}
	buf := s.buf[:size]
	step := len(channels) * s.width
	for c, samples := range channels {
		samples = samples[:n]
		j := c * s.width
		switch s.width {
		case 1:
			for _, v := range samples {
				buf[j] = byte(v)
				j += step
			}
		case 2:
			for _, v := range samples {
				b := buf[j : j+2 : j+2]
				b[0], b[1] = byte(v), byte(v>>8)
				j += step
			}
		case 3:
			for _, v := range samples {
				b := buf[j : j+3 : j+3]
				b[0], b[1], b[2] = byte(v), byte(v>>8), byte(v>>16)
				j += step
			}
		default:
			for _, v := range samples {
				b := buf[j : j+4 : j+4]
				b[0], b[1], b[2], b[3] = byte(v), byte(v>>8), byte(v>>16), byte(v>>24)
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
