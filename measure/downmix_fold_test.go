package measure

import (
	"math"
	"testing"
)

// TestFoldSixMatchesGeneral checks the 5.1 fold-down loop against the loop
// for any channel count, bit for bit, for the 5.1 layouts kweigh folds
// (L R C LFE Ls Rs and the film order L C R Ls Rs LFE), values of every
// sign and size, and lengths that end inside a frame group.
func TestFoldSixMatchesGeneral(t *testing.T) {
	for _, layout := range [][]string{{"L", "R", "C", "LFE", "Ls", "Rs"}, {"L", "C", "R", "Ls", "Rs", "LFE"}} {
		d := newDownmixer(layout, 48000)
		if d == nil {
			t.Fatalf("%v: no fold-down", layout)
		}
		for frames := range 9 {
			buf := make([]float64, 6*frames)
			for i := range buf {
				buf[i] = math.Sin(float64(i)*1.7) * math.Pow(10, float64(i%7)-3)
				if i%5 == 3 {
					buf[i] = -buf[i]
				}
			}
			a, b := make([]float64, 2*frames), make([]float64, 2*frames)
			d.fold6(a, buf)
			d.foldAny(b, buf)
			for i := range a {
				if math.Float64bits(a[i]) != math.Float64bits(b[i]) {
					t.Fatalf("%v, %d frames: sample %d is %v, general loop %v", layout, frames, i, a[i], b[i])
				}
			}
		}
	}
}
