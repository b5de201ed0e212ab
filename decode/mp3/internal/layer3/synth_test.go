package layer3

import (
	"math"
	"math/rand/v2"
	"testing"
)

// plainSynthesis is the procedure of ISO/IEC 11172-3 §2.4.3.4.10.2 step
// by step, with the defining matrix: the reference the fast synthesis is
// held to.
type plainSynthesis struct{ v [1024]float64 }

func (p *plainSynthesis) run(s *[32]float64, d *[512]float64, out []float64) {
	copy(p.v[64:], p.v[:960])
	for i := range 64 {
		p.v[i] = 0
		for k := range 32 {
			p.v[i] += math.Cos(float64((16+i)*(2*k+1))*math.Pi/64) * s[k]
		}
	}
	var u [512]float64
	for i := range 8 {
		for j := range 32 {
			u[64*i+j] = p.v[128*i+j]
			u[64*i+32+j] = p.v[128*i+96+j]
		}
	}
	for j := range 32 {
		out[j] = 0
		for i := range 16 {
			out[j] += u[j+32*i] * d[j+32*i]
		}
	}
}

func TestSynthesisMatchesProcedure(t *testing.T) {
	// The fast synthesis against the standard's procedure, over 40 blocks
	// (the V buffer wraps more than twice), for random windows: the
	// structure is checked whatever the window's values (the window itself
	// is not in this package yet). Tolerance 1e-11: rounding of the sums
	// [calc].
	rng := rand.New(rand.NewPCG(512, 1024))
	var d [512]float64
	for i := range d {
		d[i] = 2*rng.Float64() - 1
	}
	var fast synthesis
	var plain plainSynthesis
	got, want := make([]float64, 32), make([]float64, 32)
	for block := range 40 {
		var s [32]float64
		for k := range s {
			s[k] = 2*rng.Float64() - 1
		}
		fast.run(&s, &d, got)
		plain.run(&s, &d, want)
		for j := range 32 {
			if math.Abs(got[j]-want[j]) > 1e-11 {
				t.Fatalf("block %d sample %d: %.15g, procedure %.15g", block, j, got[j], want[j])
			}
		}
	}
}

func BenchmarkSynthesis(b *testing.B) {
	var d [512]float64
	for i := range d {
		d[i] = float64(i%7) / 7
	}
	var f synthesis
	var s [32]float64
	out := make([]float64, 32)
	for b.Loop() {
		f.run(&s, &d, out)
	}
}

// TestSynthSumKernelTwins holds the synthesis sums of the kernel this
// machine runs (AVX2 where it has it) to the Go loop, bit for bit, for
// every position of the ring and random values (including signed zeros
// and values far apart in size, where a different order of additions
// would show).
func TestSynthSumKernelTwins(t *testing.T) {
	rng := rand.New(rand.NewPCG(32, 16))
	var d [512]float64
	for i := range d {
		d[i] = (2*rng.Float64() - 1) * math.Ldexp(1, rng.IntN(40)-20)
	}
	var v [16][64]float64
	for trial := range 64 {
		for b := range v {
			for i := range v[b] {
				switch rng.IntN(8) {
				case 0:
					v[b][i] = math.Copysign(0, rng.Float64()-0.5)
				default:
					v[b][i] = (2*rng.Float64() - 1) * math.Ldexp(1, rng.IntN(60)-30)
				}
			}
		}
		newest := trial & 15
		var want, got [32]float64
		synthSum(&v, newest, &d, &want)
		if !synthSumFast(&v, newest, &d, &got) {
			t.Skip("no synthesis kernel on this build or CPU: the Go loop is the only path")
		}
		for j := range 32 {
			if math.Float64bits(got[j]) != math.Float64bits(want[j]) {
				t.Fatalf("trial %d (newest %d) output %d: kernel %b, Go %b", trial, newest, j, got[j], want[j])
			}
		}
	}
}
