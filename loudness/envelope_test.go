package loudness

import (
	"math"
	"testing"
)

// TestEnvelopeMatchesConvolution checks Envelope against the plain Annex 2
// convolution of Annex2Phases, window by window, and its maximum against
// Peak on the same stream, at awkward lengths and write sizes.
func TestEnvelopeMatchesConvolution(t *testing.T) {
	if tp, err := NewTruePeak4x(192000); err != nil || tp.Factor() != 4 {
		t.Fatalf("NewTruePeak4x(192000): %v, factor %v", err, tp)
	}
	for _, rate := range []int{48000, 96000, 192000} {
		f := OversamplingFactor(rate)
		phases := Annex2Phases()
		use := map[int][]int{4: {0, 1, 2, 3}, 2: {0, 2}}[f]
		for _, n := range []int{0, 1, 11, 12, 1023, 1024, 1025, 4801} {
			x := musicLike(uint64(n)+9, n, rate)
			for _, step := range []int{1, 7, 1024, 5000} {
				tp, _ := NewTruePeak(rate)
				got := make([]float64, n)
				for i := 0; i < n; i += step {
					j := min(i+step, n)
					tp.Envelope(got[i:j], x[i:j])
				}
				pk := 0.0
				for i := range n {
					want := 0.0
					if f == 1 {
						want = math.Abs(x[i])
					}
					for _, k := range use {
						y := 0.0
						for tap := range 12 {
							if i-tap >= 0 {
								y += phases[k][tap] * x[i-tap]
							}
						}
						want = max(want, math.Abs(y))
					}
					// Summation order differs (folded vs direct): 1e-12 of
					// full scale, far below any level that matters.
					if math.Abs(got[i]-want) > 1e-12 {
						t.Fatalf("rate %d n %d step %d: envelope[%d] = %v, convolution %v", rate, n, step, i, got[i], want)
					}
					pk = max(pk, got[i])
				}
				// EnvelopeOver agrees wherever a value exceeds its floor
				// and stays at or below the floor elsewhere.
				floor := pk * 0.7
				over, _ := NewTruePeak(rate)
				fast := make([]float64, n)
				for i := 0; i < n; i += step {
					j := min(i+step, n)
					over.EnvelopeOver(fast[i:j], x[i:j], floor)
				}
				for i := range n {
					if (got[i] > floor && fast[i] != got[i]) || (got[i] <= floor && fast[i] > floor) {
						t.Fatalf("rate %d n %d step %d: EnvelopeOver[%d] = %v, exact %v, floor %v", rate, n, step, i, fast[i], got[i], floor)
					}
				}
				ref, _ := NewTruePeak(rate)
				// Peak's interpolator is float32: peak32Error more.
				if p := ref.Peak(x, 0); math.Abs(p-pk) > 1e-12+truePeakTolerance(x, rate, pk) {
					t.Errorf("rate %d n %d: max envelope %v, Peak %v", rate, n, pk, p)
				}
			}
		}
	}
}
