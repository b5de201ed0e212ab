//go:build !amd64 || purego

package loudness

// splitFast reports false: Meter.process's Go loop de-interleaves.
func (m *Meter) splitFast(frames []float64, n int) bool { return false }
