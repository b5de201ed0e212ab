package measure_test

import (
	"context"
	"crypto/sha256"
	"encoding/binary"
	"encoding/hex"
	"math"
	"testing"

	"github.com/kweigh/kweigh/measure"
	"github.com/kweigh/kweigh/timecode"
)

// withBext inserts a minimal version-1 bext chunk carrying a
// TimeReference (samples since midnight, EBU Tech 3285 §2.3: offset 338,
// uint64) after a WAV's WAVE tag.
func withBext(wav []byte, timeRef uint64) []byte {
	body := make([]byte, 602)
	copy(body, "Harbour Lights ep. 4, final mix")
	copy(body[256:], "Tidewater Sound")
	binary.LittleEndian.PutUint64(body[338:], timeRef)
	binary.LittleEndian.PutUint16(body[346:], 1)
	chunk := append([]byte("bext"), binary.LittleEndian.AppendUint32(nil, uint32(len(body)))...)
	chunk = append(chunk, body...)
	out := append(append(append([]byte{}, wav[:12]...), chunk...), wav[12:]...)
	binary.LittleEndian.PutUint32(out[4:], uint32(len(out)-8))
	return out
}

// setFrames writes a 997 Hz sine of amplitude amp into channel c of
// interleaved frames from second a to second b.
func setFrames(v []float64, nc, c int, a, b, amp float64) {
	for i := int(a * rate); i < int(b*rate); i++ {
		v[i*nc+c] = amp * math.Sin(2*math.Pi*997*float64(i)/rate)
	}
}

func eventsOf(m *measure.Measurement, kind string) []measure.Event {
	var out []measure.Event
	for _, e := range m.Events {
		if e.Kind == kind {
			out = append(out, e)
		}
	}
	return out
}

// TestBurstEvent: a 20 ms burst at 12.34 s in a −30 dBFS programme is one
// true_peak_over event at 12.3–12.4 s (the 100 ms block it falls in:
// timecodes 10:00:12:07 to 10:00:12:10, 12.3 × 25 = frame 307.5), and from
// a 10:00:00:00 start at 25 fps the burst's instant is 10:00:12:08 (12.34 s
// × 25 = frame 308.5 → 12 s + 8 frames; SMPTE ST 12-1 counting). The
// start comes once from --start-timecode and once from the bext
// TimeReference (10 h × 48 000 = 1 728 000 000 samples).
func TestBurstEvent(t *testing.T) {
	const nc = 2
	v := make([]float64, 20*rate*nc)
	setFrames(v, nc, 0, 0, 20, dbfs(-30))
	setFrames(v, nc, 1, 0, 20, dbfs(-30))
	setFrames(v, nc, 0, 12.34, 12.36, 0.9)
	plain := wavBytes(nc, 24, false, 0, v)
	cases := []struct {
		name string
		file []byte
		opt  measure.Options
	}{
		{"start-timecode", plain, measure.Options{StartTimecode: "10:00:00:00"}},
		{"bext", withBext(plain, 10*3600*rate), measure.Options{}},
	}
	for _, c := range cases {
		m := measure.File(context.Background(), writeTemp(t, c.name+".wav", c.file), c.opt)
		if m.Error != "" {
			t.Fatal(m.Error)
		}
		over := eventsOf(m, measure.EventTruePeakOver)
		if len(over) != 1 {
			t.Fatalf("%s: true-peak events %+v", c.name, over)
		}
		e := over[0]
		// 0.9 = −0.92 dBFS sample peak; the true peak of a 997 Hz sine is
		// within 0.01 dB of it (BS.1770-4 Annex 2 interpolation).
		if e.StartS != 12.3 || e.EndS != 12.4 || e.StartTimecode != "10:00:12:07" || e.EndTimecode != "10:00:12:10" ||
			math.Abs(*e.Value-(-0.92)) > 0.05 || e.Unit != "dBTP" {
			t.Errorf("%s: event %+v value %v", c.name, e, *e.Value)
		}
		if got := m.TimeLabel(12.34); got != "10:00:12:08" {
			t.Errorf("%s: 12.34 s is %s, want 10:00:12:08", c.name, got)
		}
		if m.StartTimecode == nil || *m.StartTimecode != "10:00:00:00" || m.FPS != "25" {
			t.Errorf("%s: start %v fps %q", c.name, m.StartTimecode, m.FPS)
		}
	}
	// Without a start the times count from zero.
	m := measure.File(context.Background(), writeTemp(t, "zero.wav", plain), measure.Options{})
	if m.StartTimecode != nil || m.TimeLabel(12.34) != "0:00:12.3" {
		t.Errorf("no start: %v, %s", m.StartTimecode, m.TimeLabel(12.34))
	}
	// 29.97 drop-frame from the options.
	df := timecode.Rate2997DF
	m = measure.File(context.Background(), writeTemp(t, "df.wav", plain), measure.Options{StartTimecode: "00:09:59;29", FPS: &df})
	if m.FPS != "29.97df" || m.TimeLabel(0.04) != "00:10:00;00" {
		t.Errorf("drop-frame: fps %s, 0.04 s = %s", m.FPS, m.TimeLabel(0.04))
	}
	// A label the rate cannot have is the file's error.
	m = measure.File(context.Background(), writeTemp(t, "bad.wav", plain), measure.Options{StartTimecode: "10:00:00:30"})
	if m.Error == "" {
		t.Error("start 10:00:00:30 at 25 fps accepted")
	}
}

