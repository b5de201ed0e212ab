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

// TestPackMatchesPlainLayout holds sampleHash.pack, with its per-width
// and per-channel-count loops, to the layout RFC 9639 section 8.2 gives
// the MD5 written out byte by byte: every sample of every channel,
// interleaved, signed little-endian in ceil(bits/8) bytes. Every channel
// count 1 to 8 at 8, 16, 24 and 32 bits.
func TestPackMatchesPlainLayout(t *testing.T) {
	for _, bits := range []int{8, 16, 24, 32} {
		for ch := 1; ch <= 8; ch++ {
			n := 300
			channels := make([][]int32, ch)
			var spread uint32
			for c := range channels {
				channels[c] = randomBlock(uint64(bits*100+ch*10+c), n, uint(bits))
				for _, v := range channels[c] {
					spread |= fold(v)
				}
			}
			width := (bits + 7) / 8
			var want []byte
			for i := range n {
				for c := range channels {
					for k := range width {
						want = append(want, byte(channels[c][i]>>(8*k)))
					}
				}
			}
			s := newSampleHash(bits)
			if got := s.pack(channels, n); got != spread {
				t.Errorf("%d bits, %d channels: spread %#x, want %#x", bits, ch, got, spread)
			}
			if !bytes.Equal(s.buf, want) {
				t.Errorf("%d bits, %d channels: pack lays out other bytes than the plain layout", bits, ch)
			}
		}
	}
}
