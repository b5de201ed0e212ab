package limiter

import (
	"math"
	"testing"

	"github.com/kweigh/kweigh/internal/audiotest"
	"github.com/kweigh/kweigh/loudness"
)

// probe is the level of the constant a test puts on the last channel to
// read the applied gain back: far below any threshold, and linked channels
// share one gain, so output/probe is that gain.
const probe = 1.0 / 1024

// withProbe returns the frames of x (ch channels) with one more channel
// holding probe.
func withProbe(x []float64, ch int) []float64 {
	n := len(x) / ch
	y := make([]float64, 0, n*(ch+1))
	for i := range n {
		y = append(y, x[i*ch:(i+1)*ch]...)
		y = append(y, probe)
	}
	return y
}

// gainsOf reads the gain per frame back from the probe channel.
func gainsOf(y []float64, ch int) []float64 {
	g := make([]float64, len(y)/ch)
	for i := range g {
		g[i] = y[i*ch+ch-1] / probe
	}
	return g
}

// TestGainStepBounded checks the stated bound |G[n] − G[n−1]| ≤
// (1 − Gmin)/A (package comment) on a programme with 9 dB of overs and
// abrupt level changes, and that every channel got the same gain (linked:
// the quiet probe channel is turned down with the loud ones).
func TestGainStepBounded(t *testing.T) {
	const rate = 48000
	c := Config{SampleRate: rate, Channels: 3, CeilingDBTP: -1, MarginDB: DefaultMarginDB}
	x := withProbe(programme(5, rate*2, 2, rate, 8), 2)
	l := mustNew(t, c)
	y := run(l, x, 777)
	g := gainsOf(y, 3)
	bound := l.MaxStep(l.MinGain())
	worst := 0.0
	for i := 1; i < len(g); i++ {
		worst = max(worst, math.Abs(g[i]-g[i-1]))
	}
	// 1e-12: the probe read-back rounds (output is rounded to float64).
	if worst > bound+1e-12 {
		t.Errorf("largest gain step %.6g per sample, bound (1−Gmin)/A = %.6g", worst, bound)
	}
	if worst < bound/10 {
		t.Errorf("largest gain step %.3g is far below the bound %.3g: the test signal did not exercise the limiter", worst, bound)
	}
	if l.MinGain() > 0.5 {
		t.Errorf("min gain %.3f: expected deep limiting", l.MinGain())
	}
	for i := range g {
		for k := range 2 {
			if x[i*3+k] != 0 && math.Abs(y[i*3+k]/x[i*3+k]-g[i]) > 1e-9 {
				t.Fatalf("frame %d channel %d gain %v, probe channel %v: channels not linked", i, k, y[i*3+k]/x[i*3+k], g[i])
			}
		}
	}
	t.Logf("step ≤ %.5f per sample (bound %.5f, A = %d, Gmin %.3f)", worst, bound, l.LookAhead(), l.MinGain())
}

// TestAttackAndRelease: a tone burst 6 dB over the threshold. The gain
// falls in a ramp of exactly A frames that ends where the burst's first
// peaks come out (attack over the look-ahead, no overshoot), stays flat
// through the burst, and after the hold recovers exponentially: one time
// constant after the release starts, 1 − e⁻¹ of the way back (within 2 %:
// the A-frame smoothing delays the curve by A/2 frames, 1 % of τ).
func TestAttackAndRelease(t *testing.T) {
	const rate = 48000
	c := Config{SampleRate: rate, Channels: 2, CeilingDBTP: -6, MarginDB: 0}
	l := mustNew(t, c)
	thr := math.Pow(10, -6/20.0)
	n := rate
	x := make([]float64, 0, 2*n)
	on, off := rate/4, rate/2
	for i := range n {
		v := 0.0
		if i >= on && i < off {
			v = 2 * thr * math.Sin(2*math.Pi*1000*float64(i-on)/rate)
		}
		x = append(x, v)
	}
	y := run(l, withProbe(x, 1), 512)
	g := gainsOf(y, 2)
	A := l.LookAhead()
	first := -1 // first frame with reduced gain
	for i, v := range g {
		if v < 1 {
			first = i
			break
		}
	}
	// n0 is the first input frame whose detected peak is over the
	// threshold; the output frame it gets its gain ahead of, by the delay
	// D = A + 10, starts the ramp.
	tp, _ := loudness.NewTruePeak4x(rate)
	env := make([]float64, n)
	tp.Envelope(env, x)
	n0 := 0
	for n0 < n && max(env[n0], math.Abs(x[n0])) <= thr {
		n0++
	}
	if want := n0 - A - 10; first != want {
		t.Errorf("gain starts falling at frame %d, want %d (A = %d)", first, want, A)
	}
	// The ramp is A frames long: down to within 0.5 % of the burst's gain A
	// frames after it began (the rest is the sine's rising first peaks).
	if g[first+A+12] > 0.505 || g[first+A/2] > 0.9 || g[first+A/2] < 0.6 {
		t.Errorf("ramp: gain %.3f half-way, %.3f after A frames; want a linear fall over A = %d", g[first+A/2], g[first+A+12], A)
	}
	steady := g[(on+off)/2]
	if math.Abs(steady-0.5) > 0.002 {
		t.Errorf("gain in the burst %.4f, want 0.5 (6 dB)", steady)
	}
	for i := on; i < off; i++ {
		if math.Abs(y[2*i]) > thr*(1+1e-12) {
			t.Fatalf("frame %d at %.4f over the threshold %.4f", i, y[2*i], thr)
		}
	}
	// Release: h rises once the last peak leaves the hold window.
	tau := int(DefaultReleaseS * rate)
	start := off + (l.hold - l.delay) + A/2
	want := 1 - 0.5*math.Exp(-1)
	if got := g[start+tau]; math.Abs(got-want) > 0.02 {
		t.Errorf("gain one time constant into the release %.4f, want %.4f", got, want)
	}
}

