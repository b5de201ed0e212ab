package loudness

import (
	"math"
	"math/rand/v2"
)

// Test signal builders. Levels are in dBFS of the sine's peak amplitude, as
// EBU Tech 3341/3342 state their test signals.

// segment is a stretch of sine at one level.
type segment struct {
	dbfs    float64
	seconds float64
}

// toneSegments returns one channel of a continuous-phase sine at freq Hz
// whose amplitude steps through segs.
func toneSegments(rate int, freq float64, segs ...segment) []float64 {
	var x []float64
	n := 0
	for _, s := range segs {
		a := amplitude(s.dbfs)
		m := int(math.Round(s.seconds * float64(rate)))
		for range m {
			x = append(x, a*math.Sin(2*math.Pi*freq*float64(n)/float64(rate)))
			n++
		}
	}
	return x
}

// amplitude converts dBFS to a linear peak amplitude.
func amplitude(dbfs float64) float64 { return math.Pow(10, dbfs/20) }

// interleave makes frames from equally long channels.
func interleave(channels ...[]float64) []float64 {
	n := len(channels[0])
	out := make([]float64, 0, n*len(channels))
	for i := range n {
		for _, c := range channels {
			out = append(out, c[i])
		}
	}
	return out
}

// musicLike returns n samples of a deterministic noise-like signal with a
// level that wanders over tens of dB (a crude stand-in for programme
// material): low-passed noise times a slow envelope, peaking near -3 dBFS.
func musicLike(seed uint64, n, rate int) []float64 {
	r := rand.New(rand.NewPCG(seed, 7))
	x := make([]float64, n)
	lp := 0.0
	for i := range x {
		lp = 0.7*lp + 0.3*r.NormFloat64()
		t := float64(i) / float64(rate)
		env := 0.12 * (1.2 + math.Sin(2*math.Pi*0.7*t) + 0.5*math.Sin(2*math.Pi*3.1*t))
		x[i] = env * lp
	}
	return x
}

// denseFullScale returns n samples of white noise close to full scale: the
// worst case for true-peak skipping.
func denseFullScale(seed uint64, n int) []float64 {
	r := rand.New(rand.NewPCG(seed, 11))
	x := make([]float64, n)
	for i := range x {
		x[i] = 0.99 * (2*r.Float64() - 1)
	}
	return x
}

// measure runs frames through a fresh meter in writes of step frames
// (all at once when step is 0).
func measure(tb interface{ Fatal(...any) }, rate int, weights []float64, frames []float64, step int) Result {
	m, err := NewMeter(rate, weights)
	if err != nil {
		tb.Fatal(err)
	}
	nch := len(weights)
	if step <= 0 {
		m.Write(frames)
		return m.Result()
	}
	for len(frames) > 0 {
		n := min(step*nch, len(frames))
		m.Write(frames[:n])
		frames = frames[n:]
	}
	return m.Result()
}
