package layer3

import (
	"fmt"
	"os"
	"path/filepath"
	"testing"
)

func TestIntensityAgainstReference(t *testing.T) {
	// lame writes no intensity stereo, so the test makes some: it sets
	// the intensity bit of mode_extension in every joint-stereo frame of
	// an MPEG-1 lame stream (no CRC, so the frames stay valid). In
	// MPEG-1 the scale factors' syntax does not depend on that bit, so
	// the stream still parses exactly; the right channel's bands above
	// its last non-zero line become intensity coded, with the right
	// channel's scale factors as positions. Both decoders must then make
	// the same left and right channels from the same bits: ours against
	// ffmpeg's float output within the bound of TestAgainstReferenceFloat.
	// (MPEG-2's intensity changes the scale-factor syntax, so the trick
	// does not apply there; that path is checked only by construction.)
	dir := t.TempDir()
	for k, opts := range [][]string{{"-b", "96", "-m", "j"}, {"-V", "6", "-m", "j"}} {
		name := fmt.Sprintf("is%d.mp3", k)
		src := filepath.Join(dir, name+".wav")
		writeWAV(t, src, 44100, 2, testSignal(44100, 2, 3))
		b := lame(t, dir, src, name, append([]string{"-t"}, opts...)...)
		plain, _ := decodeAll(t, b)
		set := 0
		for _, f := range frames(t, b) {
			h, _ := ParseHeader(f)
			if h.Joint {
				f[3] |= 0x10
				set++
			}
		}
		path := filepath.Join(dir, "i"+name)
		if err := os.WriteFile(path, b, 0o644); err != nil {
			t.Fatal(err)
		}
		ours, _ := decodeAll(t, b)
		ref := referenceFloat(t, path)
		peak, rms, n := compare(ours, ref)
		t.Logf("%v: intensity bit set in %d frames; %d samples, peak difference %.2e, RMS %.2e", opts, set, n, peak, rms)
		if set == 0 {
			t.Fatal("no joint-stereo frame")
		}
		// The bit must matter: intensity-coded bands were decoded.
		if moved, _, _ := compare(ours, plain); moved < 1e-3 {
			t.Errorf("setting the intensity bit changed the output by only %.2e: no band was intensity coded", moved)
		}
		if len(ours) != len(ref) || peak > 1e-5 {
			t.Errorf("%d samples (reference %d), peak difference %.2e, bound 1e-5", len(ours), len(ref), peak)
		}
	}
}
