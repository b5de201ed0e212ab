package bitstream

import (
	"encoding/binary"
	"math/bits"
)

// riceRunGo is the fast loop of Reader.Rice in Go, the twin of the
// assembly kernel (rice_amd64.s) and the kernel itself where there is
// none. It decodes Rice codes with parameter k (1 ≤ k ≤ 26) into dst from
// the accumulator state (acc, n, pos) over data and stops at the first
// code longer than the bits at hand, or when fewer than 32 bits are left
// within eight bytes of the end of data. It returns the codes decoded and
// the new state.
//
// The loop makes no calls, so its state stays in registers. It refills
// only when fewer than 32 bits are left; below k = 27 no code it takes can
// exceed 32 bits, so it checks none.
func riceRunGo(dst []int32, data []byte, acc uint64, n uint, pos int, k uint) (int, uint64, uint, int) {
	right := 63 - k
	i := 0
	for ; i < len(dst); i++ {
		if n < 32 {
			if pos+8 > len(data) {
				break
			}
			acc |= binary.BigEndian.Uint64(data[pos:pos+8:pos+8]) >> n
			pos += int((63 - n) >> 3)
			n |= 56
		}
		lz := uint(bits.LeadingZeros64(acc)) // 64 when acc is 0
		total := lz + 1 + k
		if total > n {
			break
		}
		// acc<<lz starts with the terminating one bit; shifted down it is
		// 2^k plus the k low bits, and (lz-1)<<k takes the 2^k off again.
		v := (uint64(lz)-1)<<k + acc<<(lz&63)>>right
		acc <<= total & 63
		n -= total
		dst[i] = int32(uint32(v>>1)) ^ -int32(uint32(v&1))
	}
	return i, acc, n, pos
}
