package measure_test

import (
	"context"
	"os"
	"os/exec"
	"path/filepath"
	"reflect"
	"strings"
	"testing"

	"github.com/kweigh/kweigh/measure"
)

// TestFLACSectionsGiveTheOnePassFigures measures a 70 s FLAC file (48 kHz
// stereo 24-bit, made by Debian's flac -5 from synthesised programme) on
// two cores and requires sections to have been measured and the record of
// one pass (sameMeasurement: figures within 1e-9), with the MD5 verified
// across the sections. Then the same with STREAMINFO's MD5 altered (the
// sections are measured and end in the one-pass damage report) and with a
// frame damaged in the middle (the sections give up and one pass reports
// the damage as it does alone).
func TestFLACSectionsGiveTheOnePassFigures(t *testing.T) {
	if _, err := exec.LookPath("flac"); err != nil {
		t.Skip("Debian's flac is not installed (bash .ci/setup installs it)")
	}
	dir := t.TempDir()
	wav := filepath.Join(dir, "in.wav")
	if err := os.WriteFile(wav, wavBytes(2, 24, false, 0, programmeOf(48000, 2, 70, 11)), 0o644); err != nil {
		t.Fatal(err)
	}
	good := filepath.Join(dir, "good.flac")
	if out, err := exec.Command("flac", "--silent", "-5", "-o", good, wav).CombinedOutput(); err != nil {
		t.Fatalf("flac: %v\n%s", err, out)
	}
	data, err := os.ReadFile(good)
	if err != nil {
		t.Fatal(err)
	}
	altered := append([]byte(nil), data...)
	altered[8+18+5] ^= 0x01 // STREAMINFO's MD5: the last 16 of its 34 bytes from byte 8
	damaged := append([]byte(nil), data...)
	damaged[len(damaged)/2] ^= 0xFF
	for _, tc := range []struct {
		name     string
		data     []byte
		sections bool // measured in sections to the end, not sent back to one pass
		damage   string
	}{
		{"good", data, true, ""},
		{"md5-altered", altered, true, "MD5 of the decoded audio"},
		{"frame-damaged", damaged, false, "frame"},
	} {
		t.Run(tc.name, func(t *testing.T) {
			p := filepath.Join(dir, tc.name+".flac")
			if err := os.WriteFile(p, tc.data, 0o644); err != nil {
				t.Fatal(err)
			}
			want := measure.File(context.Background(), p, measure.Options{})
			before := measure.SectionsMeasured()
			got := measure.File(context.Background(), p, measure.Options{Cores: measure.NewCores(2)})
			n := measure.SectionsMeasured() - before
			// 70 s in sections of 27 s (8 MiB of MD5 bytes at most): 3
			// when measured to the end, at least the first round when
			// damage sends the file back to one pass.
			if tc.sections && n != 3 || !tc.sections && n < 1 {
				t.Fatalf("%d sections measured", n)
			}
			if got.Error != "" || want.Error != "" {
				t.Fatalf("errors: sections %q, one pass %q", got.Error, want.Error)
			}
			if !strings.Contains(want.Damaged, tc.damage) || (tc.damage == "") != (want.Damaged == "") {
				t.Fatalf("one pass reports damage %q, want %q", want.Damaged, tc.damage)
			}
			if d := sameMeasurement(reflect.ValueOf(got).Elem(), reflect.ValueOf(want).Elem(), "Measurement"); d != "" {
				t.Error(d)
			}
		})
	}
}
