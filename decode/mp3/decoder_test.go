package mp3

import (
	"bytes"
	"errors"
	"io"
	"math"
	"path/filepath"
	"slices"
	"strings"
	"testing"

	gomp3 "github.com/hajimehoshi/go-mp3"

	"github.com/kweigh/kweigh/decode"
	"github.com/kweigh/kweigh/internal/audiotest"
)

// rawGoMP3 decodes b with go-mp3 alone: 16-bit stereo, nothing trimmed.
func rawGoMP3(t *testing.T, b []byte) (left, right []int16) {
	t.Helper()
	d, err := gomp3.NewDecoder(bytes.NewReader(b))
	if err != nil {
		t.Fatal(err)
	}
	raw, err := io.ReadAll(d)
	if err != nil {
		t.Fatal(err)
	}
	for i := 0; i+4 <= len(raw); i += 4 {
		left = append(left, int16(uint16(raw[i])|uint16(raw[i+1])<<8))
		right = append(right, int16(uint16(raw[i+2])|uint16(raw[i+3])<<8))
	}
	return left, right
}

// bestLag returns the lag in [lo, hi] at which b[i+lag] matches a[i] best:
// the smallest residual energy Σ(b[i+lag] − a[i])² over the n samples of a
// from start. (Plain cross-correlation is fooled by the periodic chords,
// whose correlation peaks recur every common period.)
func bestLag(a, b []float64, start, n, lo, hi int) int {
	best, bestSum := lo, math.Inf(1)
	for lag := lo; lag <= hi; lag++ {
		s := 0.0
		for i := start; i < start+n; i++ {
			d := a[i]
			if j := i + lag; j >= 0 && j < len(b) {
				d -= b[j]
			}
			s += d * d
		}
		if s < bestSum {
			best, bestSum = lag, s
		}
	}
	return best
}

func meanSquare(x []float64) float64 {
	s := 0.0
	for _, v := range x {
		s += v * v
	}
	return s / float64(len(x))
}

// sourcePairs lists the MP3 fixtures made from a kept source.
var sourcePairs = []struct {
	mp3, source string
}{
	{"music-s48-128.mp3", "music-s48.flac"},
	{"music-s48-192.mp3", "music-s48.flac"},
	{"music-s48-v2.mp3", "music-s48.flac"},
	{"speech-m44-128.mp3", "speech-m44.flac"},
	{"speech-m44-v2.mp3", "speech-m44.flac"},
	{"hot-s44-128.mp3", "hot-s44.flac"},
}

func TestInfo(t *testing.T) {
	// Expected values: how the fixtures were made (testdata/README.md) and
	// the Xing arithmetic checked in TestParseXingFixtures. VBR bit rates
	// are (Xing bytes − Info frame) × 8 / duration [calc]:
	// (79152 − 384) × 8 / (168 × 1152 / 48000 s) = 156 286 bit/s.
	tests := []struct {
		file     string
		codec    string
		rate     int
		channels int
		layout   []string
		mode     string
		bitRate  int
		frames   int64
		rateMode string
		tags     []string
	}{
		{"music-s48-128.mp3", "mpeg-1 layer 3", 48000, 2, []string{"L", "R"}, "joint stereo", 128000, 192000, "cbr", nil},
		{"music-s48-192.mp3", "mpeg-1 layer 3", 48000, 2, []string{"L", "R"}, "joint stereo", 192000, 192000, "cbr", nil},
		{"music-s48-v2.mp3", "mpeg-1 layer 3", 48000, 2, []string{"L", "R"}, "joint stereo", 156286, 192000, "vbr", nil},
		{"speech-m44-128.mp3", "mpeg-1 layer 3", 44100, 1, []string{"M"}, "mono", 128000, 220500, "cbr", nil},
		{"hot-s44-128.mp3", "mpeg-1 layer 3", 44100, 2, []string{"L", "R"}, "stereo", 128000, 44100, "cbr", nil},
		{"mpeg2-22k.mp3", "mpeg-2 layer 3", 22050, 1, []string{"M"}, "mono", 64000, 44100, "cbr", nil},
		{"tagged-id3v2-id3v1.mp3", "mpeg-1 layer 3", 44100, 1, []string{"M"}, "mono", 64000, 88200, "cbr", []string{"id3v2.3", "id3v1"}},
		// No Info frame: the length is every frame, untrimmed (78 frames,
		// TestNoInfoHeader).
		{"no-info-header.mp3", "mpeg-1 layer 3", 44100, 1, []string{"M"}, "mono", 64000, 78 * 1152, "cbr", nil},
	}
	for _, tt := range tests {
		b := audiotest.Fixture(t, tt.file)
		d, err := New(bytes.NewReader(b), int64(len(b)))
		if err != nil {
			t.Fatalf("%s: %v", tt.file, err)
		}
		got := d.Info()
		if got.Container != "mp3" || got.Codec != tt.codec || got.SampleRate != tt.rate || got.Channels != tt.channels ||
			len(got.Layout) != len(tt.layout) || got.Layout[0] != tt.layout[0] || got.Mode != tt.mode ||
			got.BitRate != tt.bitRate || got.Frames != tt.frames || got.BitsPerSample != 0 || got.SampleFormat != decode.Float ||
			got.BitRateMode != tt.rateMode || !slices.Equal(got.Tags, tt.tags) {
			t.Errorf("%s: got %+v", tt.file, got)
		}
	}
}

