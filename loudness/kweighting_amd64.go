//go:build !purego

package loudness

// energyPair returns k.Energy(a), l.Energy(b), bit for bit, and leaves both
// filters' state as Energy would. len(b) must equal len(a).
//
// The K-weighting recursion is latency-bound: each output waits for the
// previous one (a multiply and a subtract per stage), so one channel leaves
// the floating-point units mostly idle. energyPairSSE2 runs channel k in
// lane 0 and channel l in lane 1 of SSE2 registers (part of every amd64
// CPU) and gets two channels for the time of one. Each lane performs the
// operations of Energy in the same order, and packed IEEE arithmetic
// rounds as scalar does, so the results are identical.
func energyPair(k, l *KWeighting, a, b []float64) (ea, eb float64) {
	b = b[:len(a)]
	if kernels == goKernels {
		return k.Energy(a), l.Energy(b)
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