// TestResetAndNoAllocation: Reset gives the same output for the same input,
// and Process allocates nothing.
func TestResetAndNoAllocation(t *testing.T) {
	c := Config{SampleRate: 48000, Channels: 2, CeilingDBTP: -1, MarginDB: DefaultMarginDB}
	x := programme(8, 20000, 2, 48000, 5)
	l := mustNew(t, c)
	a := run(l, x, 1000)
	l.Reset()
	b := run(l, x, 333)
	for i := range a {
		if a[i] != b[i] {
			t.Fatalf("sample %d differs after Reset: %v vs %v", i, a[i], b[i])
		}
	}
	l.Reset()
	dst := make([]float64, 4096*2)
	allocs := testing.AllocsPerRun(20, func() { l.Process(dst, x[:4096*2]) })
	if allocs != 0 {
		t.Errorf("Process allocates %v times per call", allocs)
	}
}

// TestConfigErrors: bad settings are errors, not panics.
func TestConfigErrors(t *testing.T) {
	for _, c := range []Config{
		{SampleRate: 1000, Channels: 2},
		{SampleRate: 48000, Channels: 0},
		{SampleRate: 48000, Channels: 2, MarginDB: -1},
		{SampleRate: 48000, Channels: 2, CeilingDBTP: math.NaN()},
		{SampleRate: 48000, Channels: 2, LookAheadS: 1},
	} {
		if _, err := New(c); err == nil {
			t.Errorf("New(%+v) accepted", c)
		}
	}
}

// BenchmarkProcess48kStereo times the limiter on 5 s of 48 kHz stereo
// programme 6 dB over a -1 dBTP ceiling ("limiter"), beside its peer in the
// same run, the BS.1770 true-peak meter reading both channels of the same
// signal ("truepeak-meter"). README "kweigh fix" quotes both.
func BenchmarkProcess48kStereo(b *testing.B) {
	const rate = 48000
	c := Config{SampleRate: rate, Channels: 2, CeilingDBTP: -1, MarginDB: DefaultMarginDB}
	x := programme(1, rate*5, 2, rate, 6)
	b.Run("truepeak-meter", func(b *testing.B) {
		tp := [2]*loudness.TruePeak{}
		ch := [2][]float64{make([]float64, len(x)/2), make([]float64, len(x)/2)}
		for i := range ch[0] {
			ch[0][i], ch[1][i] = x[2*i], x[2*i+1]
		}
		for k := range tp {
			tp[k], _ = loudness.NewTruePeak(rate)
		}
		rt := audiotest.StartRealtimeThread(b)
		for range b.N {
			for k := range tp {
				tp[k].Reset()
				tp[k].Peak(ch[k], 0)
			}
		}
		rt.Report(5)
	})
	b.Run("limiter", func(b *testing.B) {
		l := mustNew(b, c)
		dst := make([]float64, len(x))
		rt := audiotest.StartRealtimeThread(b)
		for range b.N {
			l.Reset()
			l.Process(dst, x)
		}
		rt.Report(5)
	})
}
