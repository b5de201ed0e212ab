package measure_test

import (
	"context"
	"fmt"
	"math"
	"os"
	"path/filepath"
	"reflect"
	"strings"
	"testing"

	"github.com/kweigh/kweigh/decode"
	"github.com/kweigh/kweigh/measure"
)

// sameMeasurement reports the first difference between two measurements:
// every field equal, except float64 figures within 1e-9 (loudness in LU,
// peaks in dB, DC offset and correlation as fractions of full scale: the
// bound issue 14 sets for a file measured in sections, whose sums are added
// in another order; common practice, no published source) and float32
// series values within 1e-5 (one unit in the last place of a float32 near
// −20 LUFS is 2e-6).
func sameMeasurement(a, b reflect.Value, path string) string {
	switch a.Kind() {
	case reflect.Float64:
		x, y := a.Float(), b.Float()
		if x == y || math.Abs(x-y) <= 1e-9 || x != x && y != y {
			return ""
		}
		return fmt.Sprintf("%s: %.17g, one pass %.17g", path, x, y)
	case reflect.Float32:
		x, y := a.Float(), b.Float()
		if x == y || math.Abs(x-y) <= 1e-5 || x != x && y != y {
			return ""
		}
		return fmt.Sprintf("%s: %v, one pass %v", path, x, y)
	case reflect.Pointer, reflect.Interface:
		if a.IsNil() || b.IsNil() {
			if a.IsNil() != b.IsNil() {
				return fmt.Sprintf("%s: nil in one of them only", path)
			}
			return ""
		}
		return sameMeasurement(a.Elem(), b.Elem(), path)
	case reflect.Struct:
		for i := range a.NumField() {
			if !a.Type().Field(i).IsExported() {
				continue
			}
			if d := sameMeasurement(a.Field(i), b.Field(i), path+"."+a.Type().Field(i).Name); d != "" {
				return d
			}
		}
		return ""
	case reflect.Slice:
		if a.Len() != b.Len() {
			return fmt.Sprintf("%s: %d elements, one pass %d", path, a.Len(), b.Len())
		}
		for i := range a.Len() {
			if d := sameMeasurement(a.Index(i), b.Index(i), fmt.Sprintf("%s[%d]", path, i)); d != "" {
				return d
			}
		}
		return ""
	}
	if !reflect.DeepEqual(a.Interface(), b.Interface()) {
		return fmt.Sprintf("%s: %v, one pass %v", path, a.Interface(), b.Interface())
	}
	return ""
}

// TestSectionsGiveTheOnePassFigures measures files in sections on two and
// three cores and requires the record of one pass: loudness, peaks, the
// series, the fold-down, the clipping runs (runs that cross a cut, and one
// that spans a whole section), silence at both ends spanning cuts, DC,
// correlation and its 3 s minimum, dual mono, at edge lengths (exactly two
// sections, a last section shorter than the pre-roll), and the same error
// for an unmeasurable sample in a later section.
func TestSectionsGiveTheOnePassFigures(t *testing.T) {
	dir := t.TempDir()
	write := func(name string, data []byte) string {
		p := filepath.Join(dir, name)
		if err := os.WriteFile(p, data, 0o644); err != nil {
			t.Fatal(err)
		}
		return p
	}
	clipped := func() []byte {
		x := programmeOf(44100, 2, 70, 5)
		for i := 0; i < len(x)/2; i++ {
			s := float64(i) / 44100
			if s >= 29.5 && s < 30.5 {
				x[2*i] = 1
			}
			if s >= 25 && s < 65 {
				x[2*i+1] = -1
			}
		}
		return wavBytesAt(44100, 2, 16, 0, x)
	}
	quiet := func() []byte {
		x := programmeOf(48000, 2, 64, 6)
		for i := range x {
			if s := float64(i/2) / 48000; s < 40 || s >= 50 {
				x[i] *= 1e-4
			}
		}
		return wavBytes(2, 24, false, 0, x)
	}
	dual := func() []byte {
		mono := programmeOf(48000, 1, 60, 7)
		x := make([]float64, 0, 2*len(mono))
		for _, v := range mono {
			x = append(x, v, v)
		}
		return wavBytes(2, 24, false, 0, x)
	}
	bad := func() []byte {
		x := programmeOf(48000, 2, 61, 8)
		x[2*48000*45+1] = math.NaN()
		return wavBytes(2, 32, true, 0, x)
	}

	// Each file is made inside its subtest, so that -run can pick one.
	for _, c := range []struct {
		name string
		file string
		make func() []byte
		err  bool
	}{
		{"stereo-61.23s", "stereo.wav", func() []byte { return wavBytes(2, 24, false, 0, programmeOf(48000, 2, 61.23, 1)) }, false},
		{"5.1-60s", "surround.wav", func() []byte { return wavBytes(6, 24, false, 0x3F, programmeOf(48000, 6, 60, 2)) }, false},
		{"clip-runs-44.1k-16bit", "clipped.wav", clipped, false},
		{"silence-at-both-ends", "quiet.wav", quiet, false},
		{"dual-mono", "dual.wav", dual, false},
		{"nan-at-45s", "bad.wav", bad, true},
	} {
		t.Run(c.name, func(t *testing.T) {
			path := write(c.file, c.make())
			want := measure.File(context.Background(), path, measure.Options{KeepSeries: true})
			if c.err != (want.Error != "") {
				t.Fatalf("one pass: error %q", want.Error)
			}
			for _, cores := range []int{2, 3} {
				before := measure.SectionsMeasured()
				got := measure.File(context.Background(), path, measure.Options{KeepSeries: true, Cores: measure.NewCores(cores)})
				if n := measure.SectionsMeasured() - before; n < 2 {
					t.Fatalf("%d cores: %d sections measured, want at least 2", cores, n)
				}
				if d := sameMeasurement(reflect.ValueOf(got).Elem(), reflect.ValueOf(want).Elem(), "Measurement"); d != "" {
					t.Errorf("%d cores: %s", cores, d)
				}
			}
		})
	}
}

