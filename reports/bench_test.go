package reports

import (
	"io"
	"testing"
)

// BenchmarkCheckWriters writes one result per iteration in each format, to
// show the per-file cost (reflection for JSON included) is negligible next
// to measuring the file.
func BenchmarkCheckWriters(b *testing.B) {
	r := testResults()[1]
	for _, f := range CheckFormats() {
		b.Run(string(f), func(b *testing.B) {
			w, _ := NewCheckWriter(io.Discard, f, testOptions())
			b.ReportAllocs()
			for b.Loop() {
				if err := w.Write(r); err != nil {
					b.Fatal(err)
				}
			}
			if err := w.Close(Summary{}); err != nil {
				b.Fatal(err)
			}
		})
	}
}
