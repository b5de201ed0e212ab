package measure

import (
	"math"
	"math/rand/v2"
	"slices"
	"testing"
)

const hygRate = 48000

// stereo interleaves two planar channels.
func stereo(l, r []float64) []float64 {
	out := make([]float64, 2*len(l))
	for i := range l {
		out[2*i], out[2*i+1] = l[i], r[i]
	}
	return out
}

func sine(n int, amp, freq float64) []float64 {
	x := make([]float64, n)
	for i := range x {
		x[i] = amp * math.Sin(2*math.Pi*freq*float64(i)/hygRate)
	}
	return x
}

func noise(n int, amp float64, seed uint64) []float64 {
	rng := rand.New(rand.NewPCG(seed, 7))
	x := make([]float64, n)
	for i := range x {
		x[i] = amp * (2*rng.Float64() - 1)
	}
	return x
}

func negate(x []float64) []float64 {
	y := make([]float64, len(x))
	for i, v := range x {
		y[i] = -v
	}
	return y
}

// runHygiene feeds frames in awkward block sizes so that state carried
// between writes is exercised.
func runHygiene(buf []float64, channels, bits int, float bool, layout []string) Signal {
	h := newHygiene(channels, hygRate, bits, float, layout, DefaultSilenceThresholdDBFS, DefaultClipRunMinSamples)
	sizes := []int{1, 7, 4096, 333}
	for i, k := 0, 0; i < len(buf); k++ {
		n := min(sizes[k%len(sizes)]*channels, len(buf)-i)
		h.write(buf[i : i+n])
		i += n
	}
	return h.finish(hygRate, layout, samplePeaks(buf, channels), DefaultSilenceThresholdDBFS)
}

var lr = []string{"L", "R"}

// samplePeaks is the plain per-channel max |x| that the engine supplies in
// a real measurement.
func samplePeaks(buf []float64, channels int) []float64 {
	p := make([]float64, channels)
	for i, x := range buf {
		p[i%channels] = math.Max(p[i%channels], math.Abs(x))
	}
	return p
}

func TestCorrelation(t *testing.T) {
	n := 10 * hygRate
	a := noise(n, 0.3, 1)
	b := noise(n, 0.3, 2)
	tests := []struct {
		name     string
		l, r     []float64
		want     float64 // Pearson correlation; exact for identical/inverted signals (definition)
		tol      float64
		dualMono bool
	}{
		{"identical", a, a, 1, 1e-9, true},
		{"inverted", a, negate(a), -1, 1e-9, false},
		// Independent uniform noise: correlation ~ 0 ± a few /sqrt(n) (sampling theory).
		{"independent", a, b, 0, 0.01, false},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			s := runHygiene(stereo(tc.l, tc.r), 2, 24, false, lr)
			if s.Correlation == nil || math.Abs(*s.Correlation-tc.want) > tc.tol {
				t.Fatalf("correlation = %v, want %v ± %v", deref(s.Correlation), tc.want, tc.tol)
			}
			if s.MinWindowCorrelation == nil || math.Abs(*s.MinWindowCorrelation-tc.want) > 3*tc.tol+0.02 {
				t.Errorf("min window correlation = %v, want about %v", deref(s.MinWindowCorrelation), tc.want)
			}
			if s.DualMono != tc.dualMono {
				t.Errorf("dual mono = %v, want %v", s.DualMono, tc.dualMono)
			}
		})
	}
}

func TestWindowCorrelationFindsShortPhaseFault(t *testing.T) {
	// 12 s of independent noise with 3 s inverted in the middle: the file's
	// correlation stays mild, the worst 3 s window shows the fault.
	n := 12 * hygRate
	l := noise(n, 0.3, 3)
	r := noise(n, 0.3, 4)
	for i := 6 * hygRate; i < 9*hygRate; i++ {
		r[i] = -l[i]
	}
	s := runHygiene(stereo(l, r), 2, 24, false, lr)
	if *s.Correlation < -0.4 {
		t.Errorf("whole-file correlation %v, want about -0.25", *s.Correlation)
	}
	if *s.MinWindowCorrelation > -0.99 {
		t.Errorf("min window correlation %v, want -1 (an exactly inverted window)", *s.MinWindowCorrelation)
	}
}

