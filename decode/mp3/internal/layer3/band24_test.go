package layer3

import (
	"math"
	"path/filepath"
	"testing"
)

func TestBand24kFromSource(t *testing.T) {
	// Which start of band 18 at 24 kHz, 330 or 332, did lame's encoder
	// use? Decode its streams with each and compare with the source near
	// line 330 (lines 327–334, a DCT over each granule's span): the
	// encoder's table puts the band's scale factor on the right lines,
	// and the error there is smaller.
	dir := t.TempDir()
	defer func() { longBands[4][18] = 332 }()
	for _, opts := range [][]string{{"-V", "4"}, {"-V", "2"}} {
		var errs [2]float64
		src := filepath.Join(dir, "a.wav")
		sig := noiseSignal(24000, 1, 4, 3)
		writeWAV(t, src, 24000, 1, sig)
		b := lame(t, dir, src, "a.mp3", append([]string{"-t"}, opts...)...)
		for k, v := range []int{330, 332} {
			longBands[4][18] = v
			pcm, _ := decodeAll(t, b)
			// error energy near line 330, granule by granule
			e := 0.0
			const lag = 1105
			for start := 0; start+576 < len(sig) && start+lag+576 < len(pcm); start += 576 {
				for bin := 327; bin < 335; bin++ {
					var re, im float64
					for k := 0; k < 576; k++ {
						d := pcm[start+lag+k] - sig[start+k]
						w := math.Pi * float64(bin) * (float64(k) + 0.5) / 576
						re += d * math.Cos(w)
						im += d * math.Sin(w)
					}
					e += re*re + im*im
				}
			}
			t.Logf("%v band start %d: error energy near line 330: %.4g", opts, v, e)
			errs[k] = e
		}
		if errs[1] >= errs[0]*0.95 {
			t.Errorf("%v: error with 332 (%.4g) not clearly below that with 330 (%.4g)", opts, errs[1], errs[0])
		}
	}
}
