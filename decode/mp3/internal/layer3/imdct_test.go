package layer3

import (
	"math"
	"math/cmplx"
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

// w9[k] = e^(−2πik/9) and tw18 the twiddles of the 18-point DCT-IV of the
// factorised 36-point IMDCT below.
var (
	w9   [9]complex128
	tw18 = newTwiddles(18)
)

func init() {
	for k := range 9 {
		w9[k] = cmplx.Exp(complex(0, -2*math.Pi*float64(k)/9))
	}
}

// The 36-point IMDCT as a DCT-IV of 18 points through a 9-point complex DFT
// computed as 3 × 3 (Cooley–Tukey): the decoder's long-block transform
// before the windowed matrix product, kept as a second, independent form
// the matrix is checked against.

// dft9 transforms t in place as 3 × 3: n = 3n1 + n2, k = k1 + 3k2.
func dft9(t *[9]complex128) {
	var a [3][3]complex128 // a[n2][k1]
	for n2 := range 3 {
		a[n2][0], a[n2][1], a[n2][2] = dft3(t[n2], t[3+n2], t[6+n2])
		a[n2][1] *= w9[n2]
		a[n2][2] *= w9[2*n2]
	}
	for k1 := range 3 {
		t[k1], t[k1+3], t[k1+6] = dft3(a[0][k1], a[1][k1], a[2][k1])
	}
}

// dct4of18 sets u to the DCT-IV of the 18 values x.
func dct4of18(x *[18]float64, u *[18]float64) {
	var t [9]complex128
	for m := range 9 {
		t[m] = complex(x[2*m], x[17-2*m]) * tw18.pre[m]
	}
	dft9(&t)
	for k := range 9 {
		y := t[k] * tw18.post[k]
		u[2*k], u[17-2*k] = real(y), -imag(y)
	}
}

// imdct36 sets out to the 36-point IMDCT of the 18 lines in.
func imdct36(in *[18]float64, out *[36]float64) {
	var u [18]float64
	dct4of18(in, &u)
	for i := range 9 {
		out[i] = u[i+9]
	}
	for i := 9; i < 27; i++ {
		out[i] = -u[26-i]
	}
	for i := 27; i < 36; i++ {
		out[i] = -u[i-27]
	}
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

// TestIMDCTLongMatchesFactorised holds the windowed matrix IMDCT of the
// long block types to the window times the factorised IMDCT, on random
// lines. Tolerance 1e-12: rounding of 18-term sums [calc].
func TestIMDCTLongMatchesFactorised(t *testing.T) {
	rng := rand.New(rand.NewPCG(18, 36))
	for range 300 {
		var in [18]float64
		for k := range in {
			in[k] = 2*rng.Float64() - 1
		}
		var plain [36]float64
		imdct36(&in, &plain)
		for _, bt := range []int{0, 1, 3} {
			var got [36]float64
			imdctLong(&in, &longIMDCT[bt], &got)
			for i := range 36 {
				if want := plain[i] * windows[bt][i]; math.Abs(got[i]-want) > 1e-12 {
					t.Fatalf("block type %d x[%d] = %.15g, factorised %.15g", bt, i, got[i], want)
				}
			}
		}
	}
}

// TestIMDCTLongKernelTwins holds the long-block IMDCT of the kernel this
// machine runs (AVX2 where it has it) to the Go loop, bit for bit, on
// random lines of very different sizes and signed zeros.
func TestIMDCTLongKernelTwins(t *testing.T) {
	rng := rand.New(rand.NewPCG(36, 18))
	for trial := range 200 {
		var in [18]float64
		for k := range in {
			if rng.IntN(6) == 0 {
				in[k] = math.Copysign(0, rng.Float64()-0.5)
				continue
			}
			in[k] = (2*rng.Float64() - 1) * math.Ldexp(1, rng.IntN(60)-30)
		}
		bt := []int{0, 1, 3}[trial%3]
		var want, got [36]float64
		imdctLong(&in, &longIMDCT[bt], &want)
		if !imdctLongFast(&in, &longIMDCT[bt], &got) {
			t.Skip("no IMDCT kernel on this build or CPU: the Go loop is the only path")
		}
		for i := range 36 {
			if math.Float64bits(got[i]) != math.Float64bits(want[i]) {
				t.Fatalf("trial %d block type %d x[%d]: kernel %b, Go %b", trial, bt, i, got[i], want[i])
			}
		}
	}
}