// TestEventKinds: planted silence, phase inversion, clipping and
// loudness overs are found where they were put, merged into ranges.
func TestEventKinds(t *testing.T) {
	const nc = 2
	v := make([]float64, 40*rate*nc)
	amp := dbfs(-23)
	setFrames(v, nc, 0, 0, 40, amp)
	setFrames(v, nc, 1, 0, 40, amp)
	// 10–13 s: digital silence.
	setFrames(v, nc, 0, 10, 13, 0)
	setFrames(v, nc, 1, 10, 13, 0)
	// 21–27 s: R inverted (two 3 s windows, 21 s is window 7).
	setFrames(v, nc, 1, 21, 27, -amp)
	// 30.0–30.2 s: a hard-clipped square wave at full scale, both channels.
	for i := 30 * rate; i < 30*rate+rate/5; i++ {
		s := 1.0
		if (i/24)%2 == 1 {
			s = -1
		}
		v[i*nc], v[i*nc+1] = s, s
	}
	maxM, maxS := -10.0, -18.0
	m := measure.File(context.Background(), writeTemp(t, "kinds.wav", wavBytes(nc, 16, false, 0, v)),
		measure.Options{Events: measure.EventLimits{MaxMomentaryLUFS: &maxM, MaxShortTermLUFS: &maxS}})
	if m.Error != "" {
		t.Fatal(m.Error)
	}
	within := func(got, want, tol float64) bool { return math.Abs(got-want) <= tol }
	// Tolerances: the silence test reads 100 ms blocks; a 3 s window is
	// exact; clipping is placed to the decoding block (4096 frames).
	sil := eventsOf(m, measure.EventSilence)
	if len(sil) != 1 || !within(sil[0].StartS, 10, 0.1) || !within(sil[0].EndS, 13, 0.1) || !within(*sil[0].Value, 3, 0.1) {
		t.Errorf("silence %+v", sil)
	}
	ph := eventsOf(m, measure.EventPhase)
	if len(ph) != 1 || ph[0].StartS != 21 || ph[0].EndS != 27 || *ph[0].Value > -0.99 || ph[0].Channel == nil || *ph[0].Channel != "L/R" {
		t.Errorf("phase %+v", ph)
	}
	cl := eventsOf(m, measure.EventClipping)
	if len(cl) != 1 || !within(cl[0].StartS, 30, 0.09) || !within(cl[0].EndS, 30.2, 0.09) || *cl[0].Value != 2*rate/5 {
		t.Errorf("clipping %+v (value %v)", cl, *cl[0].Value)
	}
	// The square wave at full scale reads some +3 LUFS: a momentary over
	// from about 29.7 s (the first 400 ms window reaching it) and a
	// short-term over within 3 s after it.
	mo := eventsOf(m, measure.EventMomentaryOver)
	if len(mo) != 1 || !within(mo[0].StartS, 29.7, 0.11) || !within(mo[0].EndS, 30.6, 0.11) {
		t.Errorf("momentary over %+v", mo)
	}
	if st := eventsOf(m, measure.EventShortTermOver); len(st) != 1 || st[0].StartS < 27 || st[0].EndS > 33.3 {
		t.Errorf("short-term over %+v", st)
	}
	for i := 1; i < len(m.Events); i++ {
		if m.Events[i].StartS < m.Events[i-1].StartS {
			t.Errorf("events out of order: %+v", m.Events)
		}
	}
}

