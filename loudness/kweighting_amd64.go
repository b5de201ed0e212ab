//go:build !purego

package loudness

import "math"

// energyPair returns k.Energy(a), l.Energy(b), bit for bit, on the go,
// avx2 and avx512 sets, and k.energyUnfused(a), l.energyUnfused(b), bit
// for bit, on the sse2 set; it leaves both filters' state as those would.
// len(b) must equal len(a).
//
// The K-weighting recursion is latency-bound: each output waits for the
// previous one, so one channel leaves the floating-point units mostly
// idle. energyPairSSE2 runs channel k in lane 0 and channel l in lane 1 of
// SSE2 registers (part of every amd64 CPU) and gets two channels for the
// time of one. SSE2 has no fused multiply-add, so each lane performs the
// operations of energyUnfused in the same order, and packed IEEE
// arithmetic rounds as scalar does, so the results are identical to it;
// they differ from Energy's within the bound stated beside energyUnfused.
func energyPair(k, l *KWeighting, a, b []float64) (ea, eb float64) {
	b = b[:len(a)]
	switch {
	case kernels == goKernels:
		return k.Energy(a), l.Energy(b)
	case kernels >= avx2Kernels:
		return energyPairStaged(k, l, a, b)
	}
	s := kweightLanes{
		b0: [2]float64{k.Shelf.B0, l.Shelf.B0},
		b1: [2]float64{k.Shelf.B1, l.Shelf.B1},
		b2: [2]float64{k.Shelf.B2, l.Shelf.B2},
		a1: [2]float64{k.Shelf.A1, l.Shelf.A1},
		a2: [2]float64{k.Shelf.A2, l.Shelf.A2},
		c1: [2]float64{k.HighPass.A1, l.HighPass.A1},
		c2: [2]float64{k.HighPass.A2, l.HighPass.A2},
		x1: [2]float64{k.Shelf.x1, l.Shelf.x1},
		x2: [2]float64{k.Shelf.x2, l.Shelf.x2},
		u1: [2]float64{k.Shelf.y1, l.Shelf.y1},
		u2: [2]float64{k.Shelf.y2, l.Shelf.y2},
		v1: [2]float64{k.HighPass.y1, l.HighPass.y1},
		v2: [2]float64{k.HighPass.y2, l.HighPass.y2},
	}
	ea, eb = energyPairSSE2(&s, a, b)
	k.Shelf.x1, k.Shelf.x2, k.Shelf.y1, k.Shelf.y2 = s.x1[0], s.x2[0], s.u1[0], s.u2[0]
	l.Shelf.x1, l.Shelf.x2, l.Shelf.y1, l.Shelf.y2 = s.x1[1], s.x2[1], s.u1[1], s.u2[1]
	// The high-pass input history is the shelf output history.
	k.HighPass.x1, k.HighPass.x2, k.HighPass.y1, k.HighPass.y2 = s.u1[0], s.u2[0], s.v1[0], s.v2[0]
	l.HighPass.x1, l.HighPass.x2, l.HighPass.y1, l.HighPass.y2 = s.u1[1], s.u2[1], s.v1[1], s.v2[1]
	return ea, eb
}

// energyOne returns k.Energy(a), bit for bit, leaving the state as Energy
// would (on the sse2 set k.energyUnfused(a), the form of its pair kernel).
// With AVX2 the channel runs through energyPairStaged beside a scratch
// copy of itself: half the lanes are wasted, but the two stages then run
// side by side instead of one after the other.
func energyOne(k *KWeighting, a []float64) float64 {
	switch kernels {
	case goKernels:
		return k.Energy(a)
	case sse2Kernels:
		return k.energyUnfused(a)
	}
	scratch := *k
	e, _ := energyPairStaged(k, &scratch, a, a)
	return e
}