// TestSmallAndDamagedFilesStayOnePass checks that files too short to split
// and files whose audio is cut short are measured in one pass (no section),
// the latter still reporting its damage.
func TestSmallAndDamagedFilesStayOnePass(t *testing.T) {
	dir := t.TempDir()
	short := filepath.Join(dir, "short.wav")
	if err := os.WriteFile(short, wavBytes(2, 24, false, 0, programmeOf(48000, 2, 59.9, 3)), 0o644); err != nil {
		t.Fatal(err)
	}
	data := wavBytes(2, 24, false, 0, programmeOf(48000, 2, 90, 4))
	cut := filepath.Join(dir, "cut.wav")
	if err := os.WriteFile(cut, data[:len(data)-48000*6], 0o644); err != nil {
		t.Fatal(err)
	}
	for _, p := range []string{short, cut} {
		before := measure.SectionsMeasured()
		m := measure.File(context.Background(), p, measure.Options{Cores: measure.NewCores(2)})
		if n := measure.SectionsMeasured() - before; n != 0 {
			t.Errorf("%s: %d sections measured, want one pass", p, n)
		}
		if m.Error != "" {
			t.Errorf("%s: %s", p, m.Error)
		}
		if strings.HasSuffix(p, "cut.wav") && m.Damaged == "" {
			t.Errorf("%s: damage not reported", p)
		}
	}
}

// TestFileShrinkingUnderSectionsFallsBackToOnePass truncates a file after
// its header was read: the sections of the first round are measured and
// joined, a later one comes up short, and the file must then be measured
// again in one pass from its first frame, reporting the damage exactly as
// a one-pass measurement of the same shrunken file does.
func TestFileShrinkingUnderSectionsFallsBackToOnePass(t *testing.T) {
	dir := t.TempDir()
	// 11 minutes of 8 kHz mono: two rounds of sections on two cores
	// (sections are at most 5 minutes), small enough to write quickly.
	data := wavBytesAt(8000, 1, 16, 0, programmeOf(8000, 1, 660, 9))
	keep := int64(len(data)) - 8000*2*30 // the last 30 s go
	measureShrunk := func(cores *measure.Cores) *measure.Measurement {
		p := filepath.Join(dir, fmt.Sprintf("shrinking-%v.wav", cores != nil))
		if err := os.WriteFile(p, data, 0o644); err != nil {
			t.Fatal(err)
		}
		d, err := decode.Open(p)
		if err != nil {
			t.Fatal(err)
		}
		defer d.Close()
		if err := os.Truncate(p, keep); err != nil {
			t.Fatal(err)
		}
		return measure.Stream(context.Background(), p, d, measure.Options{Cores: cores})
	}
	want := measureShrunk(nil)
	before := measure.SectionsMeasured()
	got := measureShrunk(measure.NewCores(2))
	if n := measure.SectionsMeasured() - before; n < 3 {
		t.Fatalf("%d sections measured, want the first round and the short one", n)
	}
	if want.Damaged == "" || got.Damaged == "" {
		t.Fatalf("damage not reported: one pass %q, sections %q", want.Damaged, got.Damaged)
	}
	got.Path, want.Path = "", ""
	got.Damaged = strings.ReplaceAll(got.Damaged, "shrinking-true", "shrinking-false")
	if d := sameMeasurement(reflect.ValueOf(got).Elem(), reflect.ValueOf(want).Elem(), "Measurement"); d != "" {
		t.Error(d)
	}
}
