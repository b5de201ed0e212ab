package formats_test

import (
	"os"
	"path/filepath"
	"testing"

	"github.com/kweigh/kweigh/decode"
	_ "github.com/kweigh/kweigh/decode/formats"
	"github.com/kweigh/kweigh/internal/audiotest"
)

// sectionFixtures are the committed PCM files of the splittable formats
// (made by sox and flac: see each testdata/README.md).
var sectionFixtures = []string{
	"../aiff/testdata/mono24-48k.aiff",
	"../aiff/testdata/mono24-48k.wav",
	"../aiff/testdata/stereo16-44k.aiff",
	"../aiff/testdata/stereo16-44k.aifc",
	"../aiff/testdata/stereo16-44k-fl32.aifc",
	"../aiff/testdata/stereo16-44k.wav",
	"../flac/testdata/surround51-16-44k.wav",
	"../flac/testdata/stereo24-48k.wav",
}

// TestSectionsReadWhatTheWholeStreamHolds checks decode.Splitter on WAV and
// AIFF: every section, at cuts at the start, inside, at the end and empty,
// delivers exactly the samples of the same frames of a one-pass decode,
// then a clean io.EOF; the decoder it came from still reads from frame 0.
func TestSectionsReadWhatTheWholeStreamHolds(t *testing.T) {
	for _, path := range sectionFixtures {
		t.Run(filepath.Base(filepath.Dir(filepath.Dir(path)))+"/"+filepath.Base(path), func(t *testing.T) {
			whole, info := audiotest.DecodeFile(t, path)
			f, err := decode.Open(path)
			if err != nil {
				t.Fatal(err)
			}
			defer f.Close()
			s, ok := decode.Splittable(f)
			if !ok {
				t.Fatalf("%s: %s decoder is not splittable", path, info.Container)
			}
			total := int64(len(whole) / info.Channels)
			if got := s.SplitFrames(); got != total {
				t.Fatalf("SplitFrames %d, one pass decoded %d", got, total)
			}
			for _, cut := range [][2]int64{{0, total}, {0, 1}, {1, total}, {total / 3, 2 * total / 3}, {total - 1, total}, {total / 2, total / 2}} {
				sec, err := s.Section(cut[0], cut[1])
				if err != nil {
					t.Fatal(err)
				}
				got, err := audiotest.ReadAll(t, sec, 777)
				if err != nil {
					t.Fatalf("section %v: %v", cut, err)
				}
				want := whole[cut[0]*int64(info.Channels) : cut[1]*int64(info.Channels)]
				if len(got) != len(want) {
					t.Fatalf("section %v: %d samples, want %d", cut, len(got), len(want))
				}
				for i := range want {
					if got[i] != want[i] {
						t.Fatalf("section %v: sample %d is %v, one pass %v", cut, i, got[i], want[i])
					}
				}
			}
			if _, err := s.Section(0, total+1); err == nil {
				t.Error("a section beyond the last frame was accepted")
			}
			again, err := audiotest.ReadAll(t, f, 4096)
			if err != nil || len(again) != len(whole) {
				t.Fatalf("the decoder sections came from read %d samples (%v), want %d from frame 0", len(again), err, len(whole))
			}
		})
	}
}

// TestTruncatedFilesAreNotSplit checks that a file whose audio is cut
// short offers no sections (SplitFrames 0), so its damage is reported in
// one pass, in order.
func TestTruncatedFilesAreNotSplit(t *testing.T) {
	for _, path := range []string{"../aiff/testdata/stereo16-44k.aiff", "../flac/testdata/stereo24-48k.wav"} {
		data, err := os.ReadFile(path)
		if err != nil {
			t.Fatal(err)
		}
		cut := filepath.Join(t.TempDir(), "cut"+filepath.Ext(path))
		if err := os.WriteFile(cut, data[:len(data)-1001], 0o644); err != nil {
			t.Fatal(err)
		}
		f, err := decode.Open(cut)
		if err != nil {
			t.Fatal(err)
		}
		s, ok := decode.Splittable(f)
		if !ok || s.SplitFrames() != 0 {
			t.Errorf("%s cut short: splittable %v, SplitFrames %v; want 0", path, ok, s.SplitFrames())
		}
		f.Close()
	}
}