func TestMonoIsOneChannel(t *testing.T) {
	b := audiotest.Fixture(t, "speech-m44-128.mp3")
	got := decodeBytes(t, b)
	if got.channels != 1 {
		t.Fatalf("mono MP3 delivered as %d channels", got.channels)
	}
	// go-mp3 itself duplicates the channel: the trap this wrapper handles.
	left, right := rawGoMP3(t, b)
	for i := range left {
		if left[i] != right[i] {
			t.Fatalf("go-mp3 channels differ at %d: not a duplicated mono stream", i)
		}
	}
	// The single channel carries the source's power, not +3.01 dB (two
	// copies summed by BS.1770 would read 10·log10(2) higher [calc]).
	src := readSource(t, "speech-m44.flac")
	diff := 10 * math.Log10(meanSquare(got.samples)/meanSquare(src.samples))
	if math.Abs(diff) > 0.05 {
		t.Errorf("mono power %+.3f dB from the source, want within ±0.05 dB", diff)
	}
}

func TestAlignedWithSource(t *testing.T) {
	// After trimming, the decoded audio must line up with the encoder's
	// input: the issue asks for "within a few samples"; we hold it to ±2
	// samples of lag and an exact length (the Xing arithmetic gives the
	// source length exactly, TestParseXingFixtures). SNR floors are what
	// these encodes reach with go-mp3 minus a margin [calc]; a misalignment
	// of even one sample drops them far below.
	tests := []struct {
		mp3, source string
		minSNR      float64 // dB
	}{
		{"music-s48-128.mp3", "music-s48.flac", 30},
		{"music-s48-192.mp3", "music-s48.flac", 35},
		{"music-s48-v2.mp3", "music-s48.flac", 33},
		{"speech-m44-128.mp3", "speech-m44.flac", 50},
		{"speech-m44-v2.mp3", "speech-m44.flac", 35},
	}
	for _, tt := range tests {
		src := readSource(t, tt.source)
		got := decodeFixture(t, tt.mp3)
		if got.err != nil {
			t.Fatalf("%s: %v", tt.mp3, got.err)
		}
		if got.frames() != src.frames() || got.channels != src.channels {
			t.Errorf("%s: %d frames × %d channels, source %d × %d", tt.mp3, got.frames(), got.channels, src.frames(), src.channels)
			continue
		}
		for c := range src.channels {
			a, b := src.channel(c), got.channel(c)
			if lag := bestLag(a, b, len(a)/4, len(a)/2, -64, 64); lag < -2 || lag > 2 {
				t.Errorf("%s channel %d: lag %d samples, want |lag| ≤ 2", tt.mp3, c, lag)
			}
			var sig, noise float64
			for i := range a {
				sig += a[i] * a[i]
				noise += (b[i] - a[i]) * (b[i] - a[i])
			}
			if snr := 10 * math.Log10(sig/noise); snr < tt.minSNR {
				t.Errorf("%s channel %d: SNR %.1f dB, want ≥ %.0f dB", tt.mp3, c, snr, tt.minSNR)
			}
		}
	}
}

