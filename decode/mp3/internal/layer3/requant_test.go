package layer3

import (
	"math"
	"math/rand/v2"
	"testing"
)

func TestRequantiseMatchesFormula(t *testing.T) {
	// requantise against the formula of ISO/IEC 11172-3 §2.4.3.4.7.1
	// evaluated with math.Pow for every line, for long, short and mixed
	// granules with random gains and scale factors. Tolerance: 4 units in
	// the last place (the table and the formula round differently) [calc].
	rng := rand.New(rand.NewPCG(5, 9))
	for trial := range 300 {
		var g granule
		g.globalGain = int(rng.UintN(256))
		g.sfScale = rng.UintN(2) == 1
		g.preflag = rng.UintN(2) == 1
		switch trial % 3 {
		case 1:
			g.windowSwitching, g.blockType = true, 2
		case 2:
			g.windowSwitching, g.blockType, g.mixed = true, 2, true
		}
		for w := range 3 {
			g.subblockGain[w] = int(rng.UintN(8))
		}
		var sf scaleFactors
		for i := range sf.long {
			sf.long[i] = int(rng.UintN(16))
		}
		for i := range sf.short {
			for w := range 3 {
				sf.short[i][w] = int(rng.UintN(16))
			}
		}
		var is [576]int
		for i := range is {
			v := int(rng.UintN(20))
			if rng.UintN(50) == 0 {
				v = int(rng.UintN(maxQuantised + 1))
			}
			if rng.UintN(2) == 1 {
				v = -v
			}
			is[i] = v
		}
		rate := int(rng.UintN(9))
		nonzero := 4 * int(rng.UintN(145))
		var xr [576]float64
		requantise(&is, nonzero, &g, &sf, rate, &xr)
		mult := 0.5
		if g.sfScale {
			mult = 1
		}
		for i := range 576 {
			want := 0.0
			if i < nonzero {
				var e float64
				short, sfb, w := lineBand(i, &g, rate)
				if short {
					e = float64(g.globalGain-210-8*g.subblockGain[w])/4 - mult*float64(sf.short[sfb][w])
				} else {
					s := sf.long[sfb]
					if g.preflag {
						s += pretab[sfb]
					}
					e = float64(g.globalGain-210)/4 - mult*float64(s)
				}
				want = math.Copysign(math.Pow(math.Abs(float64(is[i])), 4.0/3.0)*math.Pow(2, e), float64(is[i]))
			}
			if d := math.Abs(xr[i] - want); d > 4*math.Abs(want)*0x1p-52 {
				t.Fatalf("trial %d line %d (is %d): got %g, want %g", trial, i, is[i], xr[i], want)
			}
		}
	}
}

// lineBand says which band line i of a granule belongs to, from the band
// tables directly: long band sfb, or short band sfb and window w.
func lineBand(i int, g *granule, rate int) (short bool, sfb, w int) {
	longEnd := 576
	if g.windowSwitching && g.blockType == 2 {
		longEnd = 0
		if g.mixed {
			longEnd = 36
		}
	}
	if i < longEnd {
		for sfb = 0; longBands[rate][sfb+1] <= i; sfb++ {
		}
		return false, sfb, 0
	}
	pos, start := longEnd, 0
	if g.mixed {
		start = 3
	}
	for sfb = start; sfb < 13; sfb++ {
		width := shortBands[rate][sfb+1] - shortBands[rate][sfb]
		if i < pos+3*width {
			return true, sfb, (i - pos) / width
		}
		pos += 3 * width
	}
	return true, 12, 2
}

func TestBandTables(t *testing.T) {
	// Structure of the band tables (ISO/IEC 11172-3 Table 3-B.8): long
	// tables end at 576 lines, short ones at 192 per window; boundaries
	// increase; a mixed block's long part (2 subbands, 36 lines) ends on
	// a long-band boundary (band 8 at MPEG-1 rates, 6 at the lower ones)
	// and on short band 3's (3 × 12 lines), except at 8 kHz.
	for r := range 9 {
		if longBands[r][22] != 576 || shortBands[r][13] != 192 {
			t.Errorf("rate %d: tables end at %d and %d", r, longBands[r][22], shortBands[r][13])
		}
		for i := 1; i < 23; i++ {
			if longBands[r][i] <= longBands[r][i-1] {
				t.Errorf("rate %d: long band %d does not increase", r, i)
			}
		}
		for i := 1; i < 14; i++ {
			if shortBands[r][i] <= shortBands[r][i-1] {
				t.Errorf("rate %d: short band %d does not increase", r, i)
			}
		}
		mixedLong := 8
		if r >= 3 {
			mixedLong = 6
		}
		if r != 8 && (longBands[r][mixedLong] != 36 || 3*shortBands[r][3] != 36) {
			t.Errorf("rate %d: mixed-block boundary at %d / %d, want 36", r, longBands[r][mixedLong], 3*shortBands[r][3])
		}
	}
}
