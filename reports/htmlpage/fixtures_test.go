package htmlpage

import (
	"context"
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
// to an invented outlet, Northwind Radio. Its house spec,
// testdata/northwind-house.toml, extends the built-in EBU R 128 spec
// (SOURCES.md §4: -23.0 LUFS ±1.0 LU, -1 dBTP) and allows at most 3 s of
// trailing silence (invented house rule). The files are judged by the real
// rules engine (rules.Evaluate).
const demoSpecFile = "testdata/northwind-house.toml"

func ptr(v float64) *float64 { return &v }

// northwindSpec loads the demo's house spec with the real TOML loader.
func northwindSpec(t testing.TB) *rules.Spec {
	t.Helper()
	spec, err := rules.LoadFile(demoSpecFile)
	if err != nil {
		t.Fatalf("loading the demo spec: %v", err)
	}
	return spec
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
	m := measure.Stream(context.Background(), p.path, newSynthSource(p), measure.Options{KeepSeries: true})
	if m.Error == "" && m.Series == nil {
		t.Fatalf("%s: measurement kept no series", p.path)
	}
	return m
}

var stereo = []string{decode.FrontLeft, decode.FrontRight}

// demoProgrammes is the demo delivery.
var demoProgrammes = []programme{
	{ // Near target, some movement, short silences at both ends, right
		// channel 0.5 dB down (so not dual mono): passes.
		path: "almanac/ep101_mix.wav", rate: 48000, layout: stereo, gains: []float64{1, 0.944},
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
	spec := northwindSpec(t)
	page := Page{
		Title:     "Delivery check — The Lighthouse Keeper's Almanac",
		Generated: demoTime,
		Specs:     []string{spec.ID},
		Caution:   demoCaution,
	}
	for _, m := range measuredDemo(t) {
		r := rules.Evaluate(spec, m)
		page.Entries = append(page.Entries, Entry{Result: &r, Target: TargetFor(spec, m.Channels)})
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

// TestDemoVerdicts keeps the synthetic demo honest: the real rules engine
// gives each programme the verdict its description promises, so the demo
// report shows every verdict the page can draw.
func TestDemoVerdicts(t *testing.T) {
	want := []rules.Verdict{
		rules.Pass,  // on target (EBU R 128 ±1.0 LU, SOURCES.md §4)
		rules.Fail,  // 7.7 LU too loud, true peak over -1 dBTP, 6.5 s tail > 3 s house limit
		rules.Warn,  // inside ±1.0 LU but near the edge
		rules.Fail,  // shorter than one 400 ms gating block (BS.1770): no integrated loudness
		rules.Error, // unusable header
	}
	page := demoPage(t)
	if len(page.Entries) != len(want) {
		t.Fatalf("%d demo entries, want %d", len(page.Entries), len(want))
	}
	for i, e := range page.Entries {
		if e.Result.Verdict != want[i] {
			t.Errorf("%s: verdict %s, want %s (%s)", e.Result.Path, e.Result.Verdict, want[i], MainReason(e.Result))
		}
	}
}
