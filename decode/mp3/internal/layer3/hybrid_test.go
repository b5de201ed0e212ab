package layer3

import (
	"math"
	"math/rand/v2"
	"testing"
)

func randomLines(rng *rand.Rand) [576]float64 {
	var xr [576]float64
	for i := range xr {
		xr[i] = 2*rng.Float64() - 1
	}
	return xr
}

func energy(x []float64) float64 {
	s := 0.0
	for _, v := range x {
		s += v * v
	}
	return s
}

func TestMidSide(t *testing.T) {
	// L = (M+S)/√2, R = (M−S)/√2 (§2.4.3.4.9.2), an orthonormal rotation:
	// the pair's energy is kept (to rounding) and M = S = 1 gives L = √2.
	rng := rand.New(rand.NewPCG(2, 2))
	m, s := randomLines(rng), randomLines(rng)
	before := energy(m[:]) + energy(s[:])
	m0, s0 := m, s
	midSide(&m, &s, 576)
	if after := energy(m[:]) + energy(s[:]); math.Abs(after-before) > 1e-9*before {
		t.Errorf("energy %g → %g", before, after)
	}
	for i := range 576 {
		if math.Abs(m[i]-(m0[i]+s0[i])/math.Sqrt2) > 1e-15 || math.Abs(s[i]-(m0[i]-s0[i])/math.Sqrt2) > 1e-15 {
			t.Fatalf("line %d: (%g, %g) from (%g, %g)", i, m[i], s[i], m0[i], s0[i])
		}
	}
}

func TestReorderIsTheDefinedPermutation(t *testing.T) {
	// Each coded short line (band sfb, window w, frequency f within the
	// window) must land at subband f/6, position 3·(f%6) + w; every line
	// exactly once. Checked for pure and mixed short blocks at all rates.
	for rate := range 9 {
		for _, mixed := range []bool{false, true} {
			if mixed && rate == 8 {
				continue // 8 kHz: mixed boundary is not at 36 lines
			}
			g := granule{windowSwitching: true, blockType: 2, mixed: mixed}
			var xr [576]float64
			for i := range xr {
				xr[i] = float64(i + 1)
			}
			reorder(&xr, &g, rate)
			seen := map[float64]bool{}
			for _, v := range xr {
				if seen[v] {
					t.Fatalf("rate %d mixed %v: line %g twice", rate, mixed, v)
				}
				seen[v] = true
			}
			pos, first := 0, 0
			if mixed {
				pos, first = 36, 3
				for i := range 36 {
					if xr[i] != float64(i+1) {
						t.Fatalf("mixed: long line %d moved", i)
					}
				}
			}
			for sfb := first; sfb < 13; sfb++ {
				for w := range 3 {
					for f := shortBands[rate][sfb]; f < shortBands[rate][sfb+1]; f++ {
						if got := xr[18*(f/6)+3*(f%6)+w]; got != float64(pos+1) {
							t.Fatalf("rate %d sfb %d window %d f %d: got coded line %g, want %d", rate, sfb, w, f, got-1, pos)
						}
						pos++
					}
				}
			}
		}
	}
}

func TestAliasReduction(t *testing.T) {
	// The butterflies are rotations (cs² + ca² = 1): energy is kept; they
	// touch 8 lines on each side of every subband boundary and nothing
	// else; short blocks are left alone, mixed blocks only between
	// subbands 0 and 1 (§2.4.3.4.10).
	for i, c := range aliasC {
		if d := aliasCS[i]*aliasCS[i] + aliasCA[i]*aliasCA[i]; math.Abs(d-1) > 1e-15 || math.Abs(aliasCA[i]/aliasCS[i]-c) > 1e-15 {
			t.Errorf("coefficient %d: cs²+ca² = %g, ca/cs = %g (c = %g)", i, d, aliasCA[i]/aliasCS[i], c)
		}
	}
	rng := rand.New(rand.NewPCG(8, 8))
	xr := randomLines(rng)
	orig := xr
	long := granule{}
	aliasReduce(&xr, &long)
	if math.Abs(energy(xr[:])-energy(orig[:])) > 1e-9*energy(orig[:]) {
		t.Error("long block: energy changed")
	}
	for i := range 576 {
		d := i % 18
		touched := d < 8 && i >= 18 || d >= 10 && i < 558
		if !touched && xr[i] != orig[i] {
			t.Fatalf("line %d changed though no butterfly reaches it", i)
		}
	}
	// One butterfly written out: boundary 1, i = 0: lines 17 and 18.
	if want := orig[17]*aliasCS[0] - orig[18]*aliasCA[0]; xr[17] != want {
		t.Errorf("line 17: %g, want %g", xr[17], want)
	}
	short := granule{windowSwitching: true, blockType: 2}
	xs := orig
	aliasReduce(&xs, &short)
	if xs != orig {
		t.Error("short block changed by alias reduction")
	}
	mixed := granule{windowSwitching: true, blockType: 2, mixed: true}
	xm := orig
	aliasReduce(&xm, &mixed)
	for i := 36; i < 576; i++ {
		if xm[i] != orig[i] {
			t.Fatalf("mixed block: line %d beyond subband 1 changed", i)
		}
	}
}

func TestHybridOverlapAndInversion(t *testing.T) {
	// Two granules through hybrid against hybridBlock and the definition
	// of overlap-add and frequency inversion: sample t of subband sb is
	// this granule's block[t] plus the previous block[18+t], negated when
	// both sb and t are odd.
	rng := rand.New(rand.NewPCG(4, 4))
	var overlap [32][18]float64
	var prev [32][36]float64
	for _, g := range []granule{{}, {windowSwitching: true, blockType: 2, mixed: true}} {
		xr := randomLines(rng)
		var out [18][32]float64
		hybrid(&xr, &g, &overlap, &out)
		for sb := range 32 {
			bt := 0
			if g.windowSwitching && !(g.mixed && sb < 2) {
				bt = g.blockType
			}
			var in [18]float64
			copy(in[:], xr[18*sb:])
			var block [36]float64
			hybridBlock(&in, bt, &block)
			for tt := range 18 {
				want := block[tt] + prev[sb][18+tt]
				if sb%2 == 1 && tt%2 == 1 {
					want = -want
				}
				if math.Abs(out[tt][sb]-want) > 1e-12 {
					t.Fatalf("subband %d sample %d: %g, want %g", sb, tt, out[tt][sb], want)
				}
			}
			prev[sb] = block
		}
	}
}
