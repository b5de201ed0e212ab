package external_test

import (
	"bytes"
	"os"
	"strings"
	"testing"

	"github.com/kweigh/kweigh/decode"
)

// TestFromMemory: a Source that is not a file is streamed to ffmpeg's
// stdin and reads exactly like the file; an MP4 whose index (moov) follows
// the audio cannot be read from a pipe (ffmpeg 5.1 then decodes nothing,
// without a word) and is refused with the reason.
func TestFromMemory(t *testing.T) {
	f := fixtures(t)
	for _, tc := range []struct {
		file    string
		wantErr string
	}{
		{f.make(t, "pcm.mka", "-i", f.stereo, "-c:a", "pcm_s24le"), ""},
		{f.make(t, "alac-fast.m4a", "-i", f.stereo, "-c:a", "alac", "-movflags", "+faststart"), ""},
		{f.make(t, "alac.m4a", "-i", f.stereo, "-c:a", "alac"), "index (moov box) follows the audio"},
	} {
		b, err := os.ReadFile(tc.file)
		if err != nil {
			t.Fatal(err)
		}
		d, err := decode.New(bytes.NewReader(b))
		if tc.wantErr != "" {
			if err == nil {
				d.(interface{ Close() error }).Close()
			}
			if err == nil || !strings.Contains(err.Error(), tc.wantErr) {
				t.Errorf("%s: error %v, want %q", tc.file, err, tc.wantErr)
			}
			continue
		}
		if err != nil {
			t.Fatalf("%s: %v", tc.file, err)
		}
		_, want, _ := readAll(t, f.stereo, decode.Options{})
		got := make([]float64, len(want)+4096)
		n := 0
		for {
			k, err := d.ReadFrames(got[n:])
			n += k * 2
			if err != nil {
				if err.Error() != "EOF" {
					t.Logf("%s: %v", tc.file, err)
				}
				break
			}
		}
		d.(interface{ Close() error }).Close()
		if n != len(want) || !equal(got[:n], want) {
			t.Errorf("%s from memory: %d samples, want the source's %d exactly", tc.file, n, len(want))
		}
	}
	noChildren(t)
}

func equal(a, b []float64) bool {
	for i := range a {
		if a[i] != b[i] {
			return false
		}
	}
	return len(a) == len(b)
}
