package measure_test

import (
	"context"
	"encoding/binary"
	"encoding/json"
	"io"
	"math"
	"os"
	"path/filepath"
	"slices"
	"strings"
	"testing"

	"github.com/kweigh/kweigh/decode"
	_ "github.com/kweigh/kweigh/decode/flac"
	_ "github.com/kweigh/kweigh/decode/wav"
	"github.com/kweigh/kweigh/measure"
)

const rate = 48000

// wavBytes builds a WAV file: 16/24-bit integer PCM (tag 1) or 32-bit float
// (tag 3), interleaved, optionally with a WAVE_FORMAT_EXTENSIBLE mask.
func wavBytes(channels, bits int, float bool, mask uint32, frames []float64) []byte {
	bytesPer := bits / 8
	data := make([]byte, 0, len(frames)*bytesPer)
	for _, v := range frames {
		switch {
		case float:
			data = binary.LittleEndian.AppendUint32(data, math.Float32bits(float32(v)))
		default:
			full := math.Ldexp(1, bits-1)
			q := int64(math.Round(v * full))
			q = max(-int64(full), min(int64(full)-1, q))
			for b := 0; b < bytesPer; b++ {
				data = append(data, byte(q>>(8*b)))
			}
		}
	}
	tag := uint16(1)
	if float {
		tag = 3
	}
	fmtBody := binary.LittleEndian.AppendUint16(nil, tag)
	if mask != 0 {
		fmtBody = binary.LittleEndian.AppendUint16(nil, 0xFFFE)
	}
	fmtBody = binary.LittleEndian.AppendUint16(fmtBody, uint16(channels))
	fmtBody = binary.LittleEndian.AppendUint32(fmtBody, rate)
	fmtBody = binary.LittleEndian.AppendUint32(fmtBody, uint32(rate*channels*bytesPer))
	fmtBody = binary.LittleEndian.AppendUint16(fmtBody, uint16(channels*bytesPer))
	fmtBody = binary.LittleEndian.AppendUint16(fmtBody, uint16(bits))
	if mask != 0 {
		fmtBody = binary.LittleEndian.AppendUint16(fmtBody, 22)
		fmtBody = binary.LittleEndian.AppendUint16(fmtBody, uint16(bits))
		fmtBody = binary.LittleEndian.AppendUint32(fmtBody, mask)
		// KSDATAFORMAT_SUBTYPE_PCM / _IEEE_FLOAT: 0000000x-0000-0010-8000-00aa00389b71
		guid := []byte{byte(tag), 0, 0, 0, 0, 0, 0x10, 0, 0x80, 0, 0, 0xaa, 0, 0x38, 0x9b, 0x71}
		fmtBody = append(fmtBody, guid...)
	}
	out := []byte("RIFF\x00\x00\x00\x00WAVE")
	out = append(out, "fmt "...)
	out = binary.LittleEndian.AppendUint32(out, uint32(len(fmtBody)))
	out = append(out, fmtBody...)
	out = append(out, "data"...)
	out = binary.LittleEndian.AppendUint32(out, uint32(len(data)))
	out = append(out, data...)
	binary.LittleEndian.PutUint32(out[4:], uint32(len(out)-8))
	return out
}

// tone returns interleaved frames: a 997 Hz sine of amplitude amps[c] in
// channel c, with 10 ms fades so switching on and off adds no ringing.
func tone(seconds float64, amps ...float64) []float64 {
	n := int(seconds * rate)
	nc := len(amps)
	out := make([]float64, n*nc)
	fade := rate / 100
	for i := 0; i < n; i++ {
		g := math.Min(1, math.Min(float64(i)/float64(fade), float64(n-1-i)/float64(fade)))
		s := g * math.Sin(2*math.Pi*997*float64(i)/rate)
		for c, a := range amps {
			out[i*nc+c] = a * s
		}
	}
	return out
}

func dbfs(db float64) float64 { return math.Pow(10, db/20) }

