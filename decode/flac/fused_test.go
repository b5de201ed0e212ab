package flac

import (
	"bytes"
	"testing"
)

// TestFusedStereoMatchesPlain holds the fused passes (decorrelation with
// the MD5 layout, decorrelation with the range check) to the plain ones
// run one after the other, for every stereo mode and sample width, on
// samples reaching the ends of the side channel's range.
func TestFusedStereoMatchesPlain(t *testing.T) {
	for _, bits := range []int{8, 12, 16, 20, 24} {
		for _, mode := range []int{leftSide, sideRight, midSide} {
			n := 1000
			// Channel values as a stereo encoder leaves them: the side
			// channel one bit wider.
			a := randomBlock(uint64(bits*10+mode), n, uint(bits))
			b := randomBlock(uint64(bits*10+mode+5), n, uint(bits))
			for i := range a {
				l, r := a[i], b[i]
				switch mode {
				case leftSide:
					a[i], b[i] = l, l-r
				case sideRight:
					a[i], b[i] = l-r, r
				case midSide:
					a[i], b[i] = (l+r)>>1, l-r
				}
			}
			wantA, wantB := append([]int32(nil), a...), append([]int32(nil), b...)
			decorrelate(mode, wantA, wantB)
			plain := newSampleHash(bits)
			wantSpread := plain.pack([][]int32{wantA, wantB}, n)

			gotA, gotB := append([]int32(nil), a...), append([]int32(nil), b...)
			fused := newSampleHash(bits)
			if got := fused.packStereo(mode, gotA, gotB); got != wantSpread {
				t.Errorf("%d bits, mode %d: packStereo spread %#x, plain %#x", bits, mode, got, wantSpread)
			}
			if !bytes.Equal(fused.buf, plain.buf) {
				t.Errorf("%d bits, mode %d: packStereo lays out other bytes than decorrelate+pack", bits, mode)
			}
			for i := range wantA {
				if gotA[i] != wantA[i] || gotB[i] != wantB[i] {
					t.Fatalf("%d bits, mode %d: packStereo sample %d = %d,%d, plain %d,%d", bits, mode, i, gotA[i], gotB[i], wantA[i], wantB[i])
				}
			}

			gotA, gotB = append([]int32(nil), a...), append([]int32(nil), b...)
			if got := decorrelateSpread(mode, gotA, gotB); got != spreadOf([][]int32{wantA, wantB}, n) {
				t.Errorf("%d bits, mode %d: decorrelateSpread spread %#x, plain %#x", bits, mode, got, wantSpread)
			}
			for i := range wantA {
				if gotA[i] != wantA[i] || gotB[i] != wantB[i] {
					t.Fatalf("%d bits, mode %d: decorrelateSpread sample %d = %d,%d, plain %d,%d", bits, mode, i, gotA[i], gotB[i], wantA[i], wantB[i])
				}
			}
			// The plain result is the original left and right.
			l0 := randomBlock(uint64(bits*10+mode), n, uint(bits))
			if wantA[17] != l0[17] {
				t.Fatalf("%d bits, mode %d: the test's encoding does not invert", bits, mode)
			}
		}
	}
}
