package fix

import (
	"context"
	"math"
	"os"
	"strings"
	"testing"

	_ "github.com/kweigh/kweigh/decode/formats"
	"github.com/kweigh/kweigh/rules"
)

func spec(t testing.TB, id string) *rules.Spec {
	t.Helper()
	s, err := rules.Lookup(id)
	if err != nil {
		t.Fatal(err)
	}
	return s
}

func options(s *rules.Spec) Options {
	return Options{Spec: s, MaxLimitingDB: DefaultMaxLimitingDB, MarginDB: DefaultMarginDB}
}

// check asserts the common promises of a fixed file: the action, an output
// that exists, integrated loudness on the aim within 0.1 LU (the issue's
// requirement) and the true peak at or under the ceiling, all from the
// measurement of the written file.
func checkFixed(t *testing.T, r *Record, action Action, aim, ceiling float64) {
	t.Helper()
	if r.Action != action {
		t.Fatalf("action %q (%s), want %q", r.Action, r.Reason, action)
	}
	if r.Output == nil {
		t.Fatal("no output")
	}
	if _, err := os.Stat(*r.Output); err != nil {
		t.Fatal(err)
	}
	m := r.After.Measurement
	if m.Path != *r.Output {
		t.Errorf("after record path %s, output %s", m.Path, *r.Output)
	}
	if got := *m.IntegratedLUFS; math.Abs(got-aim) > 0.1 {
		t.Errorf("integrated %.3f LUFS, want %.1f ± 0.1", got, aim)
	}
	if got := *m.TruePeakDBTP; got > ceiling {
		t.Errorf("true peak %.3f dBTP over the %.1f ceiling", got, ceiling)
	}
	if r.Outcome() != OK {
		t.Errorf("outcome %v, verdict %s", r.Outcome(), r.After.Verdict)
	}
}

// TestTooLoudStereo: a stereo programme at -10 LUFS (peaks -0.5 dBFS)
// against the podcast spec (-16 LUFS, ≤ -1 dBTP; README "Specs", common
// practice): 6 dB down, gain only.
func TestTooLoudStereo(t *testing.T) {
	dir := t.TempDir()
	x := programme(t, 1, 8, 2, 48000, -10, -0.5)
	in := writeWAV(t, dir, "loud.wav", wavSpec{rate: 48000, ch: 2, bits: 24}, x)
	r := File(context.Background(), in, options(spec(t, "podcast")))
	checkFixed(t, r, Gain, -16, -1)
	// Gain alone moves integrated loudness by exactly the gain (BS.1770:
	// the measure is a mean square), so one write needs no passes.
	if g, want := *r.GainDB, -16-*r.Before.IntegratedLUFS; math.Abs(g-want) > 0.005 || r.Passes != 0 {
		t.Errorf("gain %.2f dB after %d passes, want %.2f in none", g, r.Passes, want)
	}
}

// TestQuietDynamicNeedsLimiting: -24 LUFS with bursts at -5 dBFS to the
// podcast target: +8 dB would put them near +3 dBTP, so about 4 dB of
// limiting brings them under -1 dBTP (less the 0.1 dB margin).
func TestQuietDynamicNeedsLimiting(t *testing.T) {
	dir := t.TempDir()
	x := programme(t, 2, 8, 2, 48000, -24, -6.5)
	in := writeWAV(t, dir, "quiet.wav", wavSpec{rate: 48000, ch: 2, bits: 24}, x)
	r := File(context.Background(), in, options(spec(t, "podcast")))
	checkFixed(t, r, GainAndLimiting, -16, -1)
	// The limiting needed is the input's true peak plus the gain less the
	// aim of -1.1 dBTP; the passes add a little gain for the loudness the
	// limiting took away.
	want := *r.Before.TruePeakDBTP + *r.GainDB + 1.1
	if l := *r.LimitingDB; l < 3.5 || l > 4.5 || math.Abs(l-want) > 0.1 {
		t.Errorf("limiting %.2f dB, want about 4 (%.2f from the peak and gain)", l, want)
	}
	t.Logf("gain %.2f limiting %.2f passes %d I %.3f TP %.3f", *r.GainDB, *r.LimitingDB, r.Passes, *r.After.Measurement.IntegratedLUFS, *r.After.Measurement.TruePeakDBTP)
}

