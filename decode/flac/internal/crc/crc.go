// Package crc computes the two checksums of a FLAC frame (RFC 9639,
// sections 9.1.8 and 9.3): CRC-8 over the frame header, polynomial
// x^8 + x^2 + x + 1, and CRC-16 over the whole frame, polynomial
// x^16 + x^15 + x^2 + 1. Both start from zero, shift most significant bit
// first and are not reflected or inverted.
//
// The fast versions are table driven: CRC-8 one table lookup per byte,
// CRC-16 "slicing by 16" (sixteen tables, sixteen bytes per step), because the
// CRC-16 runs over every byte of the audio; on amd64 with PCLMULQDQ the bulk
// of a frame is folded 16 bytes at a time by carry-less multiplication
// (fold_amd64.s), the tables finishing. The bit-at-a-time versions
// (Update8Plain, Update16Plain) are the reference the tests cross-check
// them against.
package crc

import "encoding/binary"

const (
	poly8  = 0x07   // x^8 + x^2 + x + 1, the x^8 term implied
	poly16 = 0x8005 // x^16 + x^15 + x^2 + 1, the x^16 term implied
)

var (
	table8  [256]uint8
	table16 [16][256]uint16
)

func init() {
	for b := range 256 {
		table8[b] = Update8Plain(0, []byte{byte(b)})
		table16[0][b] = Update16Plain(0, []byte{byte(b)})
	}
	// table16[k][b] is the CRC of byte b followed by k zero bytes.
	for k := 1; k < 16; k++ {
		for b := range 256 {
			prev := table16[k-1][b]
			table16[k][b] = prev<<8 ^ table16[0][prev>>8]
		}
	}
}

// Update8 returns the CRC-8 of p continued from crc (0 for a new header).
func Update8(crc uint8, p []byte) uint8 {
	for _, b := range p {
		crc = table8[crc^b]
	}
	return crc
}

// Update16 returns the CRC-16 of p continued from crc (0 for a new frame).
// Where the CPU multiplies carry-less (PCLMULQDQ, amd64), the bulk of a
// long p is folded 16 bytes at a time (fold16) and the rest goes through
// the tables.
func Update16(crc uint16, p []byte) uint16 {
	if hasFold && len(p) >= foldMin {
		n := len(p) &^ 15
		var last [16]byte
		fold16(p[:n], crc, &foldKeys, &last)
		return update16Table(0, last[:], p[n:])
	}
	return update16Table(crc, p)
}

// foldMin is the shortest input folded: below it the tables are as fast.
const foldMin = 128

// foldKeys are x^128 mod P and x^192 mod P (P the CRC-16 polynomial): the
// factors that move the low and high 64 bits of a 128-bit remainder 128
// bits further on (see fold16).
var foldKeys = [2]uint64{xPowMod(128), xPowMod(192)}

// xPowMod returns x^n mod P over GF(2), P = x^16 + poly16.
func xPowMod(n int) uint64 {
	r := uint64(1)
	for range n {
		r <<= 1
		if r&0x10000 != 0 {
			r ^= 0x10000 | poly16
		}
	}
	return r
}

// update16Table is Update16 by the tables, over the pieces in turn.
func update16Table(crc uint16, pieces ...[]byte) uint16 {
	for _, p := range pieces {
		crc = update16Slice(crc, p)
	}
	return crc
}

// update16Slice is Update16 by "slicing by 16".
func update16Slice(crc uint16, p []byte) uint16 {
	t := &table16
	for len(p) >= 16 {
		v := binary.BigEndian.Uint64(p)
		w := binary.BigEndian.Uint64(p[8:16])
		x := crc ^ uint16(v>>48)
		crc = t[15][x>>8] ^ t[14][x&0xFF] ^
			t[13][v>>40&0xFF] ^ t[12][v>>32&0xFF] ^
			t[11][v>>24&0xFF] ^ t[10][v>>16&0xFF] ^
			t[9][v>>8&0xFF] ^ t[8][v&0xFF] ^
			t[7][w>>56] ^ t[6][w>>48&0xFF] ^
			t[5][w>>40&0xFF] ^ t[4][w>>32&0xFF] ^
			t[3][w>>24&0xFF] ^ t[2][w>>16&0xFF] ^
			t[1][w>>8&0xFF] ^ t[0][w&0xFF]
		p = p[16:]
	}
	for _, b := range p {
		crc = crc<<8 ^ t[0][byte(crc>>8)^b]
	}
	return crc
}

// Update8Plain is Update8 one bit at a time, straight from the polynomial.
func Update8Plain(crc uint8, p []byte) uint8 {
	for _, b := range p {
		crc ^= b
		for range 8 {
			if crc&0x80 != 0 {
				crc = crc<<1 ^ poly8
			} else {
				crc <<= 1
			}
		}
	}
	return crc
}

// Update16Plain is Update16 one bit at a time, straight from the
// polynomial.
func Update16Plain(crc uint16, p []byte) uint16 {
	for _, b := range p {
		crc ^= uint16(b) << 8
		for range 8 {
			if crc&0x8000 != 0 {
				crc = crc<<1 ^ poly16
			} else {
				crc <<= 1
			}
		}
	}
	return crc
}
