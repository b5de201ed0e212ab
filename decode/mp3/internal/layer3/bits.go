package layer3

// bitReader reads big-endian bit fields from a byte slice, MSB first, as
// every field of an MPEG audio frame is stored (ISO/IEC 11172-3 §2.1,
// "bslbf"/"uimsbf"). It keeps up to 64 bits in a register so that a
// Huffman decoder can peek at the next codeword without a loop per bit.
// Reading past the end yields zero bits and sets over; callers check it
// where running out means damage.
type bitReader struct {
	data []byte
	pos  int    // next byte of data to load
	acc  uint64 // bits not yet consumed, left-aligned
	n    uint   // number of valid bits in acc
	used int    // bits consumed so far
	over bool   // a read went past the end of data
}

// reset starts reading b from its first bit.
func (r *bitReader) reset(b []byte) {
	*r = bitReader{data: b}
}

// fill loads whole bytes into acc until it holds at least 57 bits or the
// data ends.
func (r *bitReader) fill() {
	for r.n <= 56 {
		if r.pos < len(r.data) {
			r.acc |= uint64(r.data[r.pos]) << (56 - r.n)
			r.pos++
		}
		// past the end: zero bits (acc is already zero there)
		r.n += 8
	}
}

// peek returns the next k bits (k ≤ 32) without consuming them.
func (r *bitReader) peek(k uint) uint32 {
	if r.n < k {
		r.fill()
	}
	return uint32(r.acc >> (64 - k))
}

// skip consumes k bits (k ≤ 32) that peek has made available.
func (r *bitReader) skip(k uint) {
	if r.n < k {
		r.fill()
	}
	r.acc <<= k
	r.n -= k
	r.used += int(k)
	if r.used > 8*len(r.data) {
		r.over = true
	}
}

// consume drops k bits (k ≤ n) that the caller has cut from acc itself.
func (r *bitReader) consume(k uint) {
	r.acc <<= k
	r.n -= k
	r.used += int(k)
	if r.used > 8*len(r.data) {
		r.over = true
	}
}

// read consumes and returns the next k bits (k ≤ 32).
func (r *bitReader) read(k uint) uint32 {
	if k == 0 {
		return 0
	}
	v := r.peek(k)
	r.skip(k)
	return v
}

// bitPos is the number of bits consumed since reset.
func (r *bitReader) bitPos() int { return r.used }