func TestSynthesisDelay(t *testing.T) {
	// Measure go-mp3's own alignment: in its untrimmed output the source
	// appears after the Info frame (1152 samples), the encoder delay from
	// the extension (576) and the synthesis delay. Gapless practice puts
	// the latter at 529 samples (common practice, no published source);
	// this checks that go-mp3 agrees, exactly.
	// The hot fixture's square waves are periodic and correlate at many
	// lags; the others start with a fade-in over noise and do not.
	for _, tt := range sourcePairs[:5] {
		b := audiotest.Fixture(t, tt.mp3)
		frame, h := firstFrameOf(t, b)
		x, _ := parseXing(frame, h)
		src := readSource(t, tt.source)
		left, _ := rawGoMP3(t, b)
		raw := make([]float64, len(left))
		for i, v := range left {
			raw[i] = float64(v) / 32767
		}
		a := src.channel(0)
		lag := bestLag(a, raw, 0, 16384, 0, 4000)
		if got := lag - h.samplesPerFrame() - x.delay; got != SynthesisDelay {
			t.Errorf("%s: go-mp3 output lags the source by %d = %d (Info frame) + %d (encoder delay) + %d; want synthesis delay %d",
				tt.mp3, lag, h.samplesPerFrame(), x.delay, got, SynthesisDelay)
		}
	}
}

func TestInfoFrameDroppedExactly(t *testing.T) {
	// go-mp3 (the previous decoder, kept as a test oracle) decodes the
	// Info frame as 1152 samples of silence (verified here); the decoder
	// skips it and the delays, so sample i is go-mp3's raw sample 1152 +
	// 576 + 529 + i divided by 32767, within go-mp3's own rounding to 16
	// bits (it truncates after float32 arithmetic: within 1.01 steps of
	// 1/32767, the hundredth for its float32 error), everywhere go-mp3
	// does not clip (music at −6 dBFS peak: nowhere).
	b := audiotest.Fixture(t, "music-s48-128.mp3")
	left, right := rawGoMP3(t, b)
	for i := range 1152 {
		if left[i] != 0 || right[i] != 0 {
			t.Fatalf("go-mp3 decoded the Info frame to non-zero sample %d (%d, %d)", i, left[i], right[i])
		}
	}
	got := decodeBytes(t, b)
	const offset = 1152 + 576 + SynthesisDelay
	if got.frames() != 192000 || len(left) < offset+got.frames() {
		t.Fatalf("%d frames delivered, go-mp3 has %d", got.frames(), len(left))
	}
	worst := 0.0
	for i := range got.frames() {
		for c, raw := range [2][]int16{left, right} {
			v := raw[offset+i]
			if v == 32767 || v == -32767 || v == -32768 {
				continue
			}
			e := math.Abs(got.samples[2*i+c]*32767 - float64(v))
			worst = max(worst, e)
			if e > 1.01 {
				t.Fatalf("frame %d channel %d: got %v (%.3f steps), go-mp3 %d", i, c, got.samples[2*i+c], got.samples[2*i+c]*32767, v)
			}
		}
	}
	t.Logf("largest difference from go-mp3: %.3f steps of 1/32767", worst)
}

func TestPowerMatchesSource(t *testing.T) {
	// Unweighted power of the decoded MP3 against its source, a stand-in
	// for the ±0.2 LU loudness requirement that does not need the engine.
	// Tolerance 0.1 dB: half the issue's ±0.2 LU, since K-weighting changes
	// both sides alike [calc].
	for _, tt := range sourcePairs[:5] {
		src := readSource(t, tt.source)
		got := decodeFixture(t, tt.mp3)
		if diff := 10 * math.Log10(meanSquare(got.samples)/meanSquare(src.samples)); math.Abs(diff) > 0.1 {
			t.Errorf("%s: power %+.3f dB from the source, want within ±0.1 dB", tt.mp3, diff)
		}
	}
}