func writeTemp(t *testing.T, name string, data []byte) string {
	t.Helper()
	path := filepath.Join(t.TempDir(), name)
	if err := os.WriteFile(path, data, 0o644); err != nil {
		t.Fatal(err)
	}
	return path
}

func TestFileLoudness(t *testing.T) {
	a := dbfs(-23)
	tests := []struct {
		name       string
		channels   int
		mask       uint32
		amps       []float64
		layout     []string
		integrated float64 // expected LUFS
		tol        float64
	}{
		// EBU Tech 3341 test 1 (from memory per SOURCES.md §3): stereo sine
		// at -23 dBFS reads -23.0 LUFS ±0.1.
		{"stereo -23 dBFS", 2, 0, []float64{a, a}, []string{"L", "R"}, -23, 0.1},
		// One channel: 3.01 dB lower (BS.1770: sum of channel powers).
		{"mono -23 dBFS", 1, 0, []float64{a}, []string{"M"}, -26.01, 0.1},
		// 5.1 with a full-scale LFE: LFE excluded (BS.1770 channel weights).
		{"5.1 loud LFE", 6, 0x3F, []float64{a, a, 0, 0.9, 0, 0}, []string{"L", "R", "C", "LFE", "Ls", "Rs"}, -23, 0.1},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			path := writeTemp(t, "tone.wav", wavBytes(tc.channels, 24, false, tc.mask, tone(10, tc.amps...)))
			m := measure.File(context.Background(), path, measure.Options{})
			if m.Error != "" {
				t.Fatal(m.Error)
			}
			if m.IntegratedLUFS == nil || math.Abs(*m.IntegratedLUFS-tc.integrated) > tc.tol {
				t.Errorf("integrated %v, want %v ± %v", m.IntegratedLUFS, tc.integrated, tc.tol)
			}
			if !slices.Equal(m.ChannelLayout, tc.layout) {
				t.Errorf("layout %v, want %v", m.ChannelLayout, tc.layout)
			}
			if m.DurationS != 10 || m.SampleRateHz != rate || m.BitsPerSample != 24 || m.Format != "wav" {
				t.Errorf("stream facts: %+v", m)
			}
		})
	}
}

func TestLayoutOverride(t *testing.T) {
	// Six channels without a mask, in film order L C R Ls Rs LFE; the LFE
	// (last) carries a loud tone. Default order would weight it as Rs.
	a := dbfs(-23)
	path := writeTemp(t, "film.wav", wavBytes(6, 24, false, 0, tone(10, a, 0, a, 0, 0, 0.9)))
	def := measure.File(context.Background(), path, measure.Options{})
	film := measure.File(context.Background(), path, measure.Options{Layout: []string{"L", "C", "R", "Ls", "Rs", "LFE"}})
	if def.LayoutSource != "default" || film.LayoutSource != "user" {
		t.Fatalf("layout sources %q %q", def.LayoutSource, film.LayoutSource)
	}
	// With the right layout only L and R count: -23.0 (Tech 3341 test 1).
	if math.Abs(*film.IntegratedLUFS+23) > 0.1 {
		t.Errorf("with --layout: %v, want -23.0", *film.IntegratedLUFS)
	}
	if *def.IntegratedLUFS < -20 {
		t.Errorf("default layout should count the loud last channel as a surround: %v", *def.IntegratedLUFS)
	}
	if len(def.Notes) == 0 || !strings.Contains(strings.Join(def.Notes, " "), "does not declare its channel layout") {
		t.Errorf("default layout of a 6-channel file needs a note: %v", def.Notes)
	}
	if !strings.Contains(strings.Join(def.Notes, " "), "--layout") {
		t.Errorf("the missing-layout note should name the option --layout: %v", def.Notes)
	}
	// A layout that does not fit the channel count is not applied (a mixed
	// batch keeps every other file measurable); the file keeps its own
	// layout with a note.
	other := measure.File(context.Background(), path, measure.Options{Layout: []string{"L", "R"}})
	if other.Error != "" || other.LayoutSource != "default" || *other.IntegratedLUFS != *def.IntegratedLUFS ||
		!strings.Contains(strings.Join(other.Notes, " "), "names 2 channels but the file has 6: it was not applied") {
		t.Errorf("layout for another channel count: error %q, source %q, notes %v", other.Error, other.LayoutSource, other.Notes)
	}
}

