package layer3

import (
	"math"
	"math/rand/v2"
	"testing"
)

// Lee's even/odd recursive factorisation of the 32-point DCT-II (80
// multiplications), the second form dct32 is checked against.

// dctScale[level][k] = 1 / (2 cos(π(2k + 1)/(2n))) for n = 32 >> level.
var dctScale [5][16]float64

func init() {
	for level := range 5 {
		n := 32 >> level
		for k := range n / 2 {
			dctScale[level][k] = 1 / (2 * math.Cos(math.Pi*float64(2*k+1)/float64(2*n)))
		}
	}
}

// leeDCT32 replaces x with its unnormalised DCT-II: x[m] = Σ x[k]
// cos(πm(2k + 1)/64). Each level of Lee's recursion has its own function
// on fixed-size arrays, so that the compiler drops the bounds checks.
func leeDCT32(x *[32]float64) {
	var a, b [16]float64
	sc := &dctScale[0]
	for k := range 16 {
		u, v := x[k], x[31-k]
		a[k] = u + v
		b[k] = (u - v) * sc[k]
	}
	dct16(&a, 1)
	dct16(&b, 1)
	for m := range 15 {
		x[2*m] = a[m]
		x[2*m+1] = b[m] + b[m+1]
	}
	x[30], x[31] = a[15], b[15]
}

func dct16(x *[16]float64, level int) {
	var a, b [8]float64
	sc := &dctScale[level]
	for k := range 8 {
		u, v := x[k], x[15-k]
		a[k] = u + v
		b[k] = (u - v) * sc[k]
	}
	dct8(&a, level+1)
	dct8(&b, level+1)
	for m := range 7 {
		x[2*m] = a[m]
		x[2*m+1] = b[m] + b[m+1]
	}
	x[14], x[15] = a[7], b[7]
}

func dct8(x *[8]float64, level int) {
	var a, b [4]float64
	sc := &dctScale[level]
	for k := range 4 {
		u, v := x[k], x[7-k]
		a[k] = u + v
		b[k] = (u - v) * sc[k]
	}
	dct4(&a, level+1)
	dct4(&b, level+1)
	for m := range 3 {
		x[2*m] = a[m]
		x[2*m+1] = b[m] + b[m+1]
	}
	x[6], x[7] = a[3], b[3]
}

func dct4(x *[4]float64, level int) {
	sc := &dctScale[level]
	a0, a1 := x[0]+x[3], x[1]+x[2]
	b0, b1 := (x[0]-x[3])*sc[0], (x[1]-x[2])*sc[1]
	s2 := dctScale[level+1][0]
	// the two 2-point DCTs
	a0, a1 = a0+a1, (a0-a1)*s2
	b0, b1 = b0+b1, (b0-b1)*s2
	x[0] = a0
	x[1] = b0 + b1
	x[2] = a1
	x[3] = b1
}

// TestDCT32MatchesLee holds the DCT-II product, for every count of
// non-zero leading samples, to Lee's factorisation. Tolerance 1e-12:
// rounding of 32-term sums [calc].
func TestDCT32MatchesLee(t *testing.T) {
	rng := rand.New(rand.NewPCG(80, 32))
	for trial := range 320 {
		n := trial%32 + 1
		var s [32]float64
		for k := range n {
			s[k] = 2*rng.Float64() - 1
		}
		want := s
		leeDCT32(&want)
		var got [32]float64
		dct32(&s, n, &got)
		for m := range 32 {
			if math.Abs(got[m]-want[m]) > 1e-12 {
				t.Fatalf("n %d: C[%d] = %.15g, Lee %.15g", n, m, got[m], want[m])
			}
		}
	}
}

// TestMatrixKernelTwins holds the matrixing of the kernel this machine
// runs (AVX2 where it has it: the DCT and the V layout in one) to the Go
// path, bit for bit, for every n.
func TestMatrixKernelTwins(t *testing.T) {
	rng := rand.New(rand.NewPCG(32, 80))
	for trial := range 320 {
		n := trial%32 + 1
		var s [32]float64
		for k := range n {
			if rng.IntN(6) == 0 {
				s[k] = math.Copysign(0, rng.Float64()-0.5)
				continue
			}
			s[k] = (2*rng.Float64() - 1) * math.Ldexp(1, rng.IntN(60)-30)
		}
		var want, got [64]float64
		matrixGo(&s, n, &want)
		if !matrixFast(&s, n, &got) {
			t.Skip("no matrixing kernel on this build or CPU: the Go path is the only one")
		}
		for i := range 64 {
			if math.Float64bits(got[i]) != math.Float64bits(want[i]) {
				t.Fatalf("n %d V[%d]: kernel %b, Go %b", n, i, got[i], want[i])
			}
		}
	}
}

func TestMatrixMatchesDefinition(t *testing.T) {
	// The fast matrixing against the 64×32 matrix product that defines it
	// (ISO/IEC 11172-3 §2.4.3.4.10.2: N[i][k] = cos((16+i)(2k+1)π/64)),
	// on random subband samples. Tolerance 1e-12 of the input's scale:
	// rounding of a 32-term sum [calc].
	rng := rand.New(rand.NewPCG(32, 64))
	for range 200 {
		var s [32]float64
		for k := range s {
			s[k] = 2*rng.Float64() - 1
		}
		var v [64]float64
		matrix(&s, &v)
		for i := range 64 {
			want := 0.0
			for k := range 32 {
				want += math.Cos(float64((16+i)*(2*k+1))*math.Pi/64) * s[k]
			}
			if math.Abs(v[i]-want) > 1e-12 {
				t.Fatalf("V[%d] = %.15g, definition %.15g", i, v[i], want)
			}
		}
	}
}

func BenchmarkMatrix(b *testing.B) {
	var s [32]float64
	for k := range s {
		s[k] = float64(k) / 32
	}
	var v [64]float64
	for b.Loop() {
		matrix(&s, &v)
	}
}
