package wav

import "testing"

// BenchmarkConverters times the sample kernels alone on one 64 KiB block,
// without the reads around them.
func BenchmarkConverters(b *testing.B) {
	for _, bc := range []struct {
		name  string
		bytes int
		conv  converter
	}{
		{"uint8", 1, convertUint8},
		{"int16", 2, convertInt16},
		{"int24", 3, convertInt24},
		{"int32", 4, convertInt32},
		{"float32", 4, convertFloat32},
		{"float64", 8, convertFloat64},
	} {
		b.Run(bc.name, func(b *testing.B) {
			const samples = 8192
			raw := make([]byte, samples*bc.bytes)
			for i := range raw {
				raw[i] = byte(i * 7)
			}
			dst := make([]float64, samples)
			b.SetBytes(int64(len(raw)))
			for b.Loop() {
				bc.conv(dst, raw)
			}
			b.ReportMetric(float64(b.Elapsed().Nanoseconds())/float64(b.N)/samples, "ns/sample")
		})
	}
}
