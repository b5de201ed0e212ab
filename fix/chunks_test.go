package fix

import (
	"bytes"
	"context"
	"encoding/binary"
	"math"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"testing"
)

// TestChunksKeptAndBextWritten: a BWF with bext (version 1), iXML and a
// JUNK chunk before the audio and an odd-sized LIST and a cue chunk after
// it comes out with the same size and every byte outside the audio the
// same, except the bext version (raised to 2) and the five loudness fields
// (EBU Tech 3285 v2 §2.3: int16 round(100 × value) at 412, 414, 416, 418
// and 420), which hold the output's measured values; the output then passes
// the bext loudness check, and the decoder reads the values back.
func TestChunksKeptAndBextWritten(t *testing.T) {
	dir := t.TempDir()
	x := programme(t, 9, 4, 2, 48000, -30, -5)
	ixml := `<?xml version="1.0"?><BWFXML><PROJECT>Tidewater Evenings</PROJECT><SCENE>ep 8</SCENE></BWFXML>`
	list := "INFOISFT\x0c\x00\x00\x00Kestrel desk" + "ICMT\x05\x00\x00\x00odd!\x00"
	cue := string([]byte{1, 0, 0, 0, 1, 0, 0, 0, 0, 0, 0, 0, 'd', 'a', 't', 'a', 0, 0, 0, 0, 0, 0, 0, 0, 0x10, 0x27, 0, 0})
	s := wavSpec{rate: 48000, ch: 2, bits: 24,
		before: [][2]string{{"bext", bextBody("Tidewater Evenings ep. 8 final mix")}, {"iXML", ixml}, {"JUNK", string(make([]byte, 27))}},
		after:  [][2]string{{"LIST", list}, {"cue ", cue}},
	}
	in := writeWAV(t, dir, "ep8.wav", s, x)
	r := File(context.Background(), in, options(spec(t, "ebu-r128")))
	checkFixed(t, r, GainAndLimiting, -23, -1)
	a, _ := os.ReadFile(in)
	b, _ := os.ReadFile(*r.Output)
	if len(a) != len(b) {
		t.Fatalf("output %d bytes, input %d", len(b), len(a))
	}
	f, _ := os.Open(in)
	l, err := scanWAV(f, int64(len(a)), 24)
	f.Close()
	if err != nil {
		t.Fatal(err)
	}
	// The scan is checked against the layout written by writeWAV: bext
	// body right after RIFF(12) + fmt(8+16) + bext header(8).
	if l.bextBody != 44 || l.dataOffset != int64(bytes.Index(a, []byte("data"))+8) {
		t.Fatalf("scan found bext at %d, data at %d", l.bextBody, l.dataOffset)
	}
	changed := map[int64]bool{}
	for _, off := range []int64{346, 347, 412, 413, 414, 415, 416, 417, 418, 419, 420, 421} {
		changed[l.bextBody+off] = true
	}
	end := l.dataOffset + l.dataSize
	for i := range int64(len(a)) {
		if i >= l.dataOffset && i < end || changed[i] {
			continue
		}
		if a[i] != b[i] {
			t.Fatalf("byte %d outside the audio changed: %#x → %#x", i, a[i], b[i])
		}
	}
	if bytes.Equal(a[l.dataOffset:end], b[l.dataOffset:end]) {
		t.Fatal("the audio did not change")
	}
	le := binary.LittleEndian
	body := b[l.bextBody:]
	if v := le.Uint16(body[346:]); v != 2 {
		t.Errorf("bext version %d, want 2", v)
	}
	m := r.After.Measurement
	for i, want := range []*float64{m.IntegratedLUFS, m.LoudnessRangeLU, m.TruePeakDBTP, m.MaxMomentaryLUFS, m.MaxShortTermLUFS} {
		got := int16(le.Uint16(body[412+2*i:]))
		if want == nil || float64(got) != math.Round(*want*100) {
			t.Errorf("bext loudness field %d = %d, want round(100 × %v)", i, got, want)
		}
	}
	if m.Bext == nil || m.Bext.LoudnessValue == nil || math.Abs(*m.Bext.LoudnessValue-*m.IntegratedLUFS) > 0.005 {
		t.Errorf("decoder reads bext %+v back", m.Bext)
	}
	for _, c := range r.After.Checks {
		if c.ID == "bext_loudness" && c.Verdict != "pass" {
			t.Errorf("bext_loudness check %s: %s", c.Verdict, c.Reason)
		}
	}
}

