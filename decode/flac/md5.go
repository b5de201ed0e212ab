package flac

import (
	"crypto/md5"
	"encoding/binary"
	"hash"
)

// sampleHash is the running MD5 of the decoded samples as STREAMINFO
// defines it (RFC 9639, section 8.2): every sample of every channel,
// interleaved, signed little-endian in ceil(bits/8) bytes. pack lays a
// frame out in one reused buffer (and measures the samples' spread on the
// way, which the range check needs anyway); write hashes it with a single
// Write once the frame is known to be good.
type sampleHash struct {
	h     hash.Hash
	width int // bytes per sample
	buf   []byte
}

func newSampleHash(bitsPerSample int) *sampleHash {
	return &sampleHash{h: md5.New(), width: (bitsPerSample + 7) / 8}
}

// fold maps a sample to a value whose highest set bit is the highest bit
// that differs from the sign: a sample fits b bits exactly when the OR of
// the folded samples is below 2^(b-1).
func fold(v int32) uint32 { return uint32(v ^ v>>31) }

// pack lays out the first n samples of each channel and returns the OR of
// their folded values.
func (s *sampleHash) pack(channels [][]int32, n int) uint32 {
	size := n * len(channels) * s.width
	if cap(s.buf) < size+8 {
		s.buf = make([]byte, size+8) // 3-byte samples are stored 4 at a time
	}
	buf := s.buf[:size+8]
	var spread uint32
	switch {
	case len(channels) == 2 && s.width == 3:
		l, r := channels[0][:n], channels[1][:n]
		r = r[:len(l)]
		for i, a := range l {
			b := r[i]
			spread |= fold(a) | fold(b)
			o := buf[6*i : 6*i+8 : 6*i+8]
			binary.LittleEndian.PutUint32(o[0:4], uint32(a))
			binary.LittleEndian.PutUint32(o[3:7], uint32(b))
		}
	case len(channels) == 2 && s.width == 2:
		l, r := channels[0][:n], channels[1][:n]
		r = r[:len(l)]
		for i, a := range l {
			b := r[i]
			spread |= fold(a) | fold(b)
			o := buf[4*i : 4*i+4 : 4*i+4]
			binary.LittleEndian.PutUint32(o, uint32(uint16(a))|uint32(b)<<16)
		}
	case s.width == 3:
		// A pass per channel, at the stride of a frame: the fourth byte
		// of a 3-byte sample lands on the next channel's first byte,
		// which that channel's pass (after this one) writes again; the
		// last channel, whose fourth byte would be the next frame's,
		// writes three bytes.
		stride := 3 * len(channels)
		last := len(channels) - 1
		for c, x := range channels[:last] {
			x = x[:n]
			j := 3 * c
			for _, v := range x {
				spread |= fold(v)
				binary.LittleEndian.PutUint32(buf[j:j+4:j+4], uint32(v))
				j += stride
			}
		}
		j := 3 * last
		for _, v := range channels[last][:n] {
			spread |= fold(v)
			o := buf[j : j+3 : j+3]
			binary.LittleEndian.PutUint16(o, uint16(v))
			o[2] = byte(v >> 16)
			j += stride
		}
	case s.width == 4:
		j := 0
		for i := range n {
			for _, c := range channels {
				v := c[i]
				spread |= fold(v)
				binary.LittleEndian.PutUint32(buf[j:], uint32(v))
				j += s.width
			}
		}
	default:
		j := 0
		for i := range n {
			for _, c := range channels {
				v := c[i]
				spread |= fold(v)
				if s.width == 1 {
					buf[j] = byte(v)
				} else {
					binary.LittleEndian.PutUint16(buf[j:], uint16(v))
				}
				j += s.width
			}
		}
	}
	s.buf = s.buf[:size]
	return spread
}

// packStereo decorrelates the stereo pair a, b in place (see decorrelate), lays
// the result out like pack and returns the OR of the folded samples: one
// pass for what would be three.
func (s *sampleHash) packStereo(assignment int, a, b []int32) uint32 {
	n := len(a)
	b = b[:n]
	size := 2 * n * s.width
	if cap(s.buf) < size+8 {
		s.buf = make([]byte, size+8)
	}
	buf := s.buf[:size+8]
	var spread uint32
	// A loop per width and mode, the mode's arithmetic as in decorrelate.
	switch {
	case s.width == 3 && assignment == leftSide:
		for i := range a {
			l := a[i]
			r := l - b[i]
			b[i] = r
			spread |= fold(l) | fold(r)
			o := buf[6*i : 6*i+8 : 6*i+8]
			binary.LittleEndian.PutUint32(o[0:4], uint32(l))
			binary.LittleEndian.PutUint32(o[3:7], uint32(r))
		}
	case s.width == 3 && assignment == sideRight:
		for i := range a {
			r := b[i]
			l := a[i] + r
			a[i] = l
			spread |= fold(l) | fold(r)
			o := buf[6*i : 6*i+8 : 6*i+8]
			binary.LittleEndian.PutUint32(o[0:4], uint32(l))
			binary.LittleEndian.PutUint32(o[3:7], uint32(r))
		}
	case s.width == 3 && assignment == midSide:
		for i := range a {
			m, sd := a[i], b[i]
			m = m<<1 | sd&1
			l, r := (m+sd)>>1, (m-sd)>>1
			a[i], b[i] = l, r
			spread |= fold(l) | fold(r)
			o := buf[6*i : 6*i+8 : 6*i+8]
			binary.LittleEndian.PutUint32(o[0:4], uint32(l))
			binary.LittleEndian.PutUint32(o[3:7], uint32(r))
		}
	case s.width == 2 && assignment == leftSide:
		for i := range a {
			l := a[i]
			r := l - b[i]
			b[i] = r
			spread |= fold(l) | fold(r)
			o := buf[4*i : 4*i+4 : 4*i+4]
			binary.LittleEndian.PutUint32(o, uint32(uint16(l))|uint32(r)<<16)
		}
	case s.width == 2 && assignment == sideRight:
		for i := range a {
			r := b[i]
			l := a[i] + r
			a[i] = l
			spread |= fold(l) | fold(r)
			o := buf[4*i : 4*i+4 : 4*i+4]
			binary.LittleEndian.PutUint32(o, uint32(uint16(l))|uint32(r)<<16)
		}
	case s.width == 2 && assignment == midSide:
		for i := range a {
			m, sd := a[i], b[i]
			m = m<<1 | sd&1
			l, r := (m+sd)>>1, (m-sd)>>1
			a[i], b[i] = l, r
			spread |= fold(l) | fold(r)
			o := buf[4*i : 4*i+4 : 4*i+4]
			binary.LittleEndian.PutUint32(o, uint32(uint16(l))|uint32(r)<<16)
		}
	default:
		decorrelate(assignment, a, b)
		ch := [2][]int32{a, b}
		return s.pack(ch[:], n)
	}
	s.buf = s.buf[:size]
	return spread
}

// write hashes the frame pack laid out.
func (s *sampleHash) write() { s.h.Write(s.buf) }

// spreadOf returns the OR of the folded values of the first n samples of
// each channel (the range check when no MD5 is computed).
func spreadOf(channels [][]int32, n int) uint32 {
	var spread uint32
	for _, c := range channels {
		for _, v := range c[:n] {
			spread |= fold(v)
		}
	}
	return spread
}

// sum returns the MD5 of everything hashed so far.
func (s *sampleHash) sum() [md5.Size]byte {
	var out [md5.Size]byte
	s.h.Sum(out[:0])
	return out
}
