package layer3

import "fmt"

// mpeg1Slen gives (slen1, slen2), the bits per scale factor of the lower
// and upper bands, for each 4-bit scalefac_compress (ISO/IEC 11172-3
// §2.4.2.7) [memory].
var mpeg1Slen = [16][2]int{
	{0, 0}, {0, 1}, {0, 2}, {0, 3}, {3, 0}, {1, 1}, {1, 2}, {1, 3},
	{2, 1}, {2, 2}, {2, 3}, {3, 1}, {3, 2}, {3, 3}, {4, 2}, {4, 3},
}

// lsfBandCounts is nr_of_sfb_block of ISO/IEC 13818-3 §2.4.3.2 [memory]:
// how many scale factors each of the four slen groups covers, by slen
// table (0–2 plain, 3–5 the intensity-stereo right channel) and block
// kind (long, short, mixed). Short and mixed counts are of values (three
// per short band).
var lsfBandCounts = [6][3][4]int{
	{{6, 5, 5, 5}, {9, 9, 9, 9}, {6, 9, 9, 9}},
	{{6, 5, 7, 3}, {9, 9, 12, 6}, {6, 9, 12, 6}},
	{{11, 10, 0, 0}, {18, 18, 0, 0}, {15, 18, 0, 0}},
	{{7, 7, 7, 0}, {12, 12, 12, 0}, {6, 15, 12, 0}},
	{{6, 6, 6, 3}, {12, 9, 9, 6}, {6, 12, 9, 6}},
	{{8, 8, 5, 0}, {15, 12, 9, 0}, {6, 18, 9, 0}},
}

// scaleFactors holds one channel's scale factors of one granule: long[sfb]
// for long bands, short[sfb][window] for short bands.
type scaleFactors struct {
	long  [22]int
	short [13][3]int
	// maxLong and maxShort are the largest value each scale factor's slen
	// can code, set by readLSF: at the lower sampling frequencies that
	// value in the right channel of an intensity-stereo band means "not
	// intensity coded" (ISO/IEC 13818-3 §2.4.3.2).
	maxLong  [22]int
	maxShort [13][3]int
}

// readMPEG1 reads the MPEG-1 scale factors of granule gr into sf (which
// holds granule 0's values when gr is 1, for the bands scfsi says to
// reuse) and returns the bits read (part2_length).
func readMPEG1(r *bitReader, g *granule, scfsi [4]bool, gr int, sf *scaleFactors) int {
	start := r.bitPos()
	slen1, slen2 := uint(mpeg1Slen[g.sfCompress][0]), uint(mpeg1Slen[g.sfCompress][1])
	if g.windowSwitching && g.blockType == 2 {
		first := 0
		if g.mixed {
			for sfb := range 8 {
				sf.long[sfb] = int(r.read(slen1))
			}
			first = 3
		}
		for sfb := first; sfb < 12; sfb++ {
			k := slen1
			if sfb >= 6 {
				k = slen2
			}
			for w := range 3 {
				sf.short[sfb][w] = int(r.read(k))
			}
		}
		sf.short[12] = [3]int{}
		return r.bitPos() - start
	}
	groups := [5]int{0, 6, 11, 16, 21}
	for grp := range 4 {
		if gr == 1 && scfsi[grp] {
			continue
		}
		k := slen1
		if grp >= 2 {
			k = slen2
		}
		for sfb := groups[grp]; sfb < groups[grp+1]; sfb++ {
			sf.long[sfb] = int(r.read(k))
		}
	}
	sf.long[21] = 0
	return r.bitPos() - start
}

// lsfSlen returns the four slen values, the band-count table and the
// preflag for an MPEG-2 scalefac_compress; intensityRight selects the
// variant for the right channel of an intensity-stereo frame (ISO/IEC
// 13818-3 §2.4.3.2) [memory].
func lsfSlen(sfc int, intensityRight bool) (slen [4]int, table int, preflag bool) {
	if !intensityRight {
		switch {
		case sfc < 400:
			return [4]int{(sfc >> 4) / 5, (sfc >> 4) % 5, (sfc & 15) >> 2, sfc & 3}, 0, false
		case sfc < 500:
			sfc -= 400
			return [4]int{(sfc >> 2) / 5, (sfc >> 2) % 5, sfc & 3, 0}, 1, false
		default:
			sfc -= 500
			return [4]int{sfc / 3, sfc % 3, 0, 0}, 2, true
		}
	}
	isc := sfc >> 1
	switch {
	case isc < 180:
		return [4]int{isc / 36, (isc % 36) / 6, (isc % 36) % 6, 0}, 3, false
	case isc < 244:
		isc -= 180
		return [4]int{(isc % 64) >> 4, (isc % 16) >> 2, isc % 4, 0}, 4, false
	default:
		isc -= 244
		return [4]int{isc / 3, isc % 3, 0, 0}, 5, false
	}
}

// readLSF reads MPEG-2 scale factors into sf and returns the bits read.
// It sets g.preflag from scalefac_compress.
func readLSF(r *bitReader, g *granule, intensityRight bool, sf *scaleFactors) (int, error) {
	start := r.bitPos()
	slen, table, preflag := lsfSlen(g.sfCompress, intensityRight)
	g.preflag = preflag
	kind := 0
	if g.windowSwitching && g.blockType == 2 {
		kind = 1
		if g.mixed {
			kind = 2
		}
	}
	counts := lsfBandCounts[table][kind]
	var values, maxes [39]int
	n := 0
	for i := range 4 {
		if slen[i] > 15 {
			return 0, fmt.Errorf("scale-factor length %d out of range", slen[i])
		}
		for range counts[i] {
			values[n] = int(r.read(uint(slen[i])))
			maxes[n] = 1<<slen[i] - 1
			n++
		}
	}
	*sf = scaleFactors{}
	switch kind {
	case 0:
		copy(sf.long[:21], values[:21])
		copy(sf.maxLong[:21], maxes[:21])
	case 1:
		for i := range min(n, 36) {
			sf.short[i/3][i%3] = values[i]
			sf.maxShort[i/3][i%3] = maxes[i]
		}
	case 2:
		copy(sf.long[:6], values[:6])
		copy(sf.maxLong[:6], maxes[:6])
		for i := 6; i < min(n, 33); i++ {
			v := i - 6
			sf.short[3+v/3][v%3] = values[i]
			sf.maxShort[3+v/3][v%3] = maxes[i]
		}
	}
	return r.bitPos() - start, nil
}
