package opus_test

import (
	"bytes"
	"context"
	"encoding/binary"
	"errors"
	"io"
	"math"
	"os"
	"os/exec"
	"path/filepath"
	"slices"
	"strings"
	"testing"

	"github.com/kweigh/kweigh/decode"
	_ "github.com/kweigh/kweigh/decode/formats"
	"github.com/kweigh/kweigh/decode/opus"
	"github.com/kweigh/kweigh/measure"
)

// run runs a Debian opus-tools program (.ci/setup installs them).
func run(t testing.TB, name string, args ...string) {
	t.Helper()
	p, err := exec.LookPath(name)
	if err != nil {
		t.Fatalf("these tests need %s from opus-tools (run bash .ci/setup): %v", name, err)
	}
	if out, err := exec.Command(p, args...).CombinedOutput(); err != nil {
		t.Fatalf("%s %s: %v\n%s", name, strings.Join(args, " "), err, out)
	}
}

// signal is a deterministic test signal: tones per channel at levels that
// differ by channel, plus noise from a fixed linear congruential generator.
func signal(rate, channels int, seconds float64) []float64 {
	n := int(seconds * float64(rate))
	x := make([]float64, n*channels)
	seed := uint32(777)
	for c := range channels {
		amp := 0.25 / float64(1+c)
		f := 180 * float64(c+1)
		for i := range n {
			seed = seed*1664525 + 1013904223
			noise := (float64(seed>>8)/float64(1<<24) - 0.5) * 0.02
			tm := float64(i) / float64(rate)
			x[i*channels+c] = amp*(math.Sin(2*math.Pi*f*tm)+0.4*math.Sin(2*math.Pi*4.7*f*tm))/1.4 + noise
		}
	}
	return x
}

// writeWAV16 writes a 16-bit PCM WAV (plain header; opusenc picks the
// Vorbis-order mapping for 3–8 channels from the count).
func writeWAV16(t testing.TB, path string, rate, channels int, x []float64) {
	t.Helper()
	le := binary.LittleEndian
	var b bytes.Buffer
	b.WriteString("RIFF")
	binary.Write(&b, le, uint32(36+2*len(x)))
	b.WriteString("WAVEfmt ")
	for _, v := range []any{uint32(16), uint16(1), uint16(channels), uint32(rate), uint32(rate * channels * 2), uint16(channels * 2), uint16(16)} {
		binary.Write(&b, le, v)
	}
	b.WriteString("data")
	binary.Write(&b, le, uint32(2*len(x)))
	for _, v := range x {
		binary.Write(&b, le, int16(max(-32768, min(32767, math.Round(v*32767)))))
	}
	if err := os.WriteFile(path, b.Bytes(), 0o644); err != nil {
		t.Fatal(err)
	}
}

func readAll(t testing.TB, path string) (decode.Info, []float64, *decode.File, error) {
	t.Helper()
	f, err := decode.Open(path)
	if err != nil {
		return decode.Info{}, nil, nil, err
	}
	defer f.Close()
	info := f.Info()
	var all []float64
	buf := make([]float64, 4096*info.Channels)
	for {
		n, err := f.ReadFrames(buf)
		all = append(all, buf[:n*info.Channels]...)
		if err == io.EOF {
			return info, all, f, nil
		}
		if err != nil {
			return info, all, f, err
		}
	}
}

// encodeOpus makes an Opus file from a synthetic WAV with opusenc and the
// reference decoding of it with opusdec --float at 48 kHz.
func encodeOpus(t testing.TB, dir, name string, rate, channels int, seconds float64, opts ...string) (file, ref string) {
	t.Helper()
	src := filepath.Join(dir, name+".wav")
	writeWAV16(t, src, rate, channels, signal(rate, channels, seconds))
	file = filepath.Join(dir, name+".opus")
	run(t, "opusenc", append(append([]string{"--quiet"}, opts...), src, file)...)
	ref = filepath.Join(dir, name+".ref.wav")
	run(t, "opusdec", "--quiet", "--float", "--rate", "48000", file, ref)
	return file, ref
}

