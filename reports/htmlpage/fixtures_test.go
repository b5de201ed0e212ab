package htmlpage

import (
	"fmt"
	"io"
	"math"
	"sync"
	"testing"
	"time"

	"github.com/kweigh/kweigh/decode"
	"github.com/kweigh/kweigh/measure"
	"github.com/kweigh/kweigh/rules"
)

// The demo run: an invented production house, Saltmarsh Sound, delivers
// episodes of an invented radio series, "The Lighthouse Keeper's Almanac",
// to an invented outlet, Northwind Radio, whose house spec uses the EBU R 128
// v4.0 figures (STANDARDS.md §4: -23.0 LUFS ±1.0 LU, -1 dBTP) and allows at
// most 3 s of trailing silence (invented house rule).
const demoSpec = "northwind-house"

func ptr(v float64) *float64 { return &v }

// demoTarget is the house spec as the report draws it.
var demoTarget = Target{
	IntegratedLUFS:      ptr(-23), // EBU R 128 v4.0 (STANDARDS.md §4)
	ToleranceLU:         ptr(1),   // EBU R 128 v4.0 production tolerance (STANDARDS.md §4)
	TruePeakCeilingDBTP: ptr(-1),  // EBU R 128 v4.0 (STANDARDS.md §4)
}

// demoCaution is the page's caution text in the demo.
const demoCaution = "Test tones and gain changes can reach high levels: lower the monitoring volume before playback. A pass is not a broadcaster's or regulator's acceptance; the receiving party's own QC and local regulation decide."

// demoTime is the pinned report time.
var demoTime = time.Date(2025, 3, 14, 9, 30, 0, 0, time.UTC)

// stretch is one part of a synthesised programme: a 997 Hz tone at a peak
// level, with an optional slow level swing.
type stretch struct {
	seconds float64
	dbfs    float64 // peak level of the tone; silent for digital silence
	swingDB float64 // depth of a 0.2 Hz level swing in dB; 0 = steady
}

var silent = math.Inf(-1)

// burst is a short 3 kHz tone burst that replaces the programme for a
// moment: the overs a true-peak check must find.
type burst struct {
	at, seconds, dbfs float64
}

// programme describes one synthesised file.
type programme struct {
	path      string
	rate      int
	layout    []string
	gains     []float64 // per channel, linear
	stretches []stretch
	bursts    []burst
	// brokenHeader makes the source declare zero channels, the way a
	// damaged header would.
	brokenHeader bool
}

func (p programme) frames() int64 {
	total := 0.0
	for _, s := range p.stretches {
		total += s.seconds
	}
	return int64(math.Round(total * float64(p.rate)))
}

// synthSource plays a programme as a decode.Decoder, so the test signal
// goes through the same measurement path (BS.1770 engine and hygiene
// probes) as a decoded file.
type synthSource struct {
	p     programme
	frame int64
	total int64
	part  int     // current stretch
	ends  []int64 // end frame of each stretch
}

func newSynthSource(p programme) *synthSource {
	s := &synthSource{p: p, total: p.frames()}
	t := 0.0
	for _, st := range p.stretches {
		t += st.seconds
		s.ends = append(s.ends, int64(math.Round(t*float64(p.rate))))
	}
	return s
}

func (s *synthSource) Info() decode.Info {
	ch := len(s.p.layout)
	if s.p.brokenHeader {
		ch = 0
	}
	return decode.Info{
		Container: "wav", Codec: "pcm", SampleRate: s.p.rate, Channels: ch,
		Layout: s.p.layout, BitsPerSample: 24, SampleFormat: decode.Int, Frames: s.total,
	}
}

func (s *synthSource) ReadFrames(dst []float64) (int, error) {
	ch := len(s.p.layout)
	n := 0
	for ; n < len(dst)/ch && s.frame < s.total; n++ {
		v := s.sample(s.frame)
		for c := 0; c < ch; c++ {
			dst[n*ch+c] = v * s.p.gains[c]
		}
		s.frame++
	}
	if n == 0 {
		return 0, io.EOF
	}
	return n, nil
}