func TestUndefinedFiguresAreNullWithNotes(t *testing.T) {
	tests := []struct {
		name   string
		frames []float64
		nulls  []string
	}{
		// BS.1770: no gating block fits in 300 ms, so no integrated loudness;
		// EBU Tech 3341: no full 3 s window, so no short-term maximum.
		{"300 ms", tone(0.3, 0.1, 0.1), []string{"integrated loudness", "maximum short-term loudness"}},
		// BS.1770: digital silence lies below the −70 LKFS absolute gate.
		{"silence", make([]float64, 2*5*rate), []string{"integrated loudness", "loudness range"}},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			m := measure.File(context.Background(), writeTemp(t, "x.wav", wavBytes(2, 16, false, 0, tc.frames)), measure.Options{})
			if m.Error != "" {
				t.Fatal(m.Error)
			}
			if m.IntegratedLUFS != nil {
				t.Errorf("integrated = %v, want null", *m.IntegratedLUFS)
			}
			notes := strings.Join(m.Notes, "\n")
			for _, what := range tc.nulls {
				if !strings.Contains(notes, "no "+what) {
					t.Errorf("notes lack %q: %v", what, m.Notes)
				}
			}
		})
	}
}

func TestFloatOversAreReportedAsTheyAre(t *testing.T) {
	// A float file may exceed full scale: a +6 dBFS tone must read a
	// sample peak of +6.02 dBFS (20·log10 2), not a clipped 0.
	m := measure.File(context.Background(), writeTemp(t, "hot.wav", wavBytes(1, 32, true, 0, tone(2, 2.0))), measure.Options{})
	if m.Error != "" {
		t.Fatal(m.Error)
	}
	if m.SamplePeakDBFS == nil || math.Abs(*m.SamplePeakDBFS-6.02) > 0.01 {
		t.Errorf("sample peak %v, want +6.02 dBFS", m.SamplePeakDBFS)
	}
	if m.Signal.ClippedSamples == 0 {
		t.Error("samples above 1.0 in a float file should count as at or over full scale")
	}
}

func TestNonFiniteSamplesAreAnError(t *testing.T) {
	frames := tone(1, 0.5)
	frames[12345] = math.NaN()
	m := measure.File(context.Background(), writeTemp(t, "nan.wav", wavBytes(1, 32, true, 0, frames)), measure.Options{})
	if !strings.Contains(m.Error, "nan.wav") || !strings.Contains(m.Error, "sample 12345") || !strings.Contains(m.Error, "NaN") {
		t.Errorf("error %q should name the file, the sample and NaN", m.Error)
	}
	if m.IntegratedLUFS != nil {
		t.Error("no figure may be given for a file with invalid samples")
	}
}

func TestTruncatedFileIsFlaggedDamaged(t *testing.T) {
	full := wavBytes(2, 16, false, 0, tone(6, 0.1, 0.1))
	cut := full[:len(full)-4*rate] // one second of stereo 16-bit missing
	m := measure.File(context.Background(), writeTemp(t, "cut.wav", cut), measure.Options{})
	if m.Error != "" {
		t.Fatal(m.Error)
	}
	if m.Damaged == "" || !strings.Contains(m.Damaged, "truncated") {
		t.Errorf("damaged = %q, want a truncation report", m.Damaged)
	}
	if math.Abs(m.DurationS-5) > 1e-9 {
		t.Errorf("duration %v, want the 5 s actually present", m.DurationS)
	}
}

