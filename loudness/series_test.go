package loudness

import (
	"math"
	"math/rand/v2"
	"testing"
)

// TestSeriesRecorderExactUntilLimit: below the limit the series is every
// value as given, NaN and −Inf included.
func TestSeriesRecorderExactUntilLimit(t *testing.T) {
	s := newSeriesRecorder()
	s.limit = 16
	in := []float32{float32(math.NaN()), float32(math.NaN()), -20, float32(math.Inf(-1)), -18, -30, -25}
	for _, v := range in {
		s.add(v)
	}
	got := s.series()
	if s.step != 1 || len(got) != len(in) {
		t.Fatalf("step %d, %d elements, want 1 and %d", s.step, len(got), len(in))
	}
	for i := range in {
		if got[i] != in[i] && !(math.IsNaN(float64(got[i])) && math.IsNaN(float64(in[i]))) {
			t.Errorf("element %d = %v, want %v", i, got[i], in[i])
		}
	}
}

// TestSeriesRecorderDecimates: far past the limit the series stays between
// limit/2 and limit elements, each pair holds the lowest and highest value
// of its 2·step blocks in time order, and the overall extremes survive.
func TestSeriesRecorderDecimates(t *testing.T) {
	const limit = 64
	rng := rand.New(rand.NewPCG(7, 7))
	for _, n := range []int{limit - 1, limit, limit + 1, 1000, 4096, 100_003} {
		s := newSeriesRecorder()
		s.limit = limit
		in := make([]float32, n)
		for i := range in {
			in[i] = float32(-40 + 20*rng.Float64())
		}
		in[0], in[1] = float32(math.NaN()), float32(math.NaN()) // a window not yet full
		spike := n * 2 / 3
		in[spike] = 3
		for _, v := range in {
			s.add(v)
		}
		got := s.series()
		if n >= limit && (len(got) < limit/2 || len(got) > limit+2) {
			t.Errorf("n=%d: %d elements, want %d to %d", n, len(got), limit/2, limit)
		}
		if s.step > 1 {
			full := n / (2 * s.step)
			if tail := n % (2 * s.step); len(got) != 2*full+min(tail, 2) {
				t.Errorf("n=%d: %d elements at step %d, want %d full pairs and the tail", n, len(got), s.step, full)
			}
		}
		top := float32(math.Inf(-1))
		for _, v := range got {
			if v > top {
				top = v
			}
		}
		if top != 3 {
			t.Errorf("n=%d: highest element %v, want the spike 3", n, top)
		}
		if s.step == 1 {
			continue
		}
		// Every full bucket's pair is its min and max, in time order.
		b := 2 * s.step
		for k := 0; (k+1)*b <= n; k++ {
			lo, hi := extremes(in[k*b : (k+1)*b])
			a, c := got[2*k], got[2*k+1]
			if (a != lo || c != hi) && !(math.IsNaN(float64(lo)) && math.IsNaN(float64(a))) {
				t.Fatalf("n=%d bucket %d: (%v, %v), want (%v, %v)", n, k, a, c, lo, hi)
			}
		}
	}
}

// TestMeterSeriesBounded: a stream longer than seriesLimit blocks gives a
// decimated series within the bound whose Step says what each element
// covers and whose maximum is the true maximum.
func TestMeterSeriesBounded(t *testing.T) {
	m, err := NewMeter(8000, []float64{1})
	if err != nil {
		t.Fatal(err)
	}
	for _, r := range []*seriesRecorder{&m.seriesM, &m.seriesS, &m.seriesTP, &m.seriesSP} {
		r.limit = 256
	}
	const blocks = 5000 // 500 s at 8 kHz
	x := make([]float64, 800)
	for b := range blocks {
		a := 0.01
		if b == 3210 {
			a = 0.9 // one loud block
		}
		for i := range x {
			x[i] = a * math.Sin(2*math.Pi*1000*float64(b*800+i)/8000)
		}
		m.Write(x)
	}
	r := m.Result()
	s := r.Series
	if s.Step < 2 || len(s.Momentary) > 258 || len(s.Momentary) < 128 || len(s.TruePeak) != len(s.Momentary) {
		t.Fatalf("step %d, %d momentary and %d true-peak elements", s.Step, len(s.Momentary), len(s.TruePeak))
	}
	topM := float32(math.Inf(-1))
	for _, v := range s.Momentary {
		topM = max(topM, v)
	}
	if want := r.MaxMomentary.Value; math.Abs(float64(topM)-want) > 1e-4 {
		t.Errorf("highest momentary element %v, max momentary %v", topM, want)
	}
	top := float32(math.Inf(-1))
	for _, v := range s.SamplePeak {
		top = max(top, v)
	}
	if math.Abs(float64(top)-DB(r.MaxSamplePeak())) > 1e-4 {
		t.Errorf("series sample peak %v, stream %v", top, DB(r.MaxSamplePeak()))
	}
}
