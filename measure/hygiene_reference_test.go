package measure

import (
	"fmt"
	"math"
	"reflect"
	"testing"
)

// referenceWrite is hygiene.write as it was before the kernels (plain Go,
// one pass for the stereo file, a loop per channel and then the pair for
// the others): the reference TestProbesMatchReference holds the probes to.
// Its products are wrapped in float64(…) so that no build (GOAMD64=v3)
// fuses them, as the default build never did.
func referenceWrite(h *hygiene, buf []float64) {
	nc := h.channels
	frames := len(buf) / nc
	if nc == 2 && h.left == 0 && h.right == 1 {
		referenceStereo(h, buf, frames)
	} else {
		lvl := h.clipLevel
		for c := 0; c < nc; c++ {
			sum, run := h.sum[c], h.run[c]
			for i := c; i < len(buf); i += nc {
				x := buf[i]
				sum += x
				if math.Abs(x) >= lvl || run > 0 {
					run = h.clipStep(x, run)
				}
			}
			h.sum[c], h.run[c] = sum, run
		}
		if h.left >= 0 {
			referencePair(h, buf, frames)
		}
	}
	h.trackLoudness(buf, frames)
	h.frames += int64(frames)
}

func referenceStereo(h *hygiene, buf []float64, frames int) {
	lvl := h.clipLevel
	sumL, sumR := h.sum[0], h.sum[1]
	runL, runR := h.run[0], h.run[1]
	maxDiff := h.maxDiff
	for f := 0; f < frames; {
		w := &h.window
		k := min(frames-f, int(h.windowFrames-int64(w.n)))
		sl, sr, sll, srr, slr := w.sl, w.sr, w.sll, w.srr, w.slr
		seg := buf[2*f : 2*(f+k)]
		for i := 0; i+1 < len(seg); i += 2 {
			l, r := seg[i], seg[i+1]
			sl += l
			sr += r
			sll += float64(l * l)
			srr += float64(r * r)
			slr += float64(l * r)
			if d := math.Abs(l - r); d > maxDiff {
				maxDiff = d
			}
			if math.Abs(l) >= lvl || math.Abs(r) >= lvl || runL > 0 || runR > 0 {
				runL = h.clipStep(l, runL)
				runR = h.clipStep(r, runR)
			}
		}
		sumL += sl - w.sl
		sumR += sr - w.sr
		w.sl, w.sr, w.sll, w.srr, w.slr = sl, sr, sll, srr, slr
		w.n += float64(k)
		f += k
		if int64(w.n) == h.windowFrames {
			h.closeWindow()
		}
	}
	h.sum[0], h.sum[1] = sumL, sumR
	h.run[0], h.run[1] = runL, runR
	h.maxDiff = maxDiff
}

func referencePair(h *hygiene, buf []float64, frames int) {
	nc, li, ri := h.channels, h.left, h.right
	maxDiff := h.maxDiff
	for f := 0; f < frames; {
		w := &h.window
		k := min(frames-f, int(h.windowFrames-int64(w.n)))
		sl, sr, sll, srr, slr := w.sl, w.sr, w.sll, w.srr, w.slr
		for end := f + k; f < end; f++ {
			l, r := buf[f*nc+li], buf[f*nc+ri]
			d := l - r
			if d > maxDiff || -d > maxDiff {
				maxDiff = math.Abs(d)
			}
			sl += l
			sr += r
			sll += float64(l * l)
			srr += float64(r * r)
			slr += float64(l * r)
		}
		w.sl, w.sr, w.sll, w.srr, w.slr = sl, sr, sll, srr, slr
		w.n += float64(k)
		if int64(w.n) == h.windowFrames {
			h.closeWindow()
		}
	}
	h.maxDiff = maxDiff
}

// probeState is everything a hygiene has found, for comparison bit for
// bit (the kernel's state block aside).
func probeState(h *hygiene) string {
	c := *h
	c.st, c.onWindow = frameState{}, nil
	return fmt.Sprintf("%#v %v %v", c, bitsOf(c.sum), bitsOf([]float64{c.pair.sl, c.pair.sr, c.pair.sll, c.pair.srr, c.pair.slr, c.window.sl, c.window.slr, c.maxDiff, c.minWindow}))
}

