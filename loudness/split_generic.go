//go:build !amd64 || purego

package loudness

// splitFast reports false: Meter.split6 or Meter.splitChannel de-interleaves.
func (m *Meter) splitFast(frames []float64, n int) bool { return false }

// split6Fast does nothing here: Meter.split6's Go loop does every frame.
func (m *Meter) split6Fast(frames []float64, n int) int { return 0 }
