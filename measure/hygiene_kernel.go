package measure

import "math"

// The hygiene probes' inner loops.
//
// Every probe sum is a running sum in frame order (the DC offsets, the
// correlation's five sums, the fold-down's two per frame), so one pass
// cannot add faster than one frame per addition latency; what it can do is
// load each frame once, do every probe's work on it in SIMD lanes, and
// leave the rare work (clipping runs, which need each sample in turn) to a
// second look at only the stretches that hold a full-scale sample. The Go
// loops below are the reference; the AVX2 kernels (hygiene_avx2_amd64.s)
// perform the very same floating-point operations in the same order, lane
// by lane, so every figure is the same bit for bit on every kernel set
// (hygiene_kernel_test.go). Products are wrapped in float64(…) so that no
// compiler fuses them into a multiply-add.

// pairSums are the sums of an L/R pair over the current correlation
// window (sl … slr, see pairStats) and the largest |L−R| of the file so
// far. The field order is the kernels' memory layout.
type pairSums struct {
	sl, sr, sll, srr, slr float64
	maxDiff               float64
}

// frameState is what the any-channel kernel reads and updates (the
// arguments of anyStretchGo), in one block of memory whose layout the
// assembly knows (offsets checked by TestFrameStateLayout): the running
// per-channel sums, the pair's window sums, and the fold-down gains.
type frameState struct {
	sums  [maxKernelChannels]float64     // per channel Σx, in frame order
	pair  pairSums                       // sums of channels left and right
	gains [2 * maxKernelChannels]float64 // gain into Lo, gain into Ro, per channel
	// channels is the channel count (1…maxKernelChannels); left and right
	// the pair's channels, left < 0 for none.
	channels, left, right int64
	// full is the bit pattern of the clipping level: a sample whose |x|
	// has these bits or more (NaN too) is reported.
	full uint64
	// lanes has all bits set for the lanes of the channels there are (the
	// kernel's load masks).
	lanes [maxKernelChannels]uint64
	// gains2 holds each channel's gains twice (Lo, Ro, Lo, Ro), for the
	// 5.1 loop that folds two frames at once (setGains).
	gains2 [maxKernelChannels][4]float64
}

// setGains copies the fold-down gains (Lo, Ro per channel) into st.
func (st *frameState) setGains(gains []float64) {
	copy(st.gains[:], gains)
	for c := range min(len(gains)/2, maxKernelChannels) {
		st.gains2[c] = [4]float64{gains[2*c], gains[2*c+1], gains[2*c], gains[2*c+1]}
	}
}

// newFrameState returns the kernel state for channels channels with the
// pair left, right (left < 0 for none) and the clipping level clip.
func newFrameState(channels, left, right int, clip float64) frameState {
	st := frameState{channels: int64(channels), left: int64(left), right: int64(right), full: math.Float64bits(clip)}
	for c := range min(channels, maxKernelChannels) {
		st.lanes[c] = ^uint64(0)
	}
	return st
}

// maxKernelChannels is the most channels the any-channel kernel takes
// (7.1); wider files run the Go loop.
const maxKernelChannels = 8

// stereoStretchGo adds the frames of seg (interleaved L, R) to s in frame
// order and reports whether any sample reaches full (bits of |x| ≥ full,
// or NaN): only then must the caller walk the clipping runs.
func stereoStretchGo(seg []float64, s *pairSums, full uint64) bool {
	sl, sr, sll, srr, slr, md := s.sl, s.sr, s.sll, s.srr, s.slr, s.maxDiff
	var hit bool
	for i := 0; i+1 < len(seg); i += 2 {
		l, r := seg[i], seg[i+1]
		sl += l
		sr += r
		sll += float64(l * l)
		srr += float64(r * r)
		slr += float64(l * r)
		if d := math.Abs(l - r); d > md {
			md = d
		}
		hit = hit || math.Float64bits(l)&^signBit >= full || math.Float64bits(r)&^signBit >= full
	}
	s.sl, s.sr, s.sll, s.srr, s.slr, s.maxDiff = sl, sr, sll, srr, slr, md
	return hit
}

// anyStretchGo is stereoStretchGo for len(sums) interleaved channels:
// each channel's running sum in sums, the sums of the pair left, right in
// p when left ≥ 0, and, when out is not nil, the Lo/Ro fold-down of every
// frame into out (two samples per frame, each the sum from 0 in channel
// order of gain·x with gains as downmixer.gains, as downmixer.foldAny).
func anyStretchGo(buf, out, sums, gains []float64, p *pairSums, left, right int, full uint64) bool {
	nc := len(sums)
	q := *p
	var hit bool
	for f := 0; f+nc <= len(buf); f += nc {
		frame := buf[f : f+nc]
		for c, x := range frame {
			sums[c] += x
			hit = hit || math.Float64bits(x)&^signBit >= full
		}
		if left >= 0 {
			l, r := frame[left], frame[right]
			q.sl += l
			q.sr += r
			q.sll += float64(l * l)
			q.srr += float64(r * r)
			q.slr += float64(l * r)
			if d := math.Abs(l - r); d > q.maxDiff {
				q.maxDiff = d
			}
		}
		if out != nil {
			var lo, ro float64
			for c, x := range frame {
				lo += float64(gains[2*c] * x)
				ro += float64(gains[2*c+1] * x)
			}
			out[0], out[1] = lo, ro
			out = out[2:]
		}
	}
	*p = q
	return hit
}

// signBit is the sign bit of a float64.
const signBit = 1 << 63