// energyPairStaged is energyPair with AVX2 (energyStagedAVX2): the shelf
// of both channels in lanes 0 and 1 and their high-pass in lanes 2 and 3,
// stagedLag samples behind, so one register carries all four recursions
// of a stereo pair. The K-weighting loop is bound by the instructions it issues
// as much as by its recursion's latency, and this does one channel-sample
// of both stages per lane where energyPairSSE2 needs twice the
// instructions. The shelf of the first stagedLag samples is computed here
// before the kernel, the high-pass of the last stagedLag after it, with
// Energy's very operations; the kernel's lanes are Energy's stages bit for
// bit (see kweighting_avx2_amd64.s). Fewer samples go to Energy.
func energyPairStaged(k, l *KWeighting, a, b []float64) (ea, eb float64) {
	n := len(a)
	if n < stagedLag {
		return k.Energy(a), l.Energy(b)
	}
	f := [2]*KWeighting{k, l}
	in := [2][]float64{a, b}
	var s kweightStaged
	for i, k := range f {
		sh, hp := &k.Shelf, &k.HighPass
		x1, x2, u1, u2 := sh.x1, sh.x2, sh.y1, sh.y2
		var u [stagedLag]float64
		for j, x := range in[i][:stagedLag] {
			u[j] = math.FMA(-sh.A1, u1, math.FMA(-sh.A2, u2, math.FMA(sh.B0, x, math.FMA(sh.B1, x1, float64(sh.B2*x2)))))
			x2, x1 = x1, x
			u2, u1 = u1, u[j]
		}
		s.b0[i], s.b1[i], s.b2[i], s.a1[i], s.a2[i] = sh.B0, sh.B1, sh.B2, sh.A1, sh.A2
		s.x1[i], s.x2[i], s.y1[i], s.y2[i] = x1, x2, u[stagedLag-1], u[stagedLag-2]
		for j := range s.d {
			s.d[j][i] = u[stagedLag-3-j]
		}
		// The high-pass: numerator [1, −2, 1] as Energy applies it, input
		// history the shelf's output history before sample 0.
		s.b0[i+2], s.b1[i+2], s.b2[i+2], s.a1[i+2], s.a2[i+2] = 1, -2, 1, hp.A1, hp.A2
		s.x1[i+2], s.x2[i+2], s.y1[i+2], s.y2[i+2] = sh.y1, sh.y2, hp.y1, hp.y2
	}
	var e [2]float64
	e[0], e[1] = energyStagedAVX2(&s, a, b)
	for i, k := range f {
		// The high-pass of the last stagedLag samples, oldest first.
		hp := &k.HighPass
		u1, u2 := s.x1[i+2], s.x2[i+2]
		v1, v2 := s.y1[i+2], s.y2[i+2]
		var pending [stagedLag]float64
		for j := range s.d {
			pending[stagedLag-3-j] = s.d[j][i]
		}
		pending[stagedLag-2], pending[stagedLag-1] = s.y2[i], s.y1[i]
		for _, u := range pending {
			v := math.FMA(-hp.A1, v1, math.FMA(-hp.A2, v2, u+math.FMA(-2, u1, u2)))
			e[i] = math.FMA(v, v, e[i])
			u2, u1 = u1, u
			v2, v1 = v1, v
		}
		k.Shelf.x1, k.Shelf.x2, k.Shelf.y1, k.Shelf.y2 = s.x1[i], s.x2[i], s.y1[i], s.y2[i]
		// The high-pass input history is the shelf output history.
		hp.x1, hp.x2, hp.y1, hp.y2 = u1, u2, v1, v2
	}
	return e[0], e[1]
}

// stagedLag is how many samples energyStagedAVX2's high-pass lanes run
// behind its shelf lanes: far enough that the path from a shelf output
// through the high-pass lanes' operations back into the register (about
// 15 cycles, see kweighting_avx2_amd64.s) no longer sets the pace of four
// cycles an iteration (three left it at five).
const stagedLag = 4

// kweightStaged holds a stereo pair's K-weighting for energyStagedAVX2:
// lanes 0 and 1 the two shelves, lanes 2 and 3 the two high-passes, each
// lane a biquad in Energy's form,
//
//	y = fma(−A1, y1, fma(−A2, y2, fma(B0, x, fma(B1, x1, B2·x2)))),
//
// with its input history x1, x2 and output history y1, y2; d[j] holds, in
// lanes 0 and 1, the shelf outputs of 3 + j samples back, the last the
// high-pass lanes' next input.
type kweightStaged struct {
	b0, b1, b2, a1, a2 [4]float64
	x1, x2, y1, y2     [4]float64
	d                  [stagedLag - 2][4]float64
}

// energyStagedAVX2 runs samples 4 … len(a)−1 of the shelves and samples
// 0 … len(a)−5 of the high-passes of s over a and b (len(b) ≥ len(a)),
// updates s and returns Σ y² of the two high-passes
// (kweighting_avx2_amd64.s).
//
//go:noescape
func energyStagedAVX2(s *kweightStaged, a, b []float64) (e0, e1 float64)

// kweightLanes holds two K-weighting filters side by side for
// energyPairSSE2, element 0 of every pair the first filter's, element 1 the
// second's. The names are those of Energy: shelf coefficients b0…a2,
// high-pass feedback c1, c2; shelf input x, shelf output u, high-pass
// output v.
type kweightLanes struct {
	b0, b1, b2, a1, a2, c1, c2 [2]float64
	x1, x2, u1, u2, v1, v2     [2]float64
}

// energyPairSSE2 filters a and b (len(b) == len(a)) through the two
// filters of s, updates their state and returns Σy² of each
// (kweighting_amd64.s).
//
//go:noescape
func energyPairSSE2(s *kweightLanes, a, b []float64) (ea, eb float64)

// kweightQuad is kweightLanes for four filters (energyQuadAVX2).
type kweightQuad struct {
	b0, b1, b2, a1, a2, c1, c2 [4]float64
	x1, x2, u1, u2, v1, v2     [4]float64
}

// quadEnergy reports whether energyQuad runs four channels at once here.
func quadEnergy() bool { return kernels >= avx2Kernels }