func bitsOf(v []float64) []uint64 {
	b := make([]uint64, len(v))
	for i, x := range v {
		b[i] = math.Float64bits(x)
	}
	return b
}

// TestProbesMatchReference feeds the same blocks to the probes on every
// kernel path and to referenceWrite and demands the same state after
// every block and the same findings at the end, bit for bit: stereo, the
// stereo pair in other places, mono, 5.1 (with the fold-down made in the
// same pass, checked against downmixer.foldAny), 7.1 and a 10-channel
// file (beyond the kernel, the Go loop), over block sizes that cut
// clipping runs and the 3 s windows anywhere, at a rate that makes the
// windows short.
func TestProbesMatchReference(t *testing.T) {
	const rate = 400 // 1 200-frame windows
	layouts := [][]string{
		{"L", "R"},
		{"R", "L"},
		{"M"},
		{"L", "R", "C", "LFE", "Ls", "Rs"},
		{"L", "C", "R", "Ls", "Rs", "LFE"},
		{"L", "R", "C", "LFE", "Lb", "Rb", "Ls", "Rs"},
		{"L", "R", "C", "LFE", "Ls", "Rs", "A1", "A2", "A3", "A4"},
	}
	sizes := []int{1, 7, 4096, 333, 1200, 2, 5000}
	for _, path := range kernelPaths() {
		useHygienePath(t, path)
		for _, layout := range layouts {
			nc := len(layout)
			for _, bits := range []int{16, 24} {
				name := fmt.Sprintf("%s/%v/%d-bit", path, layout, bits)
				frames := 20000
				buf := probeSignal(frames, nc, uint64(nc*bits), false)
				// A stretch of silence at both ends, a long run at full
				// scale crossing many blocks, and a stretch where the pair
				// is one signal.
				for i := 0; i < 300*nc; i++ {
					buf[i], buf[len(buf)-1-i] = 0, 0
				}
				for f := 9000; f < 9100; f++ {
					buf[f*nc] = 1
				}
				// A run that ends on the last frame of a block (the one
				// from 4 104) before a block without a full-scale sample,
				// and one across a window's end.
				for i := 4437 * nc; i < 5637*nc; i++ {
					buf[i] = 0.1 * math.Sin(float64(i))
				}
				for f := 4430; f < 4437; f++ {
					buf[f*nc+nc-1] = 1
				}
				for f := 7195; f < 7205; f++ {
					buf[f*nc] = -1
				}
				a := newHygiene(nc, rate, bits, false, layout, DefaultSilenceThresholdDBFS, DefaultClipRunMinSamples)
				b := newHygiene(nc, rate, bits, false, layout, DefaultSilenceThresholdDBFS, DefaultClipRunMinSamples)
				d := newDownmixer(layout, 48000)
				for i, k := 0, 0; i < len(buf); k++ {
					n := min(sizes[k%len(sizes)]*nc, len(buf)-i)
					block := buf[i : i+n]
					if d != nil {
						out := make([]float64, 2*n/nc)
						a.writeFold(block, out, d.gains)
						want := make([]float64, 2*n/nc)
						d.foldAny(want, block)
						for j := range out {
							if !sameFloat(out[j], want[j]) {
								t.Fatalf("%s: fold-down sample %d of the block at %d is %v, foldAny %v", name, j, i/nc, out[j], want[j])
							}
						}
					} else {
						a.write(block)
					}
					referenceWrite(b, block)
					if sa, sb := probeState(a), probeState(b); sa != sb {
						t.Fatalf("%s: after the block at frame %d:\n%s\nreference:\n%s", name, i/nc, sa, sb)
					}
					i += n
				}
				peaks := samplePeaks(buf, nc)
				sa := a.finish(rate, layout, peaks, DefaultSilenceThresholdDBFS)
				sb := b.finish(rate, layout, peaks, DefaultSilenceThresholdDBFS)
				if !reflect.DeepEqual(sa, sb) {
					t.Errorf("%s: findings %+v, reference %+v", name, sa, sb)
				}
				if sa.ClippedSamples < 100 || sa.ClipRuns < 2 {
					t.Errorf("%s: %d clipped samples in %d runs: the signal should clip", name, sa.ClippedSamples, sa.ClipRuns)
				}
			}
		}
	}
}
