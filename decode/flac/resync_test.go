package flac

import (
	"context"
	"fmt"
	"os"
	"path/filepath"
	"reflect"
	"strings"
	"testing"

	"github.com/kweigh/kweigh/internal/audiotest"
	kmeasure "github.com/kweigh/kweigh/measure"
)

// The resynchronisation tests damage mono16-44k.flac (17 frames of 4096
// samples, the last 614; flac --best, see testdata/README.md) in the ways a
// transfer or a disk can, and check what is delivered, what the error says
// and what a measurement of the file reports.

// cutRanges returns samples without the sample ranges [a, b) in ranges
// (mono: one sample per frame).
func cutRanges(samples []float64, ranges ...[2]int) []float64 {
	var out []float64
	prev := 0
	for _, r := range ranges {
		out = append(out, samples[prev:r[0]]...)
		prev = r[1]
	}
	return append(out, samples[prev:]...)
}

func TestResynchronisation(t *testing.T) {
	data := audiotest.Fixture(t, "mono16-44k.flac")
	offs := frameOffsets(t, data) // 17 frame starts and the end
	clean, err, _ := decodeAll(t, data, DefaultOptions(), 4096)
	if err != nil {
		t.Fatal(err)
	}
	const block = 4096
	frame := func(k int) (int, int) { return int(offs[k]), int(offs[k+1]) }
	flip := func(pos int) []byte { b := clone(data); b[pos] ^= 0x10; return b }
	remove := func(a, b int) []byte { return append(clone(data[:a]), data[b:]...) }
	zero := func(a, b int) []byte { d := clone(data); clear(d[a:b]); return d }
	insert := func(at int, junk []byte) []byte {
		return append(append(clone(data[:at]), junk...), data[at:]...)
	}
	s5, e5 := frame(5)
	s9, e9 := frame(9)
	s16, _ := frame(16)
	tests := []struct {
		name    string
		data    []byte
		lost    [][2]int // sample ranges missing from the delivery
		says    []string // the error must say these
		stretch int      // damaged stretches
	}{
		{"bit flipped in frame 5's audio", flip((s5 + e5) / 2), [][2]int{{5 * block, 6 * block}},
			[]string{fmt.Sprintf("frame 5 at byte %d", s5), "CRC-16", fmt.Sprintf("next valid frame, byte %d", e5), "4096 samples per channel (0.093 s) lost"}, 1},
		{"bit flipped in frame 5's header", flip(s5 + 2), [][2]int{{5 * block, 6 * block}},
			[]string{fmt.Sprintf("frame 5 at byte %d", s5), "4096 samples per channel"}, 1},
		{"CRC-16 of frame 9 wrong", flip(e9 - 1), [][2]int{{9 * block, 10 * block}},
			[]string{"CRC-16", "4096 samples per channel"}, 1},
		{"frame 5 cut out", remove(s5, e5), [][2]int{{5 * block, 6 * block}},
			[]string{"jumps from sample 20480 to 24576", "4096 samples per channel (0.093 s) missing"}, 1},
		{"frames 5 to 7 zeroed", zero(s5, int(offs[8])), [][2]int{{5 * block, 8 * block}},
			[]string{fmt.Sprintf("next valid frame, byte %d", offs[8]), "12288 samples per channel (0.279 s) lost"}, 1},
		{"junk between frames 5 and 6", insert(e5, []byte("not audio\xff\xf8 at all")), nil,
			[]string{"0 samples per channel"}, 1},
		{"frames 5 and 9 damaged", nil, [][2]int{{5 * block, 6 * block}, {9 * block, 10 * block}},
			[]string{"2 damaged stretches, 8192 samples per channel (0.186 s) lost in all"}, 2},
		{"last frame damaged", flip(s16 + 30), [][2]int{{16 * block, 66150}},
			[]string{"no valid frame after it: the last 614 samples per channel (0.014 s) are lost"}, 1},
		{"file cut inside frame 9", data[:s9+100], [][2]int{{9 * block, 66150}},
			[]string{"the file ends inside the frame", "the last 29286 samples per channel (0.664 s) are lost"}, 1},
	}
	tests[6].data = flip(s9 + 40)
	tests[6].data[(s5+e5)/2] ^= 0x01
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			got, err, d := decodeAll(t, tc.data, DefaultOptions(), 1000)
			if !isIntegrity(err) {
				t.Fatalf("err = %v, want an IntegrityError", err)
			}
			for _, want := range tc.says {
				if !strings.Contains(err.Error(), want) {
					t.Errorf("error %q does not say %q", err, want)
				}
			}
			if want := cutRanges(clean, tc.lost...); !reflect.DeepEqual(got, want) {
				t.Errorf("delivered %d samples, want the %d good ones", len(got), len(want))
			}
			if n := len(d.Notes()); tc.stretch > 1 && n != tc.stretch {
				t.Errorf("notes %q: want one per damaged stretch", d.Notes())
			}
			if d.MD5Verified() {
				t.Error("MD5 reported verified")
			}

			// measure reports the file damaged, with the duration lost, and
			// measures the audio delivered.
			path := filepath.Join(t.TempDir(), "damaged.flac")
			if err := os.WriteFile(path, tc.data, 0o644); err != nil {
				t.Fatal(err)
			}
			m := kmeasure.File(context.Background(), path, kmeasure.Options{})
			if m.Err != nil || m.Damaged != err.Error() {
				t.Errorf("measure: err %v, damaged %q; want damaged %q", m.Err, m.Damaged, err)
			}
			if want := float64(len(got)) / 44100; m.DurationS != want {
				t.Errorf("measured %.4f s, want the %.4f s delivered", m.DurationS, want)
			}
		})
	}
}

// TestCRCMismatchNeverAccepted corrupts the CRC-16 of every frame in turn:
// each must be reported, never delivered.
func TestCRCMismatchNeverAccepted(t *testing.T) {
	data := audiotest.Fixture(t, "stereo24-48k.flac")
	offs := frameOffsets(t, data)
	for k := range len(offs) - 1 {
		bad := clone(data)
		bad[offs[k+1]-1] ^= 0x01
		got, err, _ := decodeAll(t, bad, DefaultOptions(), 4096)
		if !isIntegrity(err) || !strings.Contains(err.Error(), fmt.Sprintf("frame %d at byte %d: frame CRC-16", k, offs[k])) {
			t.Errorf("frame %d: err = %v", k, err)
		}
		if len(got) >= 28800*2 {
			t.Errorf("frame %d: all %d samples delivered", k, len(got)/2)
		}
	}
}
