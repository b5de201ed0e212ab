package main

import (
	"encoding/json"
	"math"
	"path/filepath"
	"testing"

	"github.com/kweigh/kweigh/internal/audiotest"
)

// TestJobsSplitALongFileWithTheSameFigures runs `kweigh measure` on one
// long file (70 s, long enough to be cut into sections) with --jobs 1 and
// --jobs 2: with two cores the file is measured in sections (measure's
// TestSectionsGiveTheOnePassFigures checks that such a file is cut), and every
// number of the JSON record must agree with one core's within 1e-9
// (loudness in LU, peaks in dB; the bound issue 14 sets, common practice,
// no published source) and every other field exactly.
func TestJobsSplitALongFileWithTheSameFigures(t *testing.T) {
	dir := t.TempDir()
	// A 997 Hz tone (the usual test-tone frequency) at −20 dBFS left and
	// −23 dBFS right, at 8 kHz to keep the file small.
	writeTestFile(t, dir, "long-tone.wav", audiotest.PCMWAV(8000, 2, 16, audiotest.Sine(8000, 70, 997, audiotest.DBFS(-20), audiotest.DBFS(-23))))
	path := filepath.Join(dir, "long-tone.wav")
	decodeRecord := func(jobs string) map[string]any {
		code, out, errOut := kweigh(t, "measure", "--jobs", jobs, "--format", "json", path)
		if code != 0 {
			t.Fatalf("--jobs %s: exit %d: %s", jobs, code, errOut)
		}
		var doc map[string]any
		if err := json.Unmarshal([]byte(out), &doc); err != nil {
			t.Fatalf("--jobs %s: %v\n%s", jobs, err, out)
		}
		return doc
	}
	one, two := decodeRecord("1"), decodeRecord("2")
	var compare func(a, b any, at string)
	compare = func(a, b any, at string) {
		switch x := a.(type) {
		case float64:
			y, ok := b.(float64)
			if !ok || math.Abs(x-y) > 1e-9 {
				t.Errorf("%s: %v with two jobs, %v with one", at, a, b)
			}
		case map[string]any:
			y, _ := b.(map[string]any)
			if len(x) != len(y) {
				t.Errorf("%s: %d fields with two jobs, %d with one", at, len(x), len(y))
			}
			for k := range x {
				if k == "elapsed_s" || k == "generated" { // the run's own time
					continue
				}
				compare(x[k], y[k], at+"."+k)
			}
		case []any:
			y, _ := b.([]any)
			if len(x) != len(y) {
				t.Errorf("%s: %d elements with two jobs, %d with one", at, len(x), len(y))
				return
			}
			for i := range x {
				compare(x[i], y[i], at)
			}
		default:
			if a != b {
				t.Errorf("%s: %v with two jobs, %v with one", at, a, b)
			}
		}
	}
	compare(two, one, "record")
	if one["files"] == nil && one["integrated_lufs"] == nil {
		t.Fatalf("no figures in the record: %v", one)
	}
}