// TestRefusedBeyondMaxLimiting: bursts at -1 dBFS in a -24 LUFS programme
// need about 9 dB of limiting for the podcast target: refused with the
// figure, the goal and the option that would allow it; nothing written.
func TestRefusedBeyondMaxLimiting(t *testing.T) {
	dir := t.TempDir()
	x := programme(t, 3, 6, 2, 48000, -24, -1)
	in := writeWAV(t, dir, "dynamic.wav", wavSpec{rate: 48000, ch: 2, bits: 24}, x)
	r := File(context.Background(), in, options(spec(t, "podcast")))
	if r.Action != Refused || r.Output != nil || r.Outcome() != NotFixed {
		t.Fatalf("action %q output %v outcome %v: %s", r.Action, r.Output, r.Outcome(), r.Reason)
	}
	for _, want := range []string{"dB of limiting to reach -16.0 LUFS under -1.0 dBTP", "too dynamic", "--max-limiting"} {
		if !strings.Contains(r.Reason, want) {
			t.Errorf("reason %q lacks %q", r.Reason, want)
		}
	}
	entries, _ := os.ReadDir(dir)
	if len(entries) != 1 {
		t.Errorf("%d files in the folder, want only the input", len(entries))
	}
	// Allowed with a higher limit, it is fixed.
	o := options(spec(t, "podcast"))
	o.MaxLimitingDB = 12
	checkFixed(t, File(context.Background(), in, o), GainAndLimiting, -16, -1)
	// With the limiter off it is refused again, saying why.
	o.NoLimiter, o.Force = true, true
	r = File(context.Background(), in, o)
	if r.Action != Refused || !strings.Contains(r.Reason, "limiter is off") {
		t.Errorf("no limiter: action %q, reason %q", r.Action, r.Reason)
	}
}

// TestMonoTarget: a mono file is brought to the podcast spec's mono target
// of -19 LUFS (README "Specs": -16 stereo, -19 mono; common practice).
func TestMonoTarget(t *testing.T) {
	dir := t.TempDir()
	x := programme(t, 4, 6, 1, 44100, -14, -3)
	in := writeWAV(t, dir, "mono.wav", wavSpec{rate: 44100, ch: 1, bits: 16}, x)
	r := File(context.Background(), in, options(spec(t, "podcast")))
	checkFixed(t, r, Gain, -19, -1)
}

// TestSurround51: a 5.1 file (channel mask 0x3F: L R C LFE Ls Rs) quiet
// for EBU R 128 (-23 LUFS, ≤ -1 dBTP; EBU R 128 v4.0) with peaks that
// need limiting after the gain; the surround weights (1.41) and the LFE
// exclusion come from BS.1770 through the same measure code.
func TestSurround51(t *testing.T) {
	dir := t.TempDir()
	x := programme(t, 5, 3, 6, 48000, -28, -4)
	in := writeWAV(t, dir, "surround.wav", wavSpec{rate: 48000, ch: 6, bits: 24, extensible: true, mask: 0x3F}, x)
	r := File(context.Background(), in, options(spec(t, "ebu-r128")))
	checkFixed(t, r, GainAndLimiting, -23, -1)
	if got := r.After.Measurement.ChannelLayout; strings.Join(got, " ") != "L R C LFE Ls Rs" {
		t.Errorf("layout after %v", got)
	}
}

// TestFloatStaysFloat: a 32-bit float WAV with overs above 0 dBFS comes
// out as 32-bit float (no dither: its samples are the gain-and-limited
// input rounded to float32), on target and under the ceiling.
func TestFloatStaysFloat(t *testing.T) {
	dir := t.TempDir()
	x := programme(t, 6, 6, 2, 48000, -8, 2)
	in := writeWAV(t, dir, "float.wav", wavSpec{rate: 48000, ch: 2, bits: 32, float: true}, x)
	r := File(context.Background(), in, options(spec(t, "ebu-r128")))
	checkFixed(t, r, Gain, -23, -1)
	m := r.After.Measurement
	if m.SampleFormat != "float" || m.BitsPerSample != 32 {
		t.Errorf("output is %s %d-bit, want float 32", m.SampleFormat, m.BitsPerSample)
	}
	// Every output sample is the input times one gain (to float32
	// precision, 2⁻²⁴ relative), since no limiting was needed: the ratio
	// is the same everywhere and equals the reported gain (rounded to
	// 0.01 dB in the record).
	y := decodeAll(t, *r.Output)
	g := 0.0
	for i := range x {
		if math.Abs(x[i]) < 1e-3 {
			continue
		}
		ratio := y[i] / float64(float32(x[i]))
		if g == 0 {
			g = ratio
		}
		if math.Abs(ratio-g) > 3e-7*g {
			t.Fatalf("sample %d scaled by %v, sample before by %v", i, ratio, g)
		}
	}
	if db := 20 * math.Log10(g); math.Abs(db-*r.GainDB) > 0.005 {
		t.Errorf("samples scaled by %.4f dB, record says %.2f", db, *r.GainDB)
	}
}