func (s *synthSource) sample(frame int64) float64 {
	for s.part < len(s.ends)-1 && frame >= s.ends[s.part] {
		s.part++
	}
	t := float64(frame) / float64(s.p.rate)
	for _, b := range s.p.bursts {
		if t >= b.at && t < b.at+b.seconds {
			return math.Pow(10, b.dbfs/20) * math.Sin(2*math.Pi*3000*t)
		}
	}
	st := s.p.stretches[s.part]
	if math.IsInf(st.dbfs, -1) {
		return 0
	}
	level := st.dbfs + st.swingDB*math.Sin(2*math.Pi*0.2*t)
	return math.Pow(10, level/20) * math.Sin(2*math.Pi*997*t)
}

// measureProgramme runs a programme through measure.Stream, keeping the
// 10 Hz series.
func measureProgramme(t testing.TB, p programme) *measure.Measurement {
	t.Helper()
	m := measure.Stream(p.path, newSynthSource(p), measure.Options{KeepSeries: true})
	if m.Error == "" && m.Series == nil {
		t.Fatalf("%s: measurement kept no series", p.path)
	}
	return m
}

var stereo = []string{decode.FrontLeft, decode.FrontRight}

// demoProgrammes is the demo delivery.
var demoProgrammes = []programme{
	{ // Near target, some movement, short silences at both ends: passes.
		path: "almanac/ep101_mix.wav", rate: 48000, layout: stereo, gains: []float64{1, 1},
		stretches: []stretch{{1.5, silent, 0}, {12, -22, 3}, {10, -25.5, 4}, {14, -22.5, 2}, {2.5, silent, 0}},
	},
	{ // Mixed hot, with three short bursts over the ceiling and a long tail.
		path: "almanac/ep102_mix.wav", rate: 48000, layout: stereo, gains: []float64{1, 1},
		stretches: []stretch{{0.5, silent, 0}, {14, -16, 2}, {12, -18, 3}, {6.5, silent, 0}},
		bursts:    []burst{{5.2, 0.02, -0.3}, {11.7, 0.02, -0.5}, {20.05, 0.05, 0.2}},
	},
	{ // 5.1 promo sitting near the lower edge of the tolerance: a warning.
		path: "almanac/promo_autumn_5.1.wav", rate: 48000,
		layout:    []string{decode.FrontLeft, decode.FrontRight, decode.FrontCenter, decode.LowFrequency, decode.SurroundLeft, decode.SurroundRight},
		gains:     []float64{0.5, 0.5, 0.8, 0.9, 0.3, 0.3},
		stretches: []stretch{{20, -22.4, 1.5}},
	},
	{ // A sting shorter than one gating block: no integrated loudness.
		path: "almanac/sting_03.wav", rate: 44100, layout: []string{decode.Mono}, gains: []float64{1},
		stretches: []stretch{{0.3, -12, 0}},
	},
	{ // A file whose header is unusable.
		path: "almanac/ep104_mix.wav", rate: 48000, layout: stereo, gains: []float64{1, 1},
		stretches: []stretch{{1, -20, 0}}, brokenHeader: true,
	},
}

var (
	demoOnce         sync.Once
	demoMeasurements []*measure.Measurement
)

// measuredDemo measures the demo programmes once per test binary; callers
// must not modify the measurements.
func measuredDemo(t testing.TB) []*measure.Measurement {
	t.Helper()
	demoOnce.Do(func() {
		for _, p := range demoProgrammes {
			demoMeasurements = append(demoMeasurements, measureProgramme(t, p))
		}
	})
	if len(demoMeasurements) != len(demoProgrammes) {
		t.Fatal("demo programmes could not be measured")
	}
	return demoMeasurements
}

// demoPage is the `check` report of the demo delivery.
func demoPage(t testing.TB) Page {
	t.Helper()
	page := Page{
		Title:     "Delivery check — The Lighthouse Keeper's Almanac",
		Generated: demoTime,
		Specs:     []string{demoSpec},
		Caution:   demoCaution,
	}
	for _, m := range measuredDemo(t) {
		page.Entries = append(page.Entries, Entry{Result: demoJudge(m, demoTarget), Target: demoTarget})
	}
	return page
}