func TestOversKept(t *testing.T) {
	// The square waves of hot-s44 overshoot by the Gibbs ≈ 9 % when band
	// limited [memory: handbook fact]: the decoder keeps those overs (no
	// clamp at full scale), so true-peak measurement sees them, and says
	// nothing about clipping.
	got := decodeFixture(t, "hot-s44-128.mp3")
	peak := 0.0
	for _, v := range got.samples {
		peak = max(peak, math.Abs(v))
	}
	if peak <= 1.01 {
		t.Errorf("peak %.4f: want the decoded overs above full scale kept", peak)
	}
	if len(got.notes) != 0 {
		t.Errorf("notes %q, want none", got.notes)
	}
	t.Logf("decoded peak %.4f (%+.2f dBFS)", peak, 20*math.Log10(peak))
}

func itoa(n int) string {
	b := []byte{}
	for {
		b = append([]byte{byte('0' + n%10)}, b...)
		n /= 10
		if n == 0 {
			return string(b)
		}
	}
}

func TestTagsSkipped(t *testing.T) {
	b := audiotest.Fixture(t, "tagged-id3v2-id3v1.mp3")
	tagged := decodeBytes(t, b)
	// The same frames without their tags (ID3v2 is 502 bytes, ID3v1 128;
	// TestAudioBoundsFixture) decode to the same samples.
	bare := decodeBytes(t, b[502:len(b)-128])
	if tagged.err != nil || len(tagged.notes) != 0 || tagged.frames() != 88200 {
		t.Fatalf("tagged: err %v, notes %q, %d frames (want 88200 = 2 s × 44.1 kHz)", tagged.err, tagged.notes, tagged.frames())
	}
	if !equalSamples(tagged.samples, bare.samples) {
		t.Error("tagged and untagged frames decode differently")
	}
	// APEv2 and ID3v1 appended, ID3v2.4 with a footer in front.
	built := append(append(id3v24(64, true), b[502:len(b)-128]...), append(apeTag(), id3v1()...)...)
	if got := decodeBytes(t, built); got.err != nil || len(got.notes) != 0 || !equalSamples(got.samples, bare.samples) {
		t.Errorf("APEv2/ID3v1/ID3v2.4 tags: err %v, notes %q, %d frames", got.err, got.notes, got.frames())
	}
}

func equalSamples(a, b []float64) bool {
	if len(a) != len(b) {
		return false
	}
	for i := range a {
		if a[i] != b[i] {
			return false
		}
	}
	return true
}

func TestNoInfoHeader(t *testing.T) {
	got := decodeFixture(t, "no-info-header.mp3")
	// 16300 bytes of 64 kbit/s 44.1 kHz frames (208/209 bytes) = 78 frames
	// of 1152 samples, nothing trimmed [calc].
	if got.err != nil || got.frames() != 78*1152 || got.dec.Info().Frames != 78*1152 {
		t.Errorf("err %v, %d frames (want %d), Info.Frames %d", got.err, got.frames(), 78*1152, got.dec.Info().Frames)
	}
	if len(got.notes) != 1 || !bytes.Contains([]byte(got.notes[0]), []byte("no Xing/Info header")) {
		t.Errorf("notes %q, want the untrimmed note", got.notes)
	}
}

func TestMPEG25(t *testing.T) {
	// lame -b 16 --resample 8 of the first 2 s of speech-m44 (testdata/
	// README.md): its frames are too short for an Info frame, so the
	// stream is decoded untrimmed (with a note), and every sample agrees
	// with Debian's lame --decode (which drops the 529-sample decoder
	// delay) within 1.5 steps of 2⁻¹⁵, as in TestAgainstLameDecoder.
	got := decodeFixture(t, "mpeg25-8k.mp3")
	if got.err != nil || got.rate != 8000 || got.channels != 1 || got.frames() != 30*576 {
		t.Fatalf("err %v, %d frames at %d Hz; want 30 frames of 576 at 8000 Hz", got.err, got.frames(), got.rate)
	}
	ref, _ := lameDecode(t, filepath.Join("testdata", "mpeg25-8k.mp3"))
	if len(ref) != got.frames()-SynthesisDelay {
		t.Fatalf("%d samples, lame --decode %d", got.frames(), len(ref))
	}
	worst := 0.0
	for i, v := range ref {
		worst = max(worst, math.Abs(got.samples[SynthesisDelay+i]-v)*32768)
	}
	t.Logf("largest difference from lame --decode: %.3f steps", worst)
	if worst > 1.5 {
		t.Errorf("largest difference from lame --decode %.3f steps of 2⁻¹⁵, bound 1.5", worst)
	}
}