// TestWordLengths: 8-bit (unsigned) WAV, 20 valid bits in a 24-bit
// container (WAVE_FORMAT_EXTENSIBLE) and 32-bit integer WAV keep their
// word length: every output code is a multiple of 2^(container − valid
// bits) (left-justified, as the WAVE format wants), the decoder reports the
// same valid bits, and the loudness lands on the aim.
func TestWordLengths(t *testing.T) {
	for _, c := range []struct {
		name       string
		spec       wavSpec
		tolLU      float64 // 8-bit dither noise (-43 dBFS) adds loudness in quiet passages
		wantBits   int
		multipleOf float64
	}{
		{"8-bit", wavSpec{rate: 22050, ch: 1, bits: 8}, 0.3, 8, 1.0 / 128},
		{"20-in-24", wavSpec{rate: 48000, ch: 2, bits: 24, extensible: true, mask: 3, valid: 20}, 0.1, 20, 1.0 / (1 << 19)},
		{"32-bit", wavSpec{rate: 48000, ch: 2, bits: 32}, 0.1, 32, 1.0 / (1 << 31)},
	} {
		t.Run(c.name, func(t *testing.T) {
			dir := t.TempDir()
			x := programme(t, 15, 3, c.spec.ch, c.spec.rate, -12, -2)
			in := writeWAV(t, dir, "w.wav", c.spec, x)
			r := File(context.Background(), in, options(spec(t, "ebu-r128")))
			if r.Output == nil {
				t.Fatalf("%s: %s", r.Action, r.Reason)
			}
			m := r.After.Measurement
			// EBU R 128 v4.0: -23 LUFS for every channel count.
			if math.Abs(*m.IntegratedLUFS+23) > c.tolLU || int(m.BitsPerSample) != c.wantBits {
				t.Errorf("%.2f LUFS, %d bits", *m.IntegratedLUFS, m.BitsPerSample)
			}
			for i, v := range decodeAll(t, *r.Output) {
				if q := v / c.multipleOf; q != math.Trunc(q) {
					t.Fatalf("sample %d = %v is not a whole %d-bit code", i, v, c.wantBits)
				}
			}
		})
	}
}

// TestDamagedRefused: a WAV whose data chunk declares more audio than the
// file holds is damaged: refused, nothing written, "deliver it again".
func TestDamagedRefused(t *testing.T) {
	dir := t.TempDir()
	x := programme(t, 16, 2, 2, 48000, -12, -2)
	in := writeWAV(t, dir, "cut.wav", wavSpec{rate: 48000, ch: 2, bits: 24}, x)
	b, _ := os.ReadFile(in)
	os.WriteFile(in, b[:len(b)/2], 0o644)
	r := File(context.Background(), in, options(spec(t, "ebu-r128")))
	if r.Action != Refused || r.Output != nil || !strings.Contains(r.Reason, "deliver it again") {
		t.Errorf("action %q output %v: %s", r.Action, r.Output, r.Reason)
	}
}

// TestHighRates: at 96 and 192 kHz (where the BS.1770 meter interpolates
// 2× and 1×, and the limiter still 4×) a programme needing limiting lands
// on target under the ceiling.
func TestHighRates(t *testing.T) {
	for _, rate := range []int{96000, 192000} {
		dir := t.TempDir()
		x := programme(t, 18, 2, 2, rate, -24, -5)
		in := writeWAV(t, dir, "hr.wav", wavSpec{rate: rate, ch: 2, bits: 24}, x)
		checkFixed(t, File(context.Background(), in, options(spec(t, "podcast"))), GainAndLimiting, -16, -1)
	}
}

// TestOutputJudgedWithGroups: the written file is judged as `check` would
// judge it (engine.Evaluate): a spec declaring a programme group judges the
// output's group too, not just the whole file.
func TestOutputJudgedWithGroups(t *testing.T) {
	dir := t.TempDir()
	s, err := rules.Parse("kweigh.toml", []byte("name = \"dunmore-main\"\nextends = \"podcast\"\n[[group]]\nname = \"main\"\nchannels = \"1-2\"\n"))
	if err != nil {
		t.Fatal(err)
	}
	x := programme(t, 3, 8, 2, 48000, -10, -0.5)
	in := writeWAV(t, dir, "loud.wav", wavSpec{rate: 48000, ch: 2, bits: 24}, x)
	r := File(context.Background(), in, options(s))
	checkFixed(t, r, Gain, -16, -1)
	if len(r.Before.Groups) != 1 || len(r.After.Groups) != 1 || r.After.Groups[0].Name != "main" {
		t.Fatalf("groups before %d, after %+v; want the group judged on both", len(r.Before.Groups), r.After.Groups)
	}
	if g := r.After.Groups[0]; g.Verdict != rules.Pass {
		t.Errorf("output's group: %s %+v", g.Verdict, g.Checks)
	}
}

// TestTwoGroupsRefused: a file its spec judges as two programmes (two
// stereo pairs) that fails is refused with the reason, not corrected by one
// gain that suits neither and not passed as "none needed".
func TestTwoGroupsRefused(t *testing.T) {
	dir := t.TempDir()
	s, err := rules.Parse("kweigh.toml", []byte("name = \"dunmore-2x2\"\nextends = \"podcast\"\n"+
		"[[group]]\nname = \"english\"\nchannels = \"1-2\"\n[[group]]\nname = \"welsh\"\nchannels = \"3-4\"\n"))
	if err != nil {
		t.Fatal(err)
	}
	x := programme(t, 4, 8, 4, 48000, -10, -0.5)
	in := writeWAV(t, dir, "two-pairs.wav", wavSpec{rate: 48000, ch: 4, bits: 24}, x)
	r := File(context.Background(), in, options(s))
	if r.Action != Refused || !strings.Contains(r.Reason, "2 programme groups") || r.Output != nil {
		t.Errorf("action %q, reason %q, output %v", r.Action, r.Reason, r.Output)
	}
}
