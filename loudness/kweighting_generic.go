//go:build !amd64 || purego

package loudness

// energyPair is k.Energy(a), l.Energy(b) on platforms without a two-lane
// kernel. len(b) must equal len(a).
func energyPair(k, l *KWeighting, a, b []float64) (ea, eb float64) {
	b = b[:len(a)]
	return k.Energy(a), l.Energy(b)
}
