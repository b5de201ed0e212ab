// Package bitstream reads the big-endian bit fields of a FLAC frame (RFC
// 9639, section 9: every field is written most significant bit first, with
// no alignment between fields).
//
// A Reader works on a byte slice that holds a whole frame (the decoder's
// sliding buffer), through a 64-bit accumulator refilled eight bytes at a
// time. Reading past the end of the slice never panics: it yields zero bits
// and Overrun reports it, so the decoder can fetch more input and decode the
// frame again, or call the frame truncated. Unary codes (the quotients of
// Rice codes) are counted with a leading-zero count of the accumulator
// rather than bit by bit.
package bitstream

import (
	"encoding/binary"
	"math/bits"
)

// Reader is a bit reader over a byte slice. The zero value reads nothing;
// Reset gives it data.
type Reader struct {
	data []byte
	pos  int    // next byte of data to load into acc
	acc  uint64 // unread bits, left-aligned
	n    uint   // valid bits in acc (the bits below them are data or zero)
	pad  int    // zero bits supplied past the end of data
}

// Reset makes r read data from its first bit.
func (r *Reader) Reset(data []byte) {
	*r = Reader{data: data}
}

// refill tops acc up to at least 56 valid bits. The fast path loads eight
// bytes at once and keeps whole bytes only; the bits of a byte loaded in
// part are loaded again by the next refill, and OR-ing them twice changes
// nothing.
func (r *Reader) refill() {
	if r.pos+8 <= len(r.data) {
		r.acc |= binary.BigEndian.Uint64(r.data[r.pos:]) >> r.n
		r.pos += int((63 - r.n) >> 3)
		r.n |= 56
		return
	}
	r.refillTail()
}

// refillTail refills byte by byte near the end of data and with zero bytes
// past it.
func (r *Reader) refillTail() {
	for r.n <= 56 {
		if r.pos < len(r.data) {
			r.acc |= uint64(r.data[r.pos]) << (56 - r.n)
			r.pos++
		} else {
			r.pad += 8
		}
		r.n += 8
	}
}

// Bits reads an unsigned field of k bits, 0 ≤ k ≤ 56.
func (r *Reader) Bits(k uint) uint64 {
	if r.n < k {
		r.refill()
	}
	v := r.acc >> (64 - k)
	r.acc <<= k
	r.n -= k
	return v
}

// Signed reads a two's-complement field of k bits, 0 ≤ k ≤ 56.
func (r *Reader) Signed(k uint) int64 {
	v := r.Bits(k)
	return int64(v<<(64-k)) >> (64 - k)
}

// Bit reads one bit.
func (r *Reader) Bit() bool { return r.Bits(1) != 0 }

// Unary reads a unary code: the number of zero bits before the next one
// bit, which it consumes too. Past the end of data it stops and returns the
// zeros counted so far (Overrun is then true).
func (r *Reader) Unary() uint64 {
	var q uint64
	for {
		if r.n == 0 {
			if r.pos >= len(r.data) {
				r.pad++ // the one bit that was not there
				return q
			}
			r.refill()
		}
		lz := uint(bits.LeadingZeros64(r.acc))
		if lz < r.n {
			r.acc <<= lz + 1
			r.n -= lz + 1
			return q + uint64(lz)
		}
		q += uint64(r.n)
		r.acc, r.n = 0, 0
	}
}

// Rice decodes len(dst) Rice-coded residuals with parameter k (0 ≤ k ≤ 30;
// RFC 9639 section 9.2.7): a unary quotient, k low bits, the result folded
// to a signed value (even codes non-negative, odd codes negative). It
// returns false when a code's value does not fit in 32 bits, which only
// damaged data produces.
//
// The loop keeps the accumulator in local variables, refills it only when
// fewer than 32 bits are left, and takes a code whose quotient and low bits
// are both in the accumulator (nearly all of them) with one leading-zero
// count and three shifts; longer codes go through riceSlow. Below k = 27
// no code the fast loop takes can exceed 32 bits, so only larger
// parameters check every code.
func (r *Reader) Rice(dst []int32, k uint) bool {
	switch {
	case k == 0:
		return r.rice0(dst)
	case k > 26:
		// A quotient of 64 << 26 is 2^32: only from here on can a code be
		// too wide, so only these parameters (32-bit audio) check each.
		var wide uint64
		for i := range dst {
			v := r.riceSlow(k)
			wide |= v
			dst[i] = int32(uint32(v>>1)) ^ -int32(uint32(v&1))
		}
		return wide>>32 == 0
	}
	for i := 0; i < len(dst); {
		// riceRun takes every code whose quotient and low bits are in the
		// accumulator (nearly all of them) and stops for a longer code or
		// near the end of data; the code there is read by riceSlow.
		var m int
		m, r.acc, r.n, r.pos = riceRun(dst[i:], r.data, r.acc, r.n, r.pos, k)
		i += m
		if i == len(dst) {
			break
		}
		v := r.riceSlow(k)
		if v>>32 != 0 {
			return false
		}
		dst[i] = int32(uint32(v>>1)) ^ -int32(uint32(v&1))
		i++
	}
	return true
}

// rice0 is Rice for k = 0, where a code is its quotient alone.
func (r *Reader) rice0(dst []int32) bool {
	data := r.data
	var wide uint64
	for i := 0; i < len(dst); {
		acc, n, pos := r.acc, r.n, r.pos
		for ; i < len(dst); i++ {
			if n < 32 {
				if pos+8 > len(data) {
					break
				}
				acc |= binary.BigEndian.Uint64(data[pos:pos+8:pos+8]) >> n
				pos += int((63 - n) >> 3)
				n |= 56
			}
			lz := uint(bits.LeadingZeros64(acc))
			if lz >= n {
				break
			}
			acc <<= (lz + 1) & 63
			n -= lz + 1
			v := uint64(lz)
			dst[i] = int32(uint32(v>>1)) ^ -int32(uint32(v&1))
		}
		r.acc, r.n, r.pos = acc, n, pos
		if i == len(dst) {
			break
		}
		v := r.riceSlow(0)
		wide |= v
		dst[i] = int32(uint32(v>>1)) ^ -int32(uint32(v&1))
		i++
	}
	return wide>>32 == 0
}

// riceSlow reads one Rice code field by field; a value too wide for 32
// bits comes back with bits above bit 31 set.
func (r *Reader) riceSlow(k uint) uint64 {
	q := r.Unary()
	if q >= 1<<32 {
		return q
	}
	return q<<k | r.Bits(k)
}

// AlignByte skips the bits up to the next byte boundary.
func (r *Reader) AlignByte() {
	if skip := r.n & 7; skip != 0 {
		r.acc <<= skip
		r.n -= skip
	}
}

// Consumed returns the number of bits read so far (zero bits supplied past
// the end count too).
func (r *Reader) Consumed() int {
	return r.pos*8 + r.pad - int(r.n)
}

// Overrun reports whether more bits were read than data holds.
func (r *Reader) Overrun() bool {
	return r.Consumed() > len(r.data)*8
}
