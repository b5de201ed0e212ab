package wav

import (
	"math"
	"math/rand/v2"
	"testing"
)

// referenceSample is the plain, one-byte-at-a-time reading of one sample:
// little-endian, 8-bit unsigned with 128 as zero, wider two's complement,
// divided by 2^(bits-1) (Microsoft "Multiple Channel Audio Data and WAVE
// Files" for the layouts; the scaling is common practice, no published
// source).
func referenceSample(b []byte, float bool) float64 {
	var u uint64
	for i := len(b) - 1; i >= 0; i-- {
		u = u<<8 | uint64(b[i])
	}
	bits := 8 * len(b)
	switch {
	case float && bits == 32:
		return float64(math.Float32frombits(uint32(u)))
	case float:
		return math.Float64frombits(u)
	case bits == 8:
		return float64(int(u)-128) / 128
	}
	signed := int64(u<<(64-bits)) >> (64 - bits)
	return math.Ldexp(float64(signed), -(bits - 1))
}

// TestConvertersMatchReference cross-checks every fast kernel against
// referenceSample at awkward lengths around the four-sample step.
func TestConvertersMatchReference(t *testing.T) {
	rng := rand.New(rand.NewPCG(1, 2))
	for _, l := range []sampleLayout{
		{containerBits: 8}, {containerBits: 16}, {containerBits: 24}, {containerBits: 32},
		{containerBits: 32, float: true}, {containerBits: 64, float: true},
	} {
		conv := converterFor(l)
		size := l.containerBits / 8
		for _, n := range []int{0, 1, 2, 3, 4, 5, 7, 8, 9, 13, 1000} {
			raw := make([]byte, n*size)
			for i := range raw {
				raw[i] = byte(rng.Uint32())
			}
			if n > 1 { // most negative and most positive two's-complement codes
				raw[size-1] = 0x80
				for i := size; i < 2*size-1; i++ {
					raw[i] = 0xFF
				}
				raw[2*size-1] = 0x7F
			}
			got := make([]float64, n)
			conv(got, raw)
			for i := range got {
				want := referenceSample(raw[i*size:(i+1)*size], l.float)
				if math.Float64bits(got[i]) != math.Float64bits(want) {
					t.Fatalf("%d-bit float=%v, n=%d, sample %d: got %v, want %v", l.containerBits, l.float, n, i, got[i], want)
				}
			}
		}
	}
}

// TestConvertInt24KernelMatchesGo checks the AVX2 24-bit conversion (where
// this CPU runs it) against the Go loop alone for every length up to 40
// samples and every start offset: the same float64 bits, including the
// most negative and most positive codes.
func TestConvertInt24KernelMatchesGo(t *testing.T) {
	rng := rand.New(rand.NewPCG(3, 4))
	raw := make([]byte, 3*44)
	for i := range raw {
		raw[i] = byte(rng.Uint32())
	}
	copy(raw[3:], []byte{0, 0, 0x80, 0xFF, 0xFF, 0x7F})
	was := useAVX2
	defer func() { useAVX2 = was }()
	for n := range 41 {
		for off := range 4 {
			r := raw[3*off : 3*(off+n)]
			useAVX2 = false
			want := make([]float64, n)
			convertInt24(want, r)
			useAVX2 = was
			got := make([]float64, n)
			convertInt24(got, r)
			for i := range want {
				if math.Float64bits(got[i]) != math.Float64bits(want[i]) || want[i] != referenceSample(r[3*i:3*i+3], false) {
					t.Fatalf("%d samples at offset %d: sample %d is %v, Go %v, reference %v", n, off, i, got[i], want[i], referenceSample(r[3*i:3*i+3], false))
				}
			}
		}
	}
}
