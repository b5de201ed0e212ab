package layer3

import (
	"math/rand/v2"
	"testing"
)

// naiveBits reads bit i of b, MSB first: the definition bitReader must
// match.
func naiveBits(b []byte, at, k int) uint32 {
	var v uint32
	for i := at; i < at+k; i++ {
		bit := uint32(0)
		if i/8 < len(b) {
			bit = uint32(b[i/8]>>(7-i%8)) & 1
		}
		v = v<<1 | bit
	}
	return v
}

func TestBitReaderMatchesDefinition(t *testing.T) {
	rng := rand.New(rand.NewPCG(1, 2))
	b := make([]byte, 300)
	for i := range b {
		b[i] = byte(rng.UintN(256))
	}
	var r bitReader
	r.reset(b)
	at := 0
	for at < 8*len(b)+40 {
		k := int(rng.UintN(33))
		if got, want := r.read(uint(k)), naiveBits(b, at, k); got != want {
			t.Fatalf("bit %d, %d bits: got %#x, want %#x", at, k, got, want)
		}
		at += k
		if r.bitPos() != at {
			t.Fatalf("position %d, want %d", r.bitPos(), at)
		}
		if r.over != (at > 8*len(b)) {
			t.Fatalf("over %v at bit %d of %d", r.over, at, 8*len(b))
		}
	}
}