// TestLoudSection: a hot intro (25 s at −19 dBFS before 115 s of
// programme) is a loud_section at 0–25 s, and 20 s at −28 dBFS a
// quiet_section at 100–120 s. Expected values, by hand from the planted
// levels (a steady sine reads its level, BS.1770 gating keeps every
// block): the rest of the intro is 95 s at −23 and 20 s at −28, energy
// mean −23.55, so +4.55 LU; the rest of the quiet stretch is 25 s at −19
// and 95 s at −23, −21.81, so −6.19 LU. Tolerances: edges 0.3 s (the
// 400 ms block that places them), values 0.2 LU (the blocks straddling
// the edges).
func TestLoudSection(t *testing.T) {
	const nc = 1
	v := make([]float64, 140*rate)
	setFrames(v, nc, 0, 0, 25, dbfs(-19))
	setFrames(v, nc, 0, 25, 100, dbfs(-23))
	setFrames(v, nc, 0, 100, 120, dbfs(-28))
	setFrames(v, nc, 0, 120, 140, dbfs(-23))
	m := measure.File(context.Background(), writeTemp(t, "hot.wav", wavBytes(nc, 24, false, 0, v)), measure.Options{})
	if m.Error != "" {
		t.Fatal(m.Error)
	}
	loud := eventsOf(m, measure.EventLoudSection)
	if len(loud) != 1 || loud[0].StartS != 0 || math.Abs(loud[0].EndS-25) > 0.3 || math.Abs(*loud[0].Value-4.55) > 0.2 {
		t.Errorf("loud sections %+v", loud)
	}
	quiet := eventsOf(m, measure.EventQuietSection)
	if len(quiet) != 1 || math.Abs(quiet[0].StartS-100) > 0.3 || math.Abs(quiet[0].EndS-120) > 0.3 || math.Abs(*quiet[0].Value-(-6.19)) > 0.2 {
		t.Errorf("quiet sections %+v", quiet)
	}
	for _, e := range append(loud, quiet...) {
		t.Logf("%s %.1f–%.1f s %+.2f LU", e.Kind, e.StartS, e.EndS, *e.Value)
	}
}

// TestEventsCapped: a file with more overs than the cap keeps the first
// MaxPerKind and counts the rest.
func TestEventsCapped(t *testing.T) {
	const nc = 1
	v := make([]float64, 30*rate)
	setFrames(v, nc, 0, 0, 30, dbfs(-30))
	for s := 0.5; s < 29; s += 1 { // 29 bursts a second apart: never merged
		setFrames(v, nc, 0, s, s+0.02, 0.95)
	}
	m := measure.File(context.Background(), writeTemp(t, "many.wav", wavBytes(nc, 24, false, 0, v)),
		measure.Options{Events: measure.EventLimits{MaxPerKind: 5}})
	if got := len(eventsOf(m, measure.EventTruePeakOver)); got != 5 || m.EventsOmitted[measure.EventTruePeakOver] != 24 {
		t.Errorf("kept %d, omitted %v", got, m.EventsOmitted)
	}
}

// TestDigest: the SHA-256 of the streaming pass is that of the bytes
// (crypto/sha256 over the whole file in memory, the reference here), and
// the size is the file's.
func TestDigest(t *testing.T) {
	data := wavBytes(1, 16, false, 0, make([]float64, 3*rate/2+7))
	data = append(data, make([]byte, 3<<20)...) // beyond several digest chunks (a trailing pad the reader ignores)
	path := writeTemp(t, "digest.wav", data)
	m := measure.File(context.Background(), path, measure.Options{Digest: true})
	want := sha256.Sum256(data)
	if m.File == nil || m.File.SizeBytes != int64(len(data)) || m.File.SHA256 != hex.EncodeToString(want[:]) {
		t.Errorf("file facts %+v, error %q", m.File, m.Error)
	}
	if m := measure.File(context.Background(), path, measure.Options{}); m.File != nil {
		t.Error("digest without Options.Digest")
	}
}