func TestClipping(t *testing.T) {
	full := 32767.0 / 32768 // the positive full-scale code of 16-bit PCM
	x := sine(hygRate, 0.5, 1000)
	// One run of 5 full-scale samples, one of 2 (below the run minimum), one
	// negative run of 3 at -1.0.
	for i := 100; i < 105; i++ {
		x[i] = full
	}
	x[300], x[301] = full, full
	for i := 500; i < 503; i++ {
		x[i] = -1
	}
	s := runHygiene(x, 1, 16, false, []string{"M"})
	if s.ClippedSamples != 10 || s.ClipRuns != 2 || s.LongestClipRun != 5 {
		t.Fatalf("clipped %d samples in %d runs (longest %d), want 10 in 2 (longest 5)", s.ClippedSamples, s.ClipRuns, s.LongestClipRun)
	}
	// The same values in a float file are below 1.0 and do not clip, except -1.0.
	s = runHygiene(x, 1, 32, true, []string{"M"})
	if s.ClippedSamples != 3 || s.ClipRuns != 1 {
		t.Fatalf("float: clipped %d in %d runs, want 3 in 1", s.ClippedSamples, s.ClipRuns)
	}
}

func TestClipRunAtEndOfStream(t *testing.T) {
	x := sine(1000, 0.5, 1000)
	for i := 990; i < 1000; i++ {
		x[i] = 1
	}
	s := runHygiene(x, 1, 24, false, []string{"M"})
	if s.ClipRuns != 1 || s.LongestClipRun != 10 {
		t.Fatalf("run at end: %d runs, longest %d; want 1, 10", s.ClipRuns, s.LongestClipRun)
	}
}

func TestSilenceAndDC(t *testing.T) {
	// 1 s silence, 2 s tone with 0.01 DC, 0.5 s silence; right channel silent.
	lead, body, tail := hygRate, 2*hygRate, hygRate/2
	l := make([]float64, lead+body+tail)
	copy(l[lead:], sine(body, 0.25, 440))
	for i := lead; i < lead+body; i++ {
		l[i] += 0.01
	}
	r := make([]float64, len(l))
	s := runHygiene(stereo(l, r), 2, 24, false, lr)
	// The first loud sample is where the tone plus DC first reaches -60 dBFS
	// (0.001): the DC alone does that at the first sample of the body.
	if math.Abs(s.LeadingSilenceS-1) > 1e-4 {
		t.Errorf("leading silence %v s, want 1", s.LeadingSilenceS)
	}
	if math.Abs(s.TrailingSilenceS-0.5) > 1e-3 {
		t.Errorf("trailing silence %v s, want 0.5", s.TrailingSilenceS)
	}
	// DC: 0.01 over 2 of 3.5 s, plus the mean of whole sine cycles (0).
	wantDC := 0.01 * 2 / 3.5
	if math.Abs(s.DCOffset[0]-wantDC) > 1e-5 || s.DCOffset[1] != 0 {
		t.Errorf("dc offset %v, want [%v 0]", s.DCOffset, wantDC)
	}
	if !slices.Equal(s.SilentChannels, []string{"R"}) {
		t.Errorf("silent channels %v, want [R]", s.SilentChannels)
	}
	if s.Correlation != nil {
		t.Errorf("correlation with a silent side = %v, want undefined", *s.Correlation)
	}
}

func TestAllSilent(t *testing.T) {
	s := runHygiene(make([]float64, 2*hygRate), 2, 16, false, lr)
	if s.LeadingSilenceS != 1 || s.TrailingSilenceS != 1 {
		t.Errorf("all-silent file: leading %v trailing %v, want 1 and 1", s.LeadingSilenceS, s.TrailingSilenceS)
	}
	if len(s.SilentChannels) != 2 || s.DualMono {
		t.Errorf("silent channels %v dual mono %v", s.SilentChannels, s.DualMono)
	}
}