func TestMPEG2(t *testing.T) {
	got := decodeFixture(t, "mpeg2-22k.mp3")
	if got.err != nil || len(got.notes) != 0 || got.frames() != 44100 || got.rate != 22050 {
		t.Errorf("err %v, notes %q, %d frames at %d Hz; want 44100 at 22050 (2 s)", got.err, got.notes, got.frames(), got.rate)
	}
	src := readSource(t, "speech-m44.flac")
	// Resampling to 22.05 kHz drops nothing of this band-limited signal
	// below 6 kHz but a 2:1 decimation of its first 2 s.
	srcPower := meanSquare(src.samples[:88200])
	if diff := 10 * math.Log10(meanSquare(got.samples)/srcPower); math.Abs(diff) > 0.2 {
		t.Errorf("MPEG-2 power %+.3f dB from the source, want within ±0.2 dB", diff)
	}
}

func TestRejected(t *testing.T) {
	// Free format comes from lame (testdata/README.md); a
	// Layer II stream is made by relabelling the headers of a 64 kbit/s
	// Layer III file: layer bits '10', bit-rate index 4 (64 kbit/s in the
	// MPEG-1 Layer II table, index 5 in Layer III [memory, ISO/IEC 11172-3
	// §2.4.2.3]); both layers then have 144·bitrate/fs-byte frames.
	layer2 := append([]byte(nil), audiotest.Fixture(t, "no-info-header.mp3")...)
	for off := 0; off+4 <= len(layer2); {
		h, err := parseHeader(layer2[off:])
		if err != nil {
			t.Fatalf("byte %d: %v", off, err)
		}
		if h.bitRate != 64000 {
			t.Fatalf("byte %d: %d bit/s, want 64000", off, h.bitRate)
		}
		layer2[off+1] = layer2[off+1]&^0x06 | 0x04
		layer2[off+2] = layer2[off+2]&0x0F | 4<<4
		off += h.frameLen()
	}
	tests := map[string][]byte{
		"free-format.mp3": audiotest.Fixture(t, "free-format.mp3"),
		"layer II":        layer2,
	}
	for name, b := range tests {
		if !Match(bytes.NewReader(b), int64(len(b))) {
			t.Errorf("%s: not matched, so the user would not learn why it is refused", name)
		}
		_, err := decode.New(bytes.NewReader(b))
		var ue *decode.UnsupportedError
		if !errors.As(err, &ue) {
			t.Errorf("%s: got %v, want *decode.UnsupportedError", name, err)
			continue
		}
		t.Logf("%s: %v", name, err)
	}
}

func TestTruncated(t *testing.T) {
	got := decodeFixture(t, "truncated.mp3")
	// 30001 bytes of 384-byte frames: the Info frame, 77 audio frames and
	// 49 bytes of frame 78, which starts at 78 × 384 = 29952 [calc].
	var ie *decode.IntegrityError
	if !errors.As(got.err, &ie) || ie.Offset != 29952 {
		t.Fatalf("got %v, want an *decode.IntegrityError at byte 29952", got.err)
	}
	// 77 frames decoded, untrimmed: the Info header declares 168 frames
	// (TestParseXingFixtures), the stream holds 77, so its delay and
	// padding are not applied.
	if want := 77 * 1152; got.frames() != want {
		t.Errorf("%d frames delivered, want %d", got.frames(), want)
	}
	if len(got.notes) != 1 || !strings.Contains(got.notes[0], "declares 168 audio frames but the stream holds 77") {
		t.Errorf("notes %q, want the frame-count disagreement", got.notes)
	}
}

func TestCutEverywhere(t *testing.T) {
	// Cut the file at many points, at and between frame boundaries: never a
	// panic, always an IntegrityError (every cut loses declared frames).
	b := audiotest.Fixture(t, "music-s48-128.mp3")
	for _, n := range []int{384 + 1, 384 + 4, 2 * 384, 2*384 + 37, 5000, 40 * 384, 64000, len(b) - 1} {
		got := decodeBytes(t, b[:n])
		var ie *decode.IntegrityError
		if !errors.As(got.err, &ie) {
			t.Errorf("cut at %d: got %v, want *decode.IntegrityError", n, got.err)
		}
	}
	// Cut inside the Info frame: New refuses.
	if _, err := New(bytes.NewReader(b[:300]), 300); err == nil {
		t.Error("cut inside the first frame: accepted")
	}
}

