package layer3

import (
	"math/big"
	"math/rand/v2"
	"strings"
	"testing"
)

func TestHuffmanCodesComplete(t *testing.T) {
	// A Huffman code built for a source is complete: the Kraft sum
	// Σ 2^-len is exactly 1 and no codeword is a prefix of another
	// (handbook fact of prefix codes; Kraft–McMillan). A mistyped or
	// misremembered codeword breaks one of the two. The count of codewords
	// is xlen² (count1 A: 16).
	check := func(name string, codes string, want int) {
		words := strings.Fields(codes)
		if len(words) != want {
			t.Errorf("%s: %d codewords, want %d", name, len(words), want)
		}
		sum := new(big.Rat)
		for i, a := range words {
			sum.Add(sum, new(big.Rat).SetFrac64(1, 1<<len(a)))
			for j, b := range words {
				if i != j && strings.HasPrefix(b, a) {
					t.Errorf("%s: codeword %d (%s) is a prefix of codeword %d (%s)", name, i, a, j, b)
				}
			}
		}
		if sum.Cmp(big.NewRat(1, 1)) != 0 {
			t.Errorf("%s: Kraft sum %s, want 1", name, sum.FloatString(8))
		}
	}
	for n, c := range bigValueCodes {
		check("table "+itoa(n), c.codes, c.xlen*c.xlen)
	}
	check("count1 A", count1ACodes, 16)
}

func itoa(n int) string {
	if n < 10 {
		return string(rune('0' + n))
	}
	return itoa(n/10) + string(rune('0'+n%10))
}

// bitWriter appends bits MSB first, to build test streams.
type bitWriter struct {
	b []byte
	n int
}

func (w *bitWriter) bits(s string) {
	for _, c := range s {
		if w.n%8 == 0 {
			w.b = append(w.b, 0)
		}
		if c == '1' {
			w.b[len(w.b)-1] |= 0x80 >> (w.n % 8)
		}
		w.n++
	}
}

func (w *bitWriter) value(v uint32, k int) {
	for i := k - 1; i >= 0; i-- {
		if v>>i&1 == 1 {
			w.bits("1")
		} else {
			w.bits("0")
		}
	}
}

func TestHuffmanDecodesWhatIsWritten(t *testing.T) {
	// The table-driven decoder against the codeword lists themselves: a
	// random sequence of pairs written with the listed codewords (plus
	// sign bits) reads back exactly, for every table and for count1 A/B.
	// This checks the decoder's construction, not the tables' contents
	// (TestGranuleBitsFromLame does that).
	rng := rand.New(rand.NewPCG(3, 11))
	for n := 1; n < 32; n++ {
		if n == 4 || n == 14 {
			continue
		}
		base := n
		switch {
		case n >= 24:
			base = 24
		case n >= 16:
			base = 16
		}
		c := bigValueCodes[base]
		words := strings.Fields(c.codes)
		tab, linbits, err := bigValueTable(n)
		if err != nil {
			t.Fatal(err)
		}
		var w bitWriter
		var want [][2]int
		// value writes the linbits (for 15, in tables with linbits) and
		// the sign of one coded magnitude v, returning the signed value.
		value := func(v int) int {
			if linbits > 0 && v == 15 {
				ext := int(rng.UintN(1 << linbits))
				w.value(uint32(ext), int(linbits))
				v += ext
			}
			if v == 0 {
				return 0
			}
			if rng.UintN(2) == 1 {
				w.bits("1")
				return -v
			}
			w.bits("0")
			return v
		}
		for range 2000 {
			x, y := int(rng.UintN(uint(c.xlen))), int(rng.UintN(uint(c.xlen)))
			w.bits(words[x*c.xlen+y])
			sx := value(x)
			sy := value(y)
			want = append(want, [2]int{sx, sy})
		}
		var r bitReader
		r.reset(w.b)
		for i, p := range want {
			if x, y := tab.pair(&r, linbits); x != p[0] || y != p[1] {
				t.Fatalf("table %d pair %d: got (%d, %d), want (%d, %d)", n, i, x, y, p[0], p[1])
			}
		}
		if r.bitPos() != w.n {
			t.Errorf("table %d: read %d bits, wrote %d", n, r.bitPos(), w.n)
		}
	}
	a := strings.Fields(count1ACodes)
	for _, tableB := range []bool{false, true} {
		var w bitWriter
		var want []int
		for range 2000 {
			v := int(rng.UintN(16))
			if tableB {
				w.value(uint32(15-v), 4)
			} else {
				w.bits(a[v])
			}
			for i := range 4 {
				if v>>(3-i)&1 == 1 {
					w.bits("0")
				}
			}
			want = append(want, v)
		}
		var r bitReader
		r.reset(w.b)
		var q [4]int
		for i, v := range want {
			quad(&r, tableB, &q)
			got := q[0]<<3 | q[1]<<2 | q[2]<<1 | q[3]
			if got != v {
				t.Fatalf("count1 table B=%v quad %d: got %04b, want %04b", tableB, i, got, v)
			}
		}
	}
	if _, _, err := bigValueTable(4); err == nil {
		t.Error("unused table 4 accepted")
	}
}
