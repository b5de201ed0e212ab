//go:build purego || !amd64

package layer3

// synthSumFast has no kernel on this build: synthSum's Go loop runs.
func synthSumFast(v *[16][64]float64, newest int, d *[512]float64, o *[32]float64) bool {
	return false
}

// imdctLongFast has no kernel on this build: imdctLong's Go loop runs.
func imdctLongFast(in *[18]float64, m *[18][36]float64, out *[36]float64) bool {
	return false
}

// matrixFast has no kernel on this build: matrixGo runs.
func matrixFast(s *[32]float64, n int, v *[64]float64) bool {
	return false
}