// compare checks kweigh's decoding of file against opusdec's: the same
// length, the difference below −120 dBFS RMS, loudness within 0.01 LU
// (the bounds; opusdec is libopus 1.3.1, Debian's opus-tools).
func compare(t *testing.T, file, ref string, layout string) {
	t.Helper()
	info, got, _, err := readAll(t, file)
	if err != nil {
		t.Fatal(err)
	}
	refInfo, wantRaw, _, err := readAll(t, ref)
	if err != nil {
		t.Fatal(err)
	}
	// opusdec writes WAV channel order (with a channel mask) for 3–8
	// channels; line its channels up with kweigh's by label.
	want := make([]float64, len(wantRaw))
	refLayout := refInfo.Layout
	if refLayout == nil {
		refLayout = decode.DefaultLayout(refInfo.Channels)
	}
	for c, label := range info.Layout {
		rc := slices.Index(refLayout, label)
		if label == decode.Mono {
			rc = 0
		}
		if rc < 0 {
			t.Fatalf("opusdec's layout %v has no %s", refLayout, label)
		}
		for i := 0; i+c < len(want) && i+rc < len(wantRaw); i += info.Channels {
			want[i+c] = wantRaw[i+rc]
		}
	}
	if l := strings.Join(info.Layout, ","); l != layout {
		t.Errorf("layout %s, want %s", l, layout)
	}
	if info.SampleRate != 48000 || info.BitsPerSample != 0 || (info.BitRate <= 0) != (info.Frames < 0) || info.Codec != "opus" {
		t.Errorf("info %+v", info)
	}
	if len(got) != len(want) {
		t.Fatalf("%d samples, opusdec %d", len(got), len(want))
	}
	if info.Frames >= 0 && info.Frames != int64(len(got)/info.Channels) {
		t.Errorf("Info.Frames %d, decoded %d", info.Frames, len(got)/info.Channels)
	}
	var sum float64
	for i := range got {
		d := got[i] - want[i]
		sum += d * d
	}
	if db := 10 * math.Log10(sum/float64(len(got))+1e-300); db > -120 {
		t.Errorf("difference from opusdec %.1f dBFS RMS, want at most -120", db)
	}
	a := measure.File(context.Background(), file, measure.Options{})
	b := measure.File(context.Background(), ref, measure.Options{})
	if a.Err != nil || b.Err != nil || a.Damaged != "" {
		t.Fatalf("%v %v %s", a.Err, b.Err, a.Damaged)
	}
	if d := math.Abs(*a.IntegratedLUFS - *b.IntegratedLUFS); d > 0.01 {
		t.Errorf("integrated %.4f LUFS, opusdec's PCM %.4f", *a.IntegratedLUFS, *b.IntegratedLUFS)
	}
}

func TestAgainstOpusdec(t *testing.T) {
	dir := t.TempDir()
	cases := []struct {
		name           string
		rate, channels int
		opts           []string
		layout         string
	}{
		{"stereo", 48000, 2, []string{"--bitrate", "128"}, "L,R"},
		{"mono speech rate", 16000, 1, []string{"--bitrate", "24"}, "M"},
		{"5.1 from 44.1 kHz", 44100, 6, []string{"--bitrate", "256"}, "L,C,R,Ls,Rs,LFE"},
		{"low rate stereo, SILK or hybrid", 48000, 2, []string{"--bitrate", "20"}, "L,R"},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			file, ref := encodeOpus(t, dir, strings.NewReplacer(" ", "-", ",", "", ".", "").Replace(tc.name), tc.rate, tc.channels, 3, tc.opts...)
			compare(t, file, ref, tc.layout)
		})
	}
}

