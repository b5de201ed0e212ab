package fix

import (
	"context"
	"math"
	"testing"
)

// TestDither16Bit: a 16-bit file lowered by a gain (no limiting) comes out
// 16-bit, and the difference between the output and the exact scaled input
// is TPDF-dithered quantisation error: mean 0, power Δ²/4 (Δ²/12 rounding
// + Δ²/6 dither; Lipshitz, Wannamaker and Vanderkooy, J. AES 40(5), 1992,
// from memory), uncorrelated with the signal, and white (flat within 1 dB
// over eight bands, and no autocorrelation at lags 1 to 16 beyond the
// statistical bound 4/√N).
func TestDither16Bit(t *testing.T) {
	dir := t.TempDir()
	x := programme(t, 7, 4, 2, 48000, -12, -1)
	for i := range x { // the input is 16-bit: round it as the file will
		x[i] = min(max(math.Round(x[i]*32768), -32768), 32767) / 32768
	}
	in := writeWAV(t, dir, "sixteen.wav", wavSpec{rate: 48000, ch: 2, bits: 16}, x)
	r := File(context.Background(), in, options(spec(t, "ebu-r128")))
	checkFixed(t, r, Gain, -23, -1)
	if b := r.After.Measurement.BitsPerSample; b != 16 {
		t.Fatalf("output %d-bit", b)
	}
	g := math.Pow(10, *r.GainDB/20)
	y := decodeAll(t, *r.Output)
	n := len(x)
	e := make([]float64, n)
	var mean, pow, cross, sig float64
	for i := range x {
		e[i] = (y[i] - g*x[i]) * 32768 // in LSB
		mean += e[i]
		pow += e[i] * e[i]
		cross += e[i] * x[i]
		sig += x[i] * x[i]
	}
	mean /= float64(n)
	pow /= float64(n)
	if math.Abs(mean) > 0.01 {
		t.Errorf("error mean %.4f LSB, want 0", mean)
	}
	// Δ²/4 = 0.25 LSB²; the estimate's standard error over 384 000
	// samples is under 0.001.
	if math.Abs(pow-0.25) > 0.01 {
		t.Errorf("error power %.4f LSB², want 0.25 (TPDF)", pow)
	}
	if rho := cross / math.Sqrt(pow*float64(n)*sig); math.Abs(rho) > 4/math.Sqrt(float64(n)) {
		t.Errorf("error correlated with the signal: ρ = %.4f", rho)
	}
	for lag := 1; lag <= 16; lag++ {
		s := 0.0
		for i := lag; i < n; i++ {
			s += e[i] * e[i-lag]
		}
		if rho := s / (pow * float64(n)); math.Abs(rho) > 4/math.Sqrt(float64(n)) {
			t.Errorf("error autocorrelation at lag %d: %.4f (white noise: within ±%.4f)", lag, rho, 4/math.Sqrt(float64(n)))
		}
	}
	// Averaged periodogram of one channel in 256-point blocks, eight bands.
	const size = 256
	var bands [8]float64
	blocks := 0
	cs := make([]float64, size)
	sn := make([]float64, size)
	for b := 0; (b+1)*size*2 <= n; b += 2 {
		blocks++
		for k := 1; k < size/2; k++ {
			for j := range size {
				s, c := math.Sincos(2 * math.Pi * float64(k*j) / size)
				cs[j], sn[j] = c, s
			}
			var re, im float64
			for j := range size {
				v := e[(b*size+j)*2]
				re += v * cs[j]
				im += v * sn[j]
			}
			bands[k*8/(size/2)] += re*re + im*im
		}
		if blocks == 60 {
			break
		}
	}
	ref := 0.0
	for _, v := range bands {
		ref += v
	}
	ref /= 8
	for i, v := range bands {
		if db := 10 * math.Log10(v/ref); math.Abs(db) > 1 {
			t.Errorf("error spectrum band %d is %.2f dB from the mean: not white", i, db)
		}
	}
}
