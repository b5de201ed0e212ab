package external_test

import (
	"bytes"
	"fmt"

	"github.com/kweigh/kweigh/decode/external"
)

// ExampleDetect recognises containers by their first bytes: an MP4 whose
// ftyp box names the M4A brand (ISO/IEC 14496-12 section 4.3), and the
// EBML magic of Matroska. Reading them then needs ffmpeg.
func ExampleDetect() {
	m4a := append([]byte{0, 0, 0, 0x18}, "ftypM4A \x00\x00\x02\x00M4A isom"...)
	mkv := []byte{0x1A, 0x45, 0xDF, 0xA3, 0x9F, 0x42, 0x86, 0x81, 0x01, 0x42, 0xF7, 0x81, 0x01}
	for _, b := range [][]byte{m4a, mkv} {
		fmt.Println(external.Detect(bytes.NewReader(b), int64(len(b))))
	}
	// Output:
	// MP4/M4A
	// Matroska/WebM
}