// TestInputRateNote: the header's input rate is reported.
func TestInputRateNote(t *testing.T) {
	file, _ := encodeOpus(t, t.TempDir(), "r44", 44100, 2, 1)
	m := measure.File(context.Background(), file, measure.Options{})
	if !strings.Contains(strings.Join(m.Notes, ";"), "input was 44100 Hz") {
		t.Errorf("notes %q", m.Notes)
	}
}

// setGain rewrites the OpusHead output gain of an Ogg Opus file and fixes
// the first page's CRC, as a muxer that sets the gain would.
func setGain(t *testing.T, in, out string, q8 int16) {
	b, err := os.ReadFile(in)
	if err != nil {
		t.Fatal(err)
	}
	head := 27 + int(b[26])
	binary.LittleEndian.PutUint16(b[head+16:], uint16(q8))
	pageLen := head
	for _, l := range b[27:head] {
		pageLen += int(l)
	}
	binary.LittleEndian.PutUint32(b[22:], 0)
	binary.LittleEndian.PutUint32(b[22:], opus.PageCRC(b[:pageLen]))
	if err := os.WriteFile(out, b, 0o644); err != nil {
		t.Fatal(err)
	}
}

// TestOutputGain: a −6.0 dB header gain is applied the way opusdec applies
// it.
func TestOutputGain(t *testing.T) {
	dir := t.TempDir()
	file, _ := encodeOpus(t, dir, "g", 48000, 2, 2)
	gained := filepath.Join(dir, "gained.opus")
	setGain(t, file, gained, -6*256)
	ref := filepath.Join(dir, "gained.ref.wav")
	run(t, "opusdec", "--quiet", "--float", "--rate", "48000", gained, ref)
	compare(t, gained, ref, "L,R")
	a := measure.File(context.Background(), file, measure.Options{})
	b := measure.File(context.Background(), gained, measure.Options{})
	if d := *a.IntegratedLUFS - *b.IntegratedLUFS; math.Abs(d-6) > 0.01 {
		t.Errorf("gain changed loudness by %.3f LU, want 6", d)
	}
}

// TestChained: two files one after the other (a chained Ogg stream, RFC
// 3533 section 4) decode like opusdec decodes them.
func TestChained(t *testing.T) {
	dir := t.TempDir()
	a, _ := encodeOpus(t, dir, "a", 48000, 2, 1.5)
	b, _ := encodeOpus(t, dir, "b", 48000, 2, 1)
	ab, _ := os.ReadFile(a)
	bb, _ := os.ReadFile(b)
	// Distinct serials, as a chaining tool would write.
	bb[14] ^= 0x5A
	binary.LittleEndian.PutUint32(bb[22:], 0)
	chained := filepath.Join(dir, "chained.opus")
	os.WriteFile(chained, append(ab, fixCRCs(t, bb)...), 0o644)
	ref := filepath.Join(dir, "chained.ref.wav")
	run(t, "opusdec", "--quiet", "--float", "--rate", "48000", chained, ref)
	compare(t, chained, ref, "L,R")
	m := measure.File(context.Background(), chained, measure.Options{})
	if !strings.Contains(strings.Join(m.Notes, ";"), "2 Opus streams decoded one after another") {
		t.Errorf("notes %q", m.Notes)
	}
	// A 5.1 link after a stereo one is refused clearly.
	six, _ := encodeOpus(t, dir, "six", 48000, 6, 1)
	sb, _ := os.ReadFile(six)
	sb[14] ^= 0x33
	bad := filepath.Join(dir, "mixed.opus")
	os.WriteFile(bad, append(ab, fixCRCs(t, sb)...), 0o644)
	m = measure.File(context.Background(), bad, measure.Options{})
	if m.Err == nil || !strings.Contains(m.Error, "cannot be one measurement") {
		t.Errorf("error %q", m.Error)
	}
}