func TestBadFilesNameTheFile(t *testing.T) {
	tests := map[string][]byte{
		"empty.wav":     {},
		"header.wav":    []byte("RIFF\x10\x00\x00\x00WAVEfmt "),
		"notaudio.wav":  []byte("this is a cue sheet, not audio\n"),
		"zerochans.wav": wavBytes(0, 16, false, 0, nil),
	}
	for name, data := range tests {
		t.Run(name, func(t *testing.T) {
			m := measure.File(context.Background(), writeTemp(t, name, data), measure.Options{})
			if m.Error == "" || !strings.Contains(m.Error, name) {
				t.Errorf("error %q should name %s", m.Error, name)
			}
		})
	}
}

func TestTruePeakNeverBelowSamplePeak(t *testing.T) {
	// A low-frequency tone has no inter-sample overs: its true peak equals
	// its sample peak (BS.1770 Annex 2: true peak is the peak of the
	// continuous signal, which passes through every sample).
	m := measure.File(context.Background(), writeTemp(t, "low.wav", wavBytes(2, 24, false, 0, tone(3, 0.5, 0.25))), measure.Options{})
	for c := range m.ChannelTruePeakDBTP {
		tp, sp := *m.ChannelTruePeakDBTP[c], *m.ChannelSamplePeakDBFS[c]
		if tp < sp || tp-sp > 0.01 {
			t.Errorf("channel %d: true peak %.3f, sample peak %.3f", c, tp, sp)
		}
	}
}

// panicky is a decoder that fails the way a third-party library can.
type panicky struct{}

func (panicky) Info() decode.Info {
	return decode.Info{Container: "wav", SampleRate: rate, Channels: 1, BitsPerSample: 16, SampleFormat: decode.Int, Frames: -1}
}
func (panicky) ReadFrames([]float64) (int, error) { panic("index out of range [7] with length 3") }

func TestDecoderPanicBecomesFileError(t *testing.T) {
	m := measure.Stream(context.Background(), "broken.flac", panicky{}, measure.Options{})
	if !strings.Contains(m.Error, "broken.flac") || !strings.Contains(m.Error, "decoder failed") {
		t.Errorf("error %q should name the file and the decoder failure", m.Error)
	}
}

func TestStereoDownmixOfSurround(t *testing.T) {
	a := dbfs(-23)
	tests := []struct {
		name     string
		amps     []float64 // L R C LFE Ls Rs
		surround float64   // integrated LUFS of the 5.1 mix
		downmix  float64   // integrated LUFS of the Lo/Ro fold-down
	}{
		// A -23 dBFS tone in C alone. 5.1: one front channel, -23 - 3.01
		// (BS.1770: a sine in one channel reads 3.01 dB below its peak
		// level, SOURCES.md §1). Fold-down: 0.707·C into Lo and Ro, two
		// channels at -26.01 dBFS each: -26.01 - 3.01 + 3.01 (two equal
		// channels sum +3.01). Both -26.01.
		{"centre", []float64{0, 0, a, 0, 0, 0}, -26.01, -26.01},
		// The tone in Ls alone. 5.1: weight 1.41 (+1.49 dB, BS.1770
		// channel weights) → -24.52. Fold-down: 0.707·Ls into Lo only, one
		// channel at -26.01 dBFS → -29.02.
		{"left surround", []float64{0, 0, 0, 0, a, 0}, -24.52, -29.02},
		// A loud LFE is dropped from the fold-down as from BS.1770.
		{"LFE", []float64{a, a, 0, 0.9, 0, 0}, -23, -23},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			m := measure.File(context.Background(), writeTemp(t, "mix51.wav", wavBytes(6, 24, false, 0x3F, tone(10, tc.amps...))), measure.Options{})
			if m.Error != "" {
				t.Fatal(m.Error)
			}
			if math.Abs(*m.IntegratedLUFS-tc.surround) > 0.05 {
				t.Errorf("5.1 integrated %.2f, want %.2f", *m.IntegratedLUFS, tc.surround)
			}
			if m.StereoDownmix == nil || m.StereoDownmix.IntegratedLUFS == nil {
				t.Fatalf("no downmix figure: %+v", m.StereoDownmix)
			}
			if got := *m.StereoDownmix.IntegratedLUFS; math.Abs(got-tc.downmix) > 0.05 {
				t.Errorf("downmix integrated %.2f, want %.2f", got, tc.downmix)
			}
		})
	}
	// Stereo files have no fold-down.
	m := measure.File(context.Background(), writeTemp(t, "st.wav", wavBytes(2, 16, false, 0, tone(2, 0.1, 0.1))), measure.Options{})
	if m.StereoDownmix != nil {
		t.Errorf("stereo file with a downmix: %+v", m.StereoDownmix)
	}
}

