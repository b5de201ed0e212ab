package layer3

import (
	"math"
	"math/rand/v2"
	"testing"
)

// directIMDCT is the defining sum of ISO/IEC 11172-3 §2.4.3.4.10.1.
func directIMDCT(in []float64, n int) []float64 {
	out := make([]float64, n)
	for i := range n {
		for k := range n / 2 {
			out[i] += in[k] * math.Cos(math.Pi/float64(2*n)*float64(2*i+1+n/2)*float64(2*k+1))
		}
	}
	return out
}

func TestIMDCTMatchesDefinition(t *testing.T) {
	// The fast 36- and 12-point IMDCTs against the defining sum, on
	// random lines. Tolerance 1e-12: rounding of 18-term sums [calc].
	rng := rand.New(rand.NewPCG(36, 12))
	for range 300 {
		var in18 [18]float64
		for k := range in18 {
			in18[k] = 2*rng.Float64() - 1
		}
		var out36 [36]float64
		imdct36(&in18, &out36)
		for i, want := range directIMDCT(in18[:], 36) {
			if math.Abs(out36[i]-want) > 1e-12 {
				t.Fatalf("36-point x[%d] = %.15g, definition %.15g", i, out36[i], want)
			}
		}
		var in6 [6]float64
		copy(in6[:], in18[:6])
		var out12 [12]float64
		imdct12(&in6, &out12)
		for i, want := range directIMDCT(in6[:], 12) {
			if math.Abs(out12[i]-want) > 1e-12 {
				t.Fatalf("12-point x[%d] = %.15g, definition %.15g", i, out12[i], want)
			}
		}
	}
}

func TestHybridBlockWindows(t *testing.T) {
	// Windowing per block type against the window definitions of
	// ISO/IEC 11172-3 §2.4.3.4.10.3 written out here case by case, and
	// the short-block overlap (windows at 6, 12, 18) against the direct
	// IMDCT of each window's lines.
	sin36 := func(i int) float64 { return math.Sin(math.Pi / 36 * (float64(i) + 0.5)) }
	sin12 := func(i int) float64 { return math.Sin(math.Pi / 12 * (float64(i) + 0.5)) }
	win := map[int]func(i int) float64{
		0: sin36,
		1: func(i int) float64 {
			switch {
			case i < 18:
				return sin36(i)
			case i < 24:
				return 1
			case i < 30:
				return sin12(i - 18)
			}
			return 0
		},
		3: func(i int) float64 {
			switch {
			case i < 6:
				return 0
			case i < 12:
				return sin12(i - 6)
			case i < 18:
				return 1
			}
			return sin36(i)
		},
	}
	rng := rand.New(rand.NewPCG(1, 3))
	var in [18]float64
	for k := range in {
		in[k] = 2*rng.Float64() - 1
	}
	raw := directIMDCT(in[:], 36)
	for bt, w := range win {
		var out [36]float64
		hybridBlock(&in, bt, &out)
		for i := range 36 {
			if want := raw[i] * w(i); math.Abs(out[i]-want) > 1e-12 {
				t.Fatalf("block type %d sample %d: %.15g, want %.15g", bt, i, out[i], want)
			}
		}
	}
	var want [36]float64
	for w := range 3 {
		lines := make([]float64, 6)
		for i := range 6 {
			lines[i] = in[3*i+w]
		}
		y := directIMDCT(lines, 12)
		for i := range 12 {
			want[6+6*w+i] += y[i] * sin12(i)
		}
	}
	var out [36]float64
	hybridBlock(&in, 2, &out)
	for i := range 36 {
		if math.Abs(out[i]-want[i]) > 1e-12 {
			t.Fatalf("short blocks sample %d: %.15g, want %.15g", i, out[i], want[i])
		}
	}
}

func BenchmarkIMDCT36(b *testing.B) {
	var in [18]float64
	for k := range in {
		in[k] = float64(k) / 18
	}
	var out [36]float64
	for b.Loop() {
		imdct36(&in, &out)
	}
}