// fixCRCs gives every page of b the serial of its first page and a fresh
// CRC.
func fixCRCs(t *testing.T, b []byte) []byte {
	serial := binary.LittleEndian.Uint32(b[14:])
	for off := 0; off+27 <= len(b); {
		if string(b[off:off+4]) != "OggS" {
			t.Fatalf("no page at %d", off)
		}
		n := 27 + int(b[off+26])
		for _, l := range b[off+27 : off+n] {
			n += int(l)
		}
		binary.LittleEndian.PutUint32(b[off+14:], serial)
		binary.LittleEndian.PutUint32(b[off+22:], 0)
		binary.LittleEndian.PutUint32(b[off+22:], opus.PageCRC(b[off:off+n]))
		off += n
	}
	return b
}

// TestDamage: a truncated file and a flipped byte are marked damaged with
// the audio before them kept (opusenc's pages hold up to a second, and a
// page that fails is dropped whole).
func TestDamage(t *testing.T) {
	dir := t.TempDir()
	file, _ := encodeOpus(t, dir, "d", 48000, 2, 3)
	b, _ := os.ReadFile(file)
	cut := filepath.Join(dir, "cut.opus")
	os.WriteFile(cut, b[:len(b)*2/3], 0o644)
	flip := filepath.Join(dir, "flip.opus")
	c := append([]byte(nil), b...)
	c[len(c)/2] ^= 0xFF
	os.WriteFile(flip, c, 0o644)
	for _, tc := range []struct{ file, want string }{{cut, "truncated"}, {flip, "checksum"}} {
		m := measure.File(context.Background(), tc.file, measure.Options{})
		if m.Err != nil || !strings.Contains(m.Damaged, tc.want) || m.DurationS < 0.5 || m.DurationS > 2.5 {
			t.Errorf("%s: error %v, damaged %q, %.2f s", tc.file, m.Err, m.Damaged, m.DurationS)
		}
	}
}

// TestParseHead: hand-made headers per RFC 7845 section 5.1.
func TestParseHead(t *testing.T) {
	head := func(ch, family byte, extra ...byte) []byte {
		b := []byte("OpusHead")
		b = append(b, 1, ch, 0x38, 0x01, 0x80, 0xBB, 0, 0, 0, 0, family)
		return append(b, extra...)
	}
	cases := []struct {
		name string
		b    []byte
		err  string
	}{
		{"stereo family 0", head(2, 0), ""},
		{"3 channels family 0", head(3, 0), "at most 2"},
		{"5.1 family 1", head(6, 1, 4, 2, 0, 4, 1, 2, 3, 5), ""},
		{"family 1 mapping out of range", head(2, 1, 1, 0, 0, 7), "maps channel 1"},
		{"family 1 table short", head(6, 1, 4, 2, 0), "too short"},
		{"ambisonics family 2", head(4, 2, 4, 0, 0, 1, 2, 3), "family 2"},
		{"discrete family 255", head(2, 255, 2, 0, 0, 1), "family 255"},
		{"version 16", append(append([]byte("OpusHead"), 16), head(2, 0)[9:]...), "version"},
		{"short", []byte("OpusHead\x01\x02"), "not an OpusHead"},
	}
	for _, tc := range cases {
		h, err := opus.ParseHead(tc.b)
		switch {
		case tc.err == "" && err != nil:
			t.Errorf("%s: %v", tc.name, err)
		case tc.err != "" && (err == nil || !strings.Contains(err.Error(), tc.err)):
			t.Errorf("%s: error %v, want %q", tc.name, err, tc.err)
		case err == nil && (h.PreSkip != 312 || h.InputRate != 48000):
			t.Errorf("%s: pre-skip %d, rate %d", tc.name, h.PreSkip, h.InputRate)
		}
		var u *decode.UnsupportedError
		if strings.Contains(tc.name, "family 2") && !errors.As(err, &u) {
			t.Errorf("%s: want an UnsupportedError, got %T", tc.name, err)
		}
	}
}
