package layer3

import (
	"fmt"
	"strings"
)

// The Layer III Huffman code tables (ISO/IEC 11172-3 Annex B, Table
// 3-B.7), written here as the standard prints them: for each (x, y) pair,
// x-major, the codeword as a bit string; the code length is the string's
// length. Written from memory of the annex [memory], and checked: every
// table is a complete prefix code (Kraft sum exactly 1, no codeword a prefix
// of another: TestHuffmanCodesComplete) and decoding lame's streams ends
// every granule exactly on its part2_3_length (TestGranuleBitsFromLame).
// Neither check would notice two codewords of equal length swapped between
// their values; the differential tests of the assembled decoder will.
//
// Not here: the 16×16 tables 13, 15, 16 (with 24, the base of tables
// 16–31) and 24. They could not be recalled reliably (a recalled table 13
// failed the completeness check), and a table that merely looks right
// would decode garbage silently; a granule that selects one of them is
// reported as unsupported by bigValueTable.
var bigValueCodes = map[int]struct {
	xlen  int
	codes string
}{
	1: {2, "1 001 01 000"},
	2: {3, "1 010 000001 011 001 00001 00011 00010 000000"},
	3: {3, "11 10 000001 001 01 00001 00011 00010 000000"},
	5: {4, "1 010 000110 0000101 011 001 000100 0000100 000111 000101 0000111 00000001 0000110 000001 0000001 00000000"},
	6: {4, "111 011 00101 0000001 110 10 0011 00010 0101 0100 00100 000001 000011 00011 000010 0000000"},
	7: {6, `1 010 001010 00010011 00010000 000001010
		011 0011 000111 0001010 0000101 00000011
		001011 00100 0001101 00010001 00001000 000000100
		0001100 0001011 00010010 000001111 000001011 000000010
		0000111 0000110 00001001 000001110 000000011 0000000001
		00000110 00000100 000000101 0000000011 0000000010 0000000000`},
	8: {6, `11 100 000110 00010010 00001100 000000101
		101 01 0010 00010000 00001001 00000011
		000111 0011 000101 00001110 00000111 000000011
		00010011 00010001 00001111 000001101 000001010 0000000100
		00001101 0000101 00001000 000001011 0000000101 0000000001
		000001100 00000100 000000100 000000001 00000000001 00000000000`},
	9: {6, `111 101 01001 001110 00001111 000000111
		110 100 0101 00101 000110 00000111
		0111 0110 01000 001000 0001000 00000101
		001111 00110 001001 0001010 0000101 00000001
		0001011 000111 0001001 0000110 00000100 000000001
		00001110 0000100 00000110 00000010 000000110 000000000`},
	10: {8, `1 010 001010 00010111 000100011 000011110 000001100 0000010001
		011 0011 001000 0001100 00010010 000010101 00001100 00000111
		001011 001001 0001111 00010101 000100000 0000101000 000010011 000000110
		0001110 0001101 00010110 000100010 0000101110 0000010111 000010010 0000000111
		00010100 00010011 000100001 0000101111 0000011011 0000010110 0000001001 0000000011
		000011111 000010110 0000101001 0000011010 00000010101 00000010100 0000000101 00000000011
		00001110 00001101 000001010 0000001011 0000010000 0000000110 00000000101 00000000001
		000001001 00001000 000000111 0000001000 0000000100 00000000100 00000000010 00000000000`},
	11: {8, `11 101 01010 0011000 00100010 000100001 00010101 000001111
		100 011 0100 001010 00100000 00010001 0001011 00001010
		01011 00111 001101 0010010 00011110 000011111 00010100 00000101
		0011001 001011 0010011 000111011 00011011 0000010010 00001100 000000101
		00100011 00100001 00011111 000111010 000011110 0000010000 000000111 0000000101
		00011100 00011010 000100000 0000010011 0000010001 00000001111 0000001000 00000001110
		00001110 0001100 0001001 00001101 000001110 0000001001 0000000100 0000000001
		00001011 0000100 00000110 000000110 0000000110 0000000011 0000000010 0000000000`},
	12: {8, `1001 110 10000 0100001 00101001 000100111 000100110 000011010
		111 101 0110 01001 0010111 0010000 00011010 00001011
		10001 0111 01011 001110 0010101 00011110 0001010 00000111
		010001 01010 001111 001100 0010010 00011100 00001110 00000101
		0100000 001101 0010110 0010011 00010010 00010000 00001001 000000101
		00101000 0010001 00011111 00011101 00010001 000001101 00000100 000000010
		00011011 0001100 0001011 00001111 00001010 000000111 000000100 0000000001
		000011011 00001100 00001000 000001100 000000110 000000011 000000001 0000000000`},
}