// measurePage is the `measure` report of two demo files: no spec, no
// verdicts, no target drawn.
func measurePage(t testing.TB) Page {
	t.Helper()
	ms := measuredDemo(t)
	page := Page{Title: "Measurement — Saltmarsh Sound", Generated: demoTime, Caution: demoCaution}
	for _, m := range []*measure.Measurement{ms[0], ms[2]} {
		page.Entries = append(page.Entries, Entry{Result: &rules.Result{Measurement: m}})
	}
	return page
}

// demoJudge is the demo's stand-in for the rules engine: just enough checks
// (integrated, true peak, trailing silence) to give the report real
// verdicts on real measurements, so these tests need nothing from package
// rules but its Result type. Warning margin 0.3 LU: invented for the demo.
func demoJudge(m *measure.Measurement, t Target) *rules.Result {
	r := &rules.Result{Measurement: m, Spec: demoSpec, Checks: []rules.Check{}}
	if m.Error != "" {
		r.Verdict = rules.Error
		r.Advice = "Re-export the file and deliver it again."
		return r
	}
	target, tol, ceiling := *t.IntegratedLUFS, *t.ToleranceLU, *t.TruePeakCeilingDBTP

	in := rules.Check{ID: "integrated", Unit: "LUFS", Limit: fmt.Sprintf("%.1f LUFS ±%.1f LU", target, tol)}
	var gain float64
	switch {
	case m.IntegratedLUFS == nil:
		in.Verdict, in.Reason = rules.Warn, "no integrated loudness: the file is shorter than one 400 ms gating block"
	default:
		v := *m.IntegratedLUFS
		in.Measured = v
		d := v - target
		switch {
		case d > tol:
			in.Verdict, in.Reason = rules.Fail, fmt.Sprintf("%.1f LU louder than the target allows", d-tol)
		case d < -tol:
			in.Verdict, in.Reason = rules.Fail, fmt.Sprintf("%.1f LU quieter than the target allows", -tol-d)
		case math.Abs(d) > tol-0.3:
			in.Verdict, in.Reason = rules.Warn, "inside the tolerance but within 0.3 LU of its edge"
		default:
			in.Verdict, in.Reason = rules.Pass, "on target"
		}
		if in.Verdict != rules.Pass {
			gain = -d
			r.SuggestedGainDB = ptr(gain)
		}
	}

	tp := rules.Check{ID: "true_peak", Unit: "dBTP", Limit: fmt.Sprintf("≤ %.1f dBTP", ceiling), Verdict: rules.Pass, Reason: "below the ceiling"}
	if m.TruePeakDBTP != nil {
		tp.Measured = *m.TruePeakDBTP
		if *m.TruePeakDBTP > ceiling {
			tp.Verdict, tp.Reason = rules.Fail, fmt.Sprintf("true peak %.2f dB over the ceiling", *m.TruePeakDBTP-ceiling)
		}
		if after := *m.TruePeakDBTP + gain; after > ceiling {
			r.LimiterReductionDB = ptr(after - ceiling)
		}
	}

	tail := rules.Check{ID: "trailing_silence", Unit: "s", Measured: m.Signal.TrailingSilenceS, Limit: "≤ 3.0 s", Verdict: rules.Pass, Reason: "short enough"}
	if m.Signal.TrailingSilenceS > 3 {
		tail.Verdict, tail.Reason = rules.Fail, "the file ends in more silence than the outlet accepts"
	}
	r.Checks = append(r.Checks, in, tp, tail)

	r.Verdict = rules.Pass
	for _, c := range r.Checks {
		if verdictOf(c.Verdict).Rank > verdictOf(r.Verdict).Rank {
			r.Verdict = c.Verdict
		}
	}
	switch {
	case r.SuggestedGainDB != nil && r.LimiterReductionDB != nil:
		r.Advice = fmt.Sprintf("Apply %s dB of gain, then limit the true peak by %s dB.", FormatGain(r.SuggestedGainDB), formatFixed(r.LimiterReductionDB, 1))
	case r.SuggestedGainDB != nil:
		r.Advice = fmt.Sprintf("Apply %s dB of gain.", FormatGain(r.SuggestedGainDB))
	case r.LimiterReductionDB != nil:
		r.Advice = fmt.Sprintf("Limit the true peak by %s dB.", formatFixed(r.LimiterReductionDB, 1))
	}
	return r
}