// TestDecoderNotesReachTheRecord: what a decoder learns while decoding
// (here, that FLAC's MD5 check was turned off) is in the file's notes.
func TestDecoderNotesReachTheRecord(t *testing.T) {
	m := measure.File(context.Background(), filepath.Join("..", "decode", "flac", "testdata", "stereo24-48k.flac"), measure.Options{Decode: decode.Options{SkipMD5: true}})
	if m.Error != "" {
		t.Fatal(m.Error)
	}
	if !strings.Contains(strings.Join(m.Notes, "\n"), "MD5 verification turned off") {
		t.Errorf("notes %q lack the decoder's note", m.Notes)
	}
}

// lossyTone is a decoder of one second of silence that declares what a
// lossy decoder declares (no bit depth, a bit rate, its mode and tags),
// for the plumbing of those facts into the Measurement and its JSON.
type lossyTone struct{ left int }

func (*lossyTone) Info() decode.Info {
	return decode.Info{Container: "mp3", Codec: "mpeg-1 layer 3", SampleRate: rate, Channels: 2, SampleFormat: decode.Int,
		Frames: -1, BitRate: 128000, Mode: "joint stereo", BitRateMode: "cbr", Tags: []string{"id3v2.4", "id3v1"}}
}

func (d *lossyTone) ReadFrames(dst []float64) (int, error) {
	if d.left == 0 {
		return 0, io.EOF
	}
	n := min(len(dst)/2, d.left)
	clear(dst[:2*n])
	d.left -= n
	return n, nil
}

// TestLossyFacts: a lossy file has no bit depth (JSON null, issue 9), and
// its bit-rate mode and tags reach the record; a PCM file's JSON keeps its
// depth and has neither key.
func TestLossyFacts(t *testing.T) {
	m := measure.Stream(context.Background(), "ep.mp3", &lossyTone{left: rate}, measure.Options{})
	if m.Error != "" {
		t.Fatal(m.Error)
	}
	if m.BitsPerSample != 0 || m.BitRateMode != "cbr" || strings.Join(m.Tags, " ") != "id3v2.4 id3v1" || m.BitRateKbps != 128 {
		t.Errorf("facts: bits %d, mode %q, tags %v, %v kbps", m.BitsPerSample, m.BitRateMode, m.Tags, m.BitRateKbps)
	}
	b, err := json.Marshal(m)
	if err != nil {
		t.Fatal(err)
	}
	for _, want := range []string{`"bits_per_sample":null`, `"bit_rate_mode":"cbr"`, `"tags":["id3v2.4","id3v1"]`} {
		if !strings.Contains(string(b), want) {
			t.Errorf("JSON lacks %s: %s", want, b)
		}
	}
	var back measure.Measurement
	if err := json.Unmarshal(b, &back); err != nil || back.BitsPerSample != 0 {
		t.Errorf("round trip: %v, bits %d", err, back.BitsPerSample)
	}
	pcm, err := json.Marshal(&measure.Measurement{BitsPerSample: 24})
	if err != nil {
		t.Fatal(err)
	}
	if s := string(pcm); !strings.Contains(s, `"bits_per_sample":24`) || strings.Contains(s, "bit_rate_mode") || strings.Contains(s, `"tags"`) {
		t.Errorf("PCM JSON: %s", s)
	}
}
