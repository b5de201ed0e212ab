//go:build !amd64 || purego

package wav

// useAVX2 is false: no assembly here.
var useAVX2 = false

// convertInt24Fast does nothing on platforms without the AVX2 kernel.
func convertInt24Fast(dst []float64, raw []byte) int { return 0 }