func TestDualMonoToleratesOneLSB(t *testing.T) {
	a := noise(hygRate, 0.3, 5)
	b := slices.Clone(a)
	b[1234] += 1.0 / 32768 // one 16-bit step
	if s := runHygiene(stereo(a, b), 2, 16, false, lr); !s.DualMono {
		t.Error("one LSB apart: want dual mono")
	}
	// Since issue 9 a few stray samples no longer make two copies of one
	// signal "different": the side's energy decides (TestDualMonoByLevelOfSide).
	b[2345] += 3.0 / 32768
	if s := runHygiene(stereo(a, b), 2, 16, false, lr); !s.DualMono {
		t.Error("three LSB apart in one sample: want dual mono")
	}
	c := noise(hygRate, 0.01, 8) // side about -30 dB re mid
	for i := range b {
		b[i] = a[i] + c[i]
	}
	if s := runHygiene(stereo(a, b), 2, 16, false, lr); s.DualMono {
		t.Error("a second signal 30 dB down on one side: want not dual mono")
	}
}

func deref(p *float64) any {
	if p == nil {
		return nil
	}
	return *p
}

// tpdf16 makes x 16-bit with TPDF dither (the sum of two independent
// uniform values of ±½ LSB, the textbook triangular dither of ±1 LSB) from
// its own generator.
func tpdf16(x []float64, seed uint64) []float64 {
	rng := rand.New(rand.NewPCG(seed, 11))
	y := make([]float64, len(x))
	for i, v := range x {
		d := rng.Float64() - rng.Float64()
		q := math.Round(v*32768 + d)
		y[i] = math.Max(-32768, math.Min(32767, q)) / 32768
	}
	return y
}

// TestDualMonoByLevelOfSide: dual mono is judged by the energy of L−R
// against L+R (issue 9; the −50 dB threshold is common practice, no
// published source), so one mono signal given each channel its own dither
// is dual mono although no two samples need agree, while a narrow but real
// stereo signal is not.
func TestDualMonoByLevelOfSide(t *testing.T) {
	n := 5 * hygRate
	tone := sine(n, 0.1, 997) // -20 dBFS
	l, r := tpdf16(tone, 1), tpdf16(tone, 2)
	diff := 0.0
	for i := range l {
		diff = math.Max(diff, math.Abs(l[i]-r[i]))
	}
	if diff <= 1.0/32768 {
		t.Fatalf("the dithered copies differ by at most %v: the test needs copies more than one step apart", diff*32768)
	}
	if s := runHygiene(stereo(l, r), 2, 16, false, lr); !s.DualMono {
		t.Errorf("a -20 dBFS sine dithered to 16 bits on each channel independently: want dual mono (correlation %v)", deref(s.Correlation))
	}
	// Quiet programme: noise at about -45 dBFS RMS still reads dual mono
	// with independent dither (side about -52 dB re mid, calc: dither
	// variance LSB²/4 per channel after quantisation).
	quiet := noise(n, 0.0097, 9) // uniform ±0.0097: RMS 0.0056, -45 dBFS
	if s := runHygiene(stereo(tpdf16(quiet, 3), tpdf16(quiet, 4)), 2, 16, false, lr); !s.DualMono {
		t.Error("quiet programme dithered independently: want dual mono")
	}
	// A narrow stereo image: the same tone plus independent noise 40 dB
	// down on each side. Real, if narrow, stereo: not dual mono.
	nl, nr := noise(n, 0.0017, 5), noise(n, 0.0017, 6)
	narrowL, narrowR := slices.Clone(tone), slices.Clone(tone)
	for i := range tone {
		narrowL[i] += nl[i]
		narrowR[i] += nr[i]
	}
	if s := runHygiene(stereo(narrowL, narrowR), 2, 24, false, lr); s.DualMono {
		t.Error("narrow stereo (side about -40 dB re mid): want not dual mono")
	}
	// One copy 0.1 dB lower than the other: side/mid = (1−g)/(1+g) with
	// g = 10^(−0.1/20), −45 dB (calc), wider than the threshold.
	g := math.Pow(10, -0.1/20)
	lower := make([]float64, n)
	for i, v := range tone {
		lower[i] = g * v
	}
	if s := runHygiene(stereo(tone, lower), 2, 24, false, lr); s.DualMono {
		t.Error("0.1 dB level difference: want not dual mono")
	}
}