// TestAIFFKept: an AIFF made by sox (an independent writer) is fixed in
// AIFF: same size, every byte outside the sound data the same, 16-bit
// big-endian, on target.
func TestAIFFKept(t *testing.T) {
	sox, err := exec.LookPath("sox")
	if err != nil {
		t.Skip("sox not on PATH (installed by .ci/setup)")
	}
	dir := t.TempDir()
	x := programme(t, 10, 3, 2, 44100, -12, -2)
	wav := writeWAV(t, dir, "src.wav", wavSpec{rate: 44100, ch: 2, bits: 16}, x)
	in := filepath.Join(dir, "promo.aiff")
	if out, err := exec.Command(sox, wav, in).CombinedOutput(); err != nil {
		t.Fatalf("sox: %v %s", err, out)
	}
	r := File(context.Background(), in, options(spec(t, "ebu-r128")))
	checkFixed(t, r, Gain, -23, -1)
	if m := r.After.Measurement; m.Format != "aiff" || m.BitsPerSample != 16 {
		t.Errorf("output %s %d-bit", m.Format, m.BitsPerSample)
	}
	a, _ := os.ReadFile(in)
	b, _ := os.ReadFile(*r.Output)
	f, _ := os.Open(in)
	l, err := scanAIFF(f, int64(len(a)), false, 16)
	f.Close()
	if err != nil || len(a) != len(b) {
		t.Fatalf("scan %v, sizes %d/%d", err, len(a), len(b))
	}
	if !bytes.Equal(a[:l.dataOffset], b[:l.dataOffset]) || !bytes.Equal(a[l.dataOffset+l.dataSize:], b[l.dataOffset+l.dataSize:]) {
		t.Error("bytes outside the sound data changed")
	}
}

// toRF64 rewrites a RIFF WAV made by writeWAV (fmt, then data, then
// nothing) as RF64 or BW64 per EBU Tech 3306 / ITU-R BS.2088: the form
// size and the data size set to 0xFFFFFFFF and the real sizes in a ds64
// chunk right after the form header.
func toRF64(t *testing.T, path, magic string) {
	t.Helper()
	le := binary.LittleEndian
	w, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	d := bytes.Index(w, []byte("data"))
	dataSize := le.Uint32(w[d+4:])
	body := append([]byte(nil), w[12:]...)
	le.PutUint32(body[d-12+4:], 0xFFFFFFFF)
	var out []byte
	out = append(out, magic...)
	out = le.AppendUint32(out, 0xFFFFFFFF)
	out = append(out, "WAVE"...)
	out = append(out, "ds64"...)
	out = le.AppendUint32(out, 28)
	out = le.AppendUint64(out, uint64(4+36+len(body)))
	out = le.AppendUint64(out, uint64(dataSize))
	out = le.AppendUint64(out, uint64(dataSize)/6)
	out = le.AppendUint32(out, 0)
	out = append(out, body...)
	if err := os.WriteFile(path, out, 0o644); err != nil {
		t.Fatal(err)
	}
}

// TestRF64AndBW64Kept: RF64 and BW64 files (64-bit sizes in ds64) come
// out in their own container, same bytes outside the audio.
func TestRF64AndBW64Kept(t *testing.T) {
	for _, magic := range []string{"RF64", "BW64"} {
		dir := t.TempDir()
		x := programme(t, 14, 3, 2, 48000, -12, -3)
		in := writeWAV(t, dir, "long.wav", wavSpec{rate: 48000, ch: 2, bits: 24}, x)
		toRF64(t, in, magic)
		r := File(context.Background(), in, options(spec(t, "ebu-r128")))
		checkFixed(t, r, Gain, -23, -1)
		if f := r.After.Measurement.Format; f != strings.ToLower(magic) {
			t.Errorf("%s in, %s out", magic, f)
		}
		a, _ := os.ReadFile(in)
		b, _ := os.ReadFile(*r.Output)
		d := int64(bytes.Index(a, []byte("data")) + 8)
		if len(a) != len(b) || !bytes.Equal(a[:d], b[:d]) || bytes.Equal(a[d:], b[d:]) {
			t.Errorf("%s: header changed or audio did not", magic)
		}
	}
}