// count1ACodes is count1 table A (Table 3-B.7, "table 32"): the codeword of
// each quadruple v w x y, in the order of the 4-bit value vwxy [memory;
// complete prefix code, TestHuffmanCodesComplete]. Table B ("table 33") is
// the 4-bit complement of vwxy and needs no list.
const count1ACodes = "1 0101 0100 00101 0110 000101 00100 000100 0111 00011 00110 000000 00111 000010 000011 000001"

// linbitsOf is the number of linbits of each big_values table (Table
// 3-B.7 header): tables 16–23 share the codes of table 16, tables 24–31
// those of table 24 [memory].
var linbitsOf = [32]uint{
	16: 1, 17: 2, 18: 3, 19: 4, 20: 6, 21: 8, 22: 10, 23: 13,
	24: 4, 25: 5, 26: 6, 27: 7, 28: 8, 29: 9, 30: 11, 31: 13,
}

// huffTable is a table-driven decoder for one code: a root table indexed
// by the next rootBits bits, whose entries are either a symbol with its
// code length or a pointer to a second-level table for the longer codes.
type huffTable struct {
	lookup   []uint32
	rootBits uint
	xlen     int
}

// Entry layout: leaf = symbol (bits 0–7) | length (bits 8–12); pointer =
// 1<<31 | sub-table bits (bits 24–28) | start index (bits 0–19).
const (
	huffPointer   = 1 << 31
	huffMaxRoot   = 8
	huffLenShift  = 8
	huffSubShift  = 24
	huffIndexMask = 1<<20 - 1
)

// buildHuffman makes the decoder of the space-separated codewords in
// codes, whose i-th codeword stands for symbol i.
func buildHuffman(codes string, xlen int) (*huffTable, error) {
	words := strings.Fields(codes)
	maxLen := 0
	for _, w := range words {
		maxLen = max(maxLen, len(w))
	}
	t := &huffTable{rootBits: uint(min(maxLen, huffMaxRoot)), xlen: xlen}
	root := 1 << t.rootBits
	t.lookup = make([]uint32, root)
	filled := make([]bool, root)
	type long struct {
		sym  int
		word string
	}
	groups := map[int][]long{}
	for sym, w := range words {
		code := 0
		for _, c := range w {
			if c != '0' && c != '1' {
				return nil, fmt.Errorf("codeword %q is not binary", w)
			}
			code = code<<1 | int(c-'0')
		}
		if len(w) <= int(t.rootBits) {
			shift := int(t.rootBits) - len(w)
			for i := code << shift; i < (code+1)<<shift; i++ {
				if filled[i] {
					return nil, fmt.Errorf("codeword %q overlaps another", w)
				}
				filled[i] = true
				t.lookup[i] = uint32(sym) | uint32(len(w))<<huffLenShift
			}
			continue
		}
		prefix := code >> (len(w) - int(t.rootBits))
		groups[prefix] = append(groups[prefix], long{sym, w})
	}
	for prefix, g := range groups {
		if filled[prefix] {
			return nil, fmt.Errorf("long codewords under a short one at prefix %b", prefix)
		}
		filled[prefix] = true
		sub := 0
		for _, l := range g {
			sub = max(sub, len(l.word)-int(t.rootBits))
		}
		start := len(t.lookup)
		t.lookup[prefix] = huffPointer | uint32(sub)<<huffSubShift | uint32(start)
		t.lookup = append(t.lookup, make([]uint32, 1<<sub)...)
		subFilled := make([]bool, 1<<sub)
		for _, l := range g {
			rest := l.word[t.rootBits:]
			code := 0
			for _, c := range rest {
				code = code<<1 | int(c-'0')
			}
			shift := sub - len(rest)
			for i := code << shift; i < (code+1)<<shift; i++ {
				if subFilled[i] {
					return nil, fmt.Errorf("codeword %q overlaps another", l.word)
				}
				subFilled[i] = true
				t.lookup[start+i] = uint32(l.sym) | uint32(len(rest))<<huffLenShift
			}
		}
	}
	return t, nil
}