func TestGarbageMidStream(t *testing.T) {
	b := append([]byte(nil), audiotest.Fixture(t, "music-s48-128.mp3")...)
	clean := decodeBytes(t, b)
	for i := 20000; i < 21000; i++ {
		b[i] = byte(i * 7)
	}
	got := decodeBytes(t, b)
	// The frame at 52 × 384 = 19968 is intact up to byte 20000 (its main
	// data damaged: the first damage); the next header, at 20352, is
	// destroyed; frames resume at 55 × 384 = 21120. The two frames in
	// between (768 bytes) are skipped and counted; decoding goes on.
	var ie *decode.IntegrityError
	if !errors.As(got.err, &ie) || ie.Offset != 19968 || !strings.Contains(ie.Problem, "768 bytes at byte 20352 (frames resume at byte 21120)") ||
		!strings.Contains(ie.Problem, "about 2 frames (2304 samples, 0.048 s) lost") {
		t.Fatalf("got %v, want damage from byte 19968 with 768 bytes skipped at 20352, frames resuming at 21120", got.err)
	}
	if got.frames() != clean.frames()-2*1152 {
		t.Errorf("%d frames delivered, want the clean %d less the 2 skipped frames", got.frames(), clean.frames())
	}
}

func TestTrailingBytesNoted(t *testing.T) {
	b := audiotest.Fixture(t, "music-s48-128.mp3")
	clean := decodeBytes(t, b)
	junk := append(append([]byte(nil), b...), []byte("recorded at Saltmarsh Audio Works")...)
	got := decodeBytes(t, junk)
	if got.err != nil || len(got.notes) != 1 || !equalSamples(got.samples, clean.samples) {
		t.Errorf("err %v, notes %q, equal samples %v", got.err, got.notes, equalSamples(got.samples, clean.samples))
	}
}

func TestStreamChange(t *testing.T) {
	// A stereo stream followed by a mono one: only the first part is
	// decoded, and the change is reported as damage.
	stereo := audiotest.Fixture(t, "music-s48-128.mp3")
	mono := audiotest.Fixture(t, "speech-m44-128.mp3")
	got := decodeBytes(t, append(append([]byte(nil), stereo...), mono...))
	var ie *decode.IntegrityError
	if !errors.As(got.err, &ie) || ie.Offset != int64(len(stereo)) {
		t.Errorf("got %v, want damage at byte %d", got.err, len(stereo))
	}
}

func TestBufferSizes(t *testing.T) {
	b := audiotest.Fixture(t, "speech-m44-v2.mp3")
	want := decodeBytes(t, b).samples
	for _, size := range []int{1, 7, 576, 1152, 1153, 100000} {
		d, err := New(bytes.NewReader(b), int64(len(b)))
		if err != nil {
			t.Fatal(err)
		}
		buf := make([]float64, size)
		var got []float64
		for {
			n, err := d.ReadFrames(buf)
			got = append(got, buf[:n]...)
			if err == io.EOF {
				break
			}
			if err != nil {
				t.Fatal(err)
			}
		}
		if !equalSamples(got, want) {
			t.Errorf("buffer of %d: %d samples differ from %d", size, len(got), len(want))
		}
	}
	d, _ := New(bytes.NewReader(b), int64(len(b)))
	stereo := decodeFixture(t, "music-s48-128.mp3").dec
	if _, err := d.ReadFrames(make([]float64, 3)); err != nil {
		t.Errorf("mono, 3 samples: %v", err)
	}
	if _, err := stereo.ReadFrames(make([]float64, 3)); err == nil {
		t.Error("stereo, 3 samples: no error")
	}
}

func TestEOFRepeats(t *testing.T) {
	got := decodeFixture(t, "speech-m44-128.mp3")
	for range 3 {
		if n, err := got.dec.ReadFrames(make([]float64, 10)); n != 0 || err != io.EOF {
			t.Fatalf("after the end: %d, %v", n, err)
		}
	}
}
