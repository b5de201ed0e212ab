package layer3

import (
	"math"
	"math/rand/v2"
	"testing"
)

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