// energyQuad returns f[i].Energy(x[i]) for four filters, bit for bit (on
// the sse2 set energyUnfused, through energyPair), and leaves their state
// as those would; every x[i] must be as long as x[0].
// With AVX2 the four recursions run in the four lanes of one register
// (energyQuadAVX2), each lane performing Energy's operations in order;
// elsewhere two pairs.
func energyQuad(f [4]*KWeighting, x [4][]float64) (e [4]float64) {
	n := len(x[0])
	for i := range x {
		x[i] = x[i][:n]
	}
	if !quadEnergy() {
		e[0], e[1] = energyPair(f[0], f[1], x[0], x[1])
		e[2], e[3] = energyPair(f[2], f[3], x[2], x[3])
		return e
	}
	var s kweightQuad
	for i, k := range f {
		s.b0[i], s.b1[i], s.b2[i], s.a1[i], s.a2[i] = k.Shelf.B0, k.Shelf.B1, k.Shelf.B2, k.Shelf.A1, k.Shelf.A2
		s.c1[i], s.c2[i] = k.HighPass.A1, k.HighPass.A2
		s.x1[i], s.x2[i], s.u1[i], s.u2[i] = k.Shelf.x1, k.Shelf.x2, k.Shelf.y1, k.Shelf.y2
		s.v1[i], s.v2[i] = k.HighPass.y1, k.HighPass.y2
	}
	e[0], e[1], e[2], e[3] = energyQuadAVX2(&s, x[0], x[1], x[2], x[3])
	for i, k := range f {
		k.Shelf.x1, k.Shelf.x2, k.Shelf.y1, k.Shelf.y2 = s.x1[i], s.x2[i], s.u1[i], s.u2[i]
		// The high-pass input history is the shelf output history.
		k.HighPass.x1, k.HighPass.x2, k.HighPass.y1, k.HighPass.y2 = s.u1[i], s.u2[i], s.v1[i], s.v2[i]
	}
	return e
}

// energyQuadAVX2 filters a, b, c, d (all of len(a)) through the four
// filters of s, updates their state and returns Σy² of each
// (kweighting_avx2_amd64.s).
//
//go:noescape
func energyQuadAVX2(s *kweightQuad, a, b, c, d []float64) (ea, eb, ec, ed float64)

// kweightOct is kweightQuad for eight filters (energyOctAVX512), with the
// eight energies the kernel returns.
type kweightOct struct {
	b0, b1, b2, a1, a2, c1, c2 [8]float64
	x1, x2, u1, u2, v1, v2     [8]float64
	e                          [8]float64
}

// octEnergy reports whether energyOct runs five to eight channels at once
// here: on the avx512 set.
func octEnergy() bool { return kernels >= avx512Kernels }

// energyOct returns f[i].Energy(x[i]) for len(f) filters, 1 to 8, bit for
// bit, into e[:len(f)], and leaves their state as Energy would; every x[i]
// must be as long as x[0]. With AVX-512 all of them run in the eight
// lanes of one register (energyOctAVX512), each lane performing Energy's
// operations in order; lanes beyond len(f) filter a scratch copy of the
// first channel, whose results are dropped. Where there is no eight-lane
// kernel, energyQuad and energyPair take the channels in order.
func energyOct(f []*KWeighting, x [][]float64) (e [8]float64) {
	if !octEnergy() {
		return energyGroups(f, x)
	}
	n := len(x[0])
	var s kweightOct
	var in [8]*float64
	scratch := *f[0]
	for i := range 8 {
		k, xi := &scratch, x[0]
		if i < len(f) {
			k, xi = f[i], x[i][:n]
		}
		if n > 0 {
			in[i] = &xi[0]
		}
		s.b0[i], s.b1[i], s.b2[i], s.a1[i], s.a2[i] = k.Shelf.B0, k.Shelf.B1, k.Shelf.B2, k.Shelf.A1, k.Shelf.A2
		s.c1[i], s.c2[i] = k.HighPass.A1, k.HighPass.A2
		s.x1[i], s.x2[i], s.u1[i], s.u2[i] = k.Shelf.x1, k.Shelf.x2, k.Shelf.y1, k.Shelf.y2
		s.v1[i], s.v2[i] = k.HighPass.y1, k.HighPass.y2
	}
	if n > 0 {
		energyOctAVX512(&s, &in, n)
	}
	for i, k := range f {
		k.Shelf.x1, k.Shelf.x2, k.Shelf.y1, k.Shelf.y2 = s.x1[i], s.x2[i], s.u1[i], s.u2[i]
		// The high-pass input history is the shelf output history.
		k.HighPass.x1, k.HighPass.x2, k.HighPass.y1, k.HighPass.y2 = s.u1[i], s.u2[i], s.v1[i], s.v2[i]
		e[i] = s.e[i]
	}
	return e
}

// energyOctAVX512 filters in[i][0…n−1] (n ≥ 1) through the eight filters
// of s, updates their state and stores Σy² of each in s.e
// (kweighting_avx512_amd64.s). The CPU must have AVX-512 F and DQ and FMA.
//
//go:noescape
func energyOctAVX512(s *kweightOct, in *[8]*float64, n int)
