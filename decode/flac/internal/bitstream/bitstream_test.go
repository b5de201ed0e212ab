package bitstream

import (
	"math/rand/v2"
	"testing"
)

// writer packs fields most significant bit first, one bit at a time: the
// plain reference the Reader is checked against.
type writer struct {
	buf  []byte
	bits int
}

func (w *writer) put(v uint64, k uint) {
	for i := int(k) - 1; i >= 0; i-- {
		if w.bits%8 == 0 {
			w.buf = append(w.buf, 0)
		}
		if v>>uint(i)&1 != 0 {
			w.buf[len(w.buf)-1] |= 0x80 >> (w.bits % 8)
		}
		w.bits++
	}
}

func (w *writer) unary(q int) {
	for range q {
		w.put(0, 1)
	}
	w.put(1, 1)
}

// rice writes v folded (0, -1, 1, -2 … → 0, 1, 2, 3 …) with parameter k.
func (w *writer) rice(v int32, k uint) {
	u := uint64(uint32(v<<1) ^ uint32(v>>31))
	w.unary(int(u >> k))
	w.put(u&(1<<k-1), k)
}

func TestFieldsRoundTrip(t *testing.T) {
	rng := rand.New(rand.NewPCG(3, 4))
	type field struct {
		k      uint
		v      uint64
		signed bool
		unary  bool
	}
	var w writer
	var fields []field
	for range 5000 {
		f := field{k: uint(rng.IntN(57))}
		switch rng.IntN(3) {
		case 0:
			f.v = rng.Uint64() & (1<<f.k - 1)
			w.put(f.v, f.k)
		case 1:
			f.signed = true
			f.v = rng.Uint64() & (1<<f.k - 1)
			w.put(f.v, f.k)
		default:
			f.unary = true
			f.v = uint64(rng.IntN(200))
			w.unary(int(f.v))
		}
		fields = append(fields, f)
	}
	var r Reader
	r.Reset(w.buf)
	for i, f := range fields {
		switch {
		case f.unary:
			if got := r.Unary(); got != f.v {
				t.Fatalf("field %d: unary %d, want %d", i, got, f.v)
			}
		case f.signed:
			want := int64(f.v<<(64-f.k)) >> (64 - f.k)
			if f.k == 0 {
				want = 0
			}
			if got := r.Signed(f.k); got != want {
				t.Fatalf("field %d: signed %d bits %d, want %d", i, f.k, got, want)
			}
		default:
			if got := r.Bits(f.k); got != f.v {
				t.Fatalf("field %d: %d bits %#x, want %#x", i, f.k, got, f.v)
			}
		}
	}
	if r.Consumed() != w.bits || r.Overrun() {
		t.Errorf("consumed %d bits of %d, overrun %v", r.Consumed(), w.bits, r.Overrun())
	}
	r.Bits(9)
	if !r.Overrun() {
		t.Error("reading past the end is not reported")
	}
}

func TestRice(t *testing.T) {
	rng := rand.New(rand.NewPCG(5, 6))
	for _, k := range []uint{0, 1, 4, 13, 29, 30} {
		for _, n := range []int{0, 1, 7, 100, 4096} {
			want := make([]int32, n)
			var w writer
			w.put(5, 3) // misalign the start
			for i := range want {
				// Mostly small values with a long quotient now and then.
				span := int64(1) << min(k+2, 31)
				if rng.IntN(50) == 0 {
					span <<= 0
					want[i] = int32(rng.Int64N(span*70+1) - span*35)
				} else {
					want[i] = int32(rng.Int64N(2*span) - span)
				}
				if uint64(uint32(want[i]<<1)^uint32(want[i]>>31))>>k > 5000 {
					want[i] = 0
				}
				w.rice(want[i], k)
			}
			w.put(0x2A, 7)
			var r Reader
			r.Reset(w.buf)
			r.Bits(3)
			got := make([]int32, n)
			if !r.Rice(got, k) {
				t.Fatalf("k %d n %d: reported a value over 32 bits", k, n)
			}
			for i := range want {
				if got[i] != want[i] {
					t.Fatalf("k %d n %d: residual %d = %d, want %d", k, n, i, got[i], want[i])
				}
			}
			if v := r.Bits(7); v != 0x2A || r.Overrun() {
				t.Fatalf("k %d n %d: trailer %#x, overrun %v", k, n, v, r.Overrun())
			}
		}
	}
}

func TestRiceTooWide(t *testing.T) {
	// With k = 30 a quotient of 4 is a code of 4<<30 = 2^32: 33 bits.
	var w writer
	w.unary(3)
	w.put(0, 30) // 3<<30: still 32 bits
	w.unary(4)
	w.put(0, 30)
	var r Reader
	r.Reset(w.buf)
	dst := make([]int32, 2)
	if !r.Rice(dst[:1], 30) {
		t.Fatal("a 32-bit code reported too wide")
	}
	if r.Rice(dst[1:], 30) {
		t.Error("a 33-bit code not reported")
	}
}

func TestPastTheEnd(t *testing.T) {
	var r Reader
	r.Reset([]byte{0, 0, 0})
	if q := r.Unary(); q < 24 || !r.Overrun() {
		t.Errorf("unary over zeros = %d, overrun %v; want at least 24, true", q, r.Overrun())
	}
	r.Reset([]byte{0xFF})
	dst := make([]int32, 100)
	r.Rice(dst, 3) // must terminate
	if !r.Overrun() {
		t.Error("overrun not reported")
	}
}

func TestAlignByte(t *testing.T) {
	var r Reader
	r.Reset([]byte{0xA0, 0xBC, 0xDE, 1, 2, 3, 4, 5, 6, 7, 8, 9})
	r.Bits(3)
	r.AlignByte()
	if v := r.Bits(8); v != 0xBC {
		t.Errorf("after aligning: %#x, want 0xBC", v)
	}
	r.AlignByte() // already aligned: nothing skipped
	if v := r.Bits(8); v != 0xDE || r.Consumed() != 24 {
		t.Errorf("%#x at bit %d, want 0xDE at 24", v, r.Consumed())
	}
}

// BenchmarkRice decodes 64 Ki residuals coded with k = 10 (values typical
// of 24-bit programme residuals) in partitions of 256.
func BenchmarkRice(b *testing.B) {
	rng := rand.New(rand.NewPCG(9, 9))
	var w writer
	want := make([]int32, 1<<16)
	for i := range want {
		want[i] = int32(rng.NormFloat64() * 1500)
		w.rice(want[i], 10)
	}
	dst := make([]int32, 256)
	b.SetBytes(int64(len(want)) * 4)
	for b.Loop() {
		var r Reader
		r.Reset(w.buf)
		for range len(want) / len(dst) {
			r.Rice(dst, 10)
		}
	}
}
