//go:build !amd64 || purego

package loudness

// energyPair is k.Energy(a), l.Energy(b) on platforms without a two-lane
// kernel. len(b) must equal len(a).
func energyPair(k, l *KWeighting, a, b []float64) (ea, eb float64) {
	b = b[:len(a)]
	return k.Energy(a), l.Energy(b)
}

// energyQuad is energyPair twice on platforms without a four-lane kernel.
func energyQuad(f [4]*KWeighting, x [4][]float64) (e [4]float64) {
	n := len(x[0])
	e[0], e[1] = energyPair(f[0], f[1], x[0], x[1][:n])
	e[2], e[3] = energyPair(f[2], f[3], x[2], x[3][:n])
	return e
}

// energyOne is k.Energy(a) on platforms without a SIMD kernel.
func energyOne(k *KWeighting, a []float64) float64 { return k.Energy(a) }

// octEnergy reports false: no eight-lane kernel here.
func octEnergy() bool { return false }

// energyOct is energyGroups on platforms without an eight-lane kernel.
func energyOct(f []*KWeighting, x [][]float64) (e [8]float64) { return energyGroups(f, x) }
