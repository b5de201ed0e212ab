package layer3

import "fmt"

// readSpectrum decodes the Huffman-coded quantised spectrum of one
// granule/channel (ISO/IEC 11172-3 §2.4.1.7 huffmancodebits and §2.4.3.4.4)
// from r, which must stop being read at bit end, into is (576 lines). It
// returns the number of lines that may be non-zero.
func readSpectrum(r *bitReader, g *granule, h Header, end int, is *[576]int) (int, error) {
	bigEnd := 2 * g.bigValues
	var r1, r2 int
	switch {
	case g.windowSwitching && g.blockType == 2:
		r1, r2 = 3*shortBands[h.RateIndex][3], 576
	case g.windowSwitching:
		r1, r2 = longBands[h.RateIndex][8], 576
	default:
		r1 = longBands[h.RateIndex][min(g.region0Count+1, 22)]
		r2 = longBands[h.RateIndex][min(g.region0Count+g.region1Count+2, 22)]
	}
	r1, r2 = min(r1, bigEnd), min(r2, bigEnd)
	bounds := [3]int{r1, r2, bigEnd}
	i := 0
	for region := range 3 {
		t, linbits, err := bigValueTable(g.tableSelect[region])
		if err != nil {
			if i < bounds[region] {
				return 0, err
			}
			continue
		}
		if b := bounds[region]; i < b {
			b += b & 1 // pairs: an odd bound would end with a whole pair
			if t == nil {
				clear(is[i:b])
			} else {
				t.pairs(r, linbits, is[i:b])
			}
			i = b
		}
	}
	if r.bitPos() > end {
		return 0, fmt.Errorf("big_values overrun the granule by %d bits", r.bitPos()-end)
	}
	i = quads(r, g.count1B, is, i, end)
	nonzero := i
	if r.bitPos() > end {
		// The last quadruple ran past the granule: it is not part of it
		// (common decoder practice for damaged or marginal streams).
		nonzero -= 4
	}
	for j := nonzero; j < 576; j++ {
		is[j] = 0
	}
	return nonzero, nil
}