// decode reads one codeword from r and returns its symbol.
func (t *huffTable) decode(r *bitReader) int {
	e := t.lookup[r.peek(t.rootBits)]
	if e&huffPointer != 0 {
		r.skip(t.rootBits)
		sub := uint(e >> huffSubShift & 31)
		e = t.lookup[int(e&huffIndexMask)+int(r.peek(sub))]
	}
	r.skip(uint(e >> huffLenShift & 31))
	return int(e & 0xFF)
}

var (
	bigValueTables [32]*huffTable
	count1A        *huffTable
)

func init() {
	for n, c := range bigValueCodes {
		t, err := buildHuffman(c.codes, c.xlen)
		if err != nil {
			panic(fmt.Sprintf("layer3: Huffman table %d: %v", n, err))
		}
		bigValueTables[n] = t
	}
	t, err := buildHuffman(count1ACodes, 0)
	if err != nil {
		panic(fmt.Sprintf("layer3: count1 table A: %v", err))
	}
	count1A = t
}

// errTableMissing reports a big_values table this package does not have
// (see bigValueCodes).
type errTableMissing int

func (e errTableMissing) Error() string {
	return fmt.Sprintf("Huffman table %d is not implemented", int(e))
}

// bigValueTable returns the decoder for table_select n: nil for table 0
// (all zero, no bits), an error for the unused tables 4 and 14 and for the
// tables not implemented.
func bigValueTable(n int) (*huffTable, uint, error) {
	switch {
	case n == 0:
		return nil, 0, nil
	case n == 4 || n == 14:
		return nil, 0, fmt.Errorf("table_select %d names an unused Huffman table", n)
	case n >= 16 && n < 24:
		return nil, 0, errTableMissing(16)
	case n >= 24:
		return nil, 0, errTableMissing(24)
	case bigValueTables[n] == nil:
		return nil, 0, errTableMissing(n)
	}
	return bigValueTables[n], linbitsOf[n], nil
}

// pair reads one big_values pair (x, y) with its linbits and sign bits
// (ISO/IEC 11172-3 §2.4.1.7 huffmancodebits).
func (t *huffTable) pair(r *bitReader, linbits uint) (x, y int) {
	v := t.decode(r)
	x, y = v>>4, v&15
	if t.xlen <= 15 {
		x, y = v/t.xlen, v%t.xlen
	}
	if linbits > 0 && x == 15 {
		x += int(r.read(linbits))
	}
	if x != 0 && r.read(1) == 1 {
		x = -x
	}
	if linbits > 0 && y == 15 {
		y += int(r.read(linbits))
	}
	if y != 0 && r.read(1) == 1 {
		y = -y
	}
	return x, y
}

// quad reads one count1 quadruple with table A (tableB false) or B and the
// sign bits of its non-zero values.
func quad(r *bitReader, tableB bool, out *[4]int) {
	var v int
	if tableB {
		v = 15 - int(r.read(4))
	} else {
		v = count1A.decode(r)
	}
	for i := range 4 {
		q := v >> (3 - i) & 1
		if q != 0 && r.read(1) == 1 {
			q = -q
		}
		out[i] = q
	}
}
