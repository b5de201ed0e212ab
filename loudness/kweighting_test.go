package loudness

import (
	"math"
	"math/cmplx"
	"math/rand/v2"
	"testing"
)

// published48k is the K-weighting of ITU-R BS.1770-4/5 at 48 kHz, Tables 1
// and 2 (SOURCES.md §1 [doc]).
var published48k = KWeighting{
	Shelf: Biquad{B0: 1.53512485958697, B1: -2.69169618940638, B2: 1.19839281085285,
		A1: -1.69065929318241, A2: 0.73248077421585},
	HighPass: Biquad{B0: 1, B1: -2, B2: 1, A1: -1.99004745483398, A2: 0.99007225036621},
}

func coefficients(k KWeighting) [10]float64 {
	s, h := k.Shelf, k.HighPass
	return [10]float64{s.B0, s.B1, s.B2, s.A1, s.A2, h.B0, h.B1, h.B2, h.A1, h.A2}
}

// TestKWeightingCoefficients: at 48 kHz the design is the published table.
func TestKWeightingCoefficients(t *testing.T) {
	// The published table has 14 decimals; the design reproduces it to
	// ~1e-15 (calc), so 1e-13 leaves room only for the table's own rounding.
	const tol = 1e-13
	got, want := coefficients(NewKWeighting(48000)), coefficients(published48k)
	for i := range got {
		if math.Abs(got[i]-want[i]) > tol {
			t.Errorf("48000 Hz coefficient %d = %.17g, want %.17g ± %g", i, got[i], want[i], tol)
		}
	}
}

// biquadGain is |H(e^jω)| of one section, written out in real arithmetic
// (|b0 + b1·e^−jω + b2·e^−2jω| / |1 + a1·e^−jω + a2·e^−2jω|) so that the
// expected values share no code with the design or with Biquad.Response.
func biquadGain(b0, b1, b2, a1, a2, freq, rate float64) float64 {
	w := 2 * math.Pi * freq / rate
	nr, ni := b0+b1*math.Cos(w)+b2*math.Cos(2*w), -b1*math.Sin(w)-b2*math.Sin(2*w)
	dr, di := 1+a1*math.Cos(w)+a2*math.Cos(2*w), -a1*math.Sin(w)-a2*math.Sin(2*w)
	return math.Sqrt((nr*nr + ni*ni) / (dr*dr + di*di))
}

// published48kGainDB is the magnitude response in dB of the whole
// K-weighting as ITU-R BS.1770-4/5 Tables 1 and 2 publish it for 48 kHz,
// evaluated at freq Hz (< 24 kHz). It is the expected response at every
// rate: the Recommendation asks other rates for the same response.
func published48kGainDB(freq float64) float64 {
	// Table 1 (shelf) and Table 2 (high-pass), as printed [doc].
	shelf := biquadGain(1.53512485958697, -2.69169618940638, 1.19839281085285, -1.69065929318241, 0.73248077421585, freq, 48000)
	hp := biquadGain(1.0, -2.0, 1.0, -1.99004745483398, 0.99007225036621, freq, 48000)
	return 20 * math.Log10(shelf*hp)
}

// kweightingRates are the sample rates kweigh measures at.
var kweightingRates = []int{8000, 11025, 16000, 22050, 32000, 44100, 48000, 88200, 96000, 176400, 192000, 352800, 384000}

// maxResponseError returns the largest |designed − published 48 kHz| in dB
// of the K-weighting at rate over 20 Hz … 0.4·rate (at most 19.2 kHz, 0.4 of
// the 48 kHz band: above 24 kHz the published filter has no response) on a
// grid of 1 % steps, and the frequency where it occurs.
func maxResponseError(rate int) (worst, at float64) {
	k := NewKWeighting(rate)
	top := 0.4 * float64(min(rate, 48000))
	for f := 20.0; f <= top*1.00001; f = math.Min(f*1.01, math.Max(top, f*1.000001)) {
		got := 20 * math.Log10(cmplx.Abs(k.Response(f, float64(rate))))
		if e := math.Abs(got - published48kGainDB(f)); e > worst {
			worst, at = e, f
		}
		if f == top {
			break
		}
	}
	return worst, at
}

