package limiter

import (
	"math"

	"github.com/kweigh/kweigh/loudness"
)

// referenceLimit is the plain twin of Limiter: every step of the package
// comment's equations computed from scratch, with the direct Annex 2
// convolution for the detector, an O(H) minimum and an O(A) average per
// sample. It takes the whole stream (interleaved) and returns the whole
// output and the gain applied to each output frame.
func referenceLimit(c Config, x []float64) (y, gains []float64) {
	l, err := New(c) // only for the derived frame counts and ceiling
	if err != nil {
		panic(err)
	}
	ch := c.Channels
	frames := len(x) / ch
	total := frames + l.delay // the stream continues with silence
	at := func(n, k int) float64 {
		if n < 0 || n >= frames {
			return 0
		}
		return x[n*ch+k]
	}
	phases := loudness.Annex2Phases()
	use := []int{0, 1, 2, 3} // 4× at every rate (doc.go)
	need := make([]float64, total)
	for n := range total {
		d := 0.0
		for k := range ch {
			d = max(d, math.Abs(at(n, k)))
			for _, p := range use {
				v := 0.0
				for t := range 12 {
					v += phases[p][t] * at(n-t, k)
				}
				d = max(d, math.Abs(v))
			}
		}
		need[n] = 1
		if d > l.ceiling {
			need[n] = l.ceiling / d
		}
	}
	env := make([]float64, total)
	e := 1.0
	for n := range total {
		h := 1.0
		for m := max(0, n-l.hold+1); m <= n; m++ {
			h = min(h, need[m])
		}
		if h <= e {
			e = h
		} else {
			e = h - (h-e)*l.release
		}
		env[n] = e
	}
	y = make([]float64, frames*ch)
	gains = make([]float64, frames)
	for t := l.delay; t < total; t++ {
		s := 0.0
		for m := t - l.lookAhead + 1; m <= t; m++ {
			if m < 0 {
				s++
			} else {
				s += env[m]
			}
		}
		g := min(1, s/float64(l.lookAhead))
		j := t - l.delay
		gains[j] = g
		for k := range ch {
			y[j*ch+k] = g * at(j, k)
		}
	}
	return y, gains
}