// TestKWeightingMagnitude holds the K-weighting at every supported rate to
// the magnitude response of the published 48 kHz filter from 20 Hz to
// 0.4·fs within 0.01 dB (issue 9: the same response at every rate; the
// tolerance is this project's, common practice, no published source). The
// residuals are the figures README.md gives; the 48 kHz row checks the
// harness itself, which must find nothing there.
func TestKWeightingMagnitude(t *testing.T) {
	for _, rate := range kweightingRates {
		worst, at := maxResponseError(rate)
		tol := 0.01 // dB
		if rate == 48000 {
			tol = 1e-9
		}
		t.Logf("%6d Hz: max error %.4f dB at %.0f Hz", rate, worst, at)
		if worst > tol {
			t.Errorf("%d Hz: response departs from the published 48 kHz filter by %.4f dB at %.0f Hz (want ≤ %g)", rate, worst, at, tol)
		}
	}
}

// TestKWeightingPassband: the high-pass alone at 1 kHz (far above its
// 38 Hz corner) has the published filter's passband gain, +0.043 dB
// (20·log10 of a0(48 kHz) = 1.004995, calc from Table 2), at every rate;
// before the numerator was scaled it grew to +0.25 dB at 8 kHz. Here the
// factor sits in the shelf's numerator, so the check is on the product of
// both stages against the published product at 1 kHz.
func TestKWeightingPassband(t *testing.T) {
	want := published48kGainDB(300)
	for _, rate := range kweightingRates {
		k := NewKWeighting(rate)
		got := 20 * math.Log10(cmplx.Abs(k.Response(300, float64(rate))))
		if math.Abs(got-want) > 0.002 {
			t.Errorf("%d Hz: gain at 300 Hz %.4f dB, published 48 kHz filter %.4f dB", rate, got, want)
		}
	}
}

// TestKWeightingShape checks two facts about the curve at 48 kHz: the shelf
// plateau of about +4 dB at high frequencies (Vh = +3.99984 dB, SOURCES.md
// §1) and 0.691 dB at 997 Hz, which is what makes the −0.691 constant bring a
// 0 dBFS 997 Hz sine to −3.01 LKFS (SOURCES.md §1 [calc]).
func TestKWeightingShape(t *testing.T) {
	k := NewKWeighting(48000)
	gain := func(f float64) float64 { return 20 * math.Log10(cmplx.Abs(k.Response(f, 48000))) }
	for _, tc := range []struct {
		freq, want, tol float64
	}{
		{997, 0.691, 0.005}, // calc: −0.691 constant, SOURCES.md §1
		{10000, 4.0, 0.25},  // shelf plateau ≈ +4 dB (Vh = +3.99984 dB)
	} {
		if got := gain(tc.freq); math.Abs(got-tc.want) > tc.tol {
			t.Errorf("K-weighting at %g Hz = %.3f dB, want %.3f ± %.3f", tc.freq, got, tc.want, tc.tol)
		}
	}
}

// TestEnergyCrossCheck checks the fused one-pass kernel against the plain
// stage-by-stage Filter at awkward block sizes.
func TestEnergyCrossCheck(t *testing.T) {
	r := rand.New(rand.NewPCG(1, 2))
	x := make([]float64, 20000)
	for i := range x {
		x[i] = r.NormFloat64() * 0.3
	}
	for _, rate := range []int{8000, 44100, 48000, 192000, 384000} {
		for _, step := range []int{1, 7, 1023, 1024, 4801} {
			fast, plain := NewKWeighting(rate), NewKWeighting(rate)
			var got, want float64
			for f := x; len(f) > 0; {
				n := min(step, len(f))
				got += fast.Energy(f[:n])
				for _, y := range plain.Filter(nil, f[:n]) {
					want += y * y
				}
				f = f[n:]
			}
			if math.Abs(got-want) > 1e-10*want {
				t.Errorf("%d Hz, step %d: Energy %.15g, Filter %.15g", rate, step, got, want)
			}
		}
	}
}
